/**
 * Full-height benchmark of the workbook layer: 1,048,575 data rows x 10 columns (an invented
 * claims sheet), detect -> run, then readForPreview, on each host: the sandbox directly, and
 * Microsoft's real Office.js client whose requests the sandbox answers. Reports syncs, the largest
 * request/response (bytes: the sandbox's estimate, or the real JSON the client sent and received),
 * time per phase, the longest event-loop stall of the run (the largest gap between ticks of
 * a 5 ms interval timer) and the process's peak memory.
 * Usage (after `npm run build:node`): node dist/bench/workbook.js [--json] [--rows N] [--cell]
 *   [--client sandbox|office-js] (default: both)
 * (--cell: detect from one selected cell, B3, through getSurroundingRegion, instead of the whole block).
 */
import { SandboxWorkbook } from '../src/sandbox/index.js';
import { clientSettled, officeClientFor } from '../src/cli/office-client.js';
import { nodePipeline } from '../src/cli/threads.js';
import { createWorkbookLayer } from '../src/workbook/index.js';
import type { RunSettings } from '../src/workbook/api.js';

export type BenchClient = 'sandbox' | 'office-js';

export interface WorkbookBenchResult {
  client: BenchClient;
  rows: number;
  columns: number;
  /** Time to fill the sandbox (not part of the layer). */
  buildMs: number;
  detect: { syncs: number; ms: number };
  run: { syncs: number; ms: number; maxRequestBytes: number; maxResponseBytes: number; flagged: number; longestBlockMs: number };
  preview: { syncs: number; ms: number; maxResponseBytes: number };
  /** Peak resident memory of this process so far (MB): both hosts in one process count together. */
  peakRssMb: number;
}

/** Fill a sheet directly (no syncs): Claim ID, Employee, Cost centre, Category, Amount + 5 more. */
export function fullHeightSandbox(rows: number, selection: 'block' | 'cell' = 'block'): SandboxWorkbook {
  const sb = new SandboxWorkbook();
  sb.addSheet('Claims');
  const header = ['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount', 'Project', 'Vendor', 'Ref', 'Memo', 'Region'];
  header.forEach((h, c) => sb.setCell('Claims', 0, c, h));
  let seed = 12345;
  const rnd = () => {
    seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
    return seed / 4294967296;
  };
  const ccs = ['CC-101', 'CC-202', 'CC-303', 'CC-404', 'CC-505'];
  const cats = ['Travel', 'Meals', 'Lodging', 'Fuel'];
  for (let i = 0; i < rows; i++) {
    const r = i + 1;
    const amount = Math.round((60 + rnd() * 80) * (i % 997 === 5 ? 25 : 1) * 100) / 100;
    sb.setCell('Claims', r, 0, `CL-${i + 1}`);
    sb.setCell('Claims', r, 1, `Person ${i % 301}`);
    sb.setCell('Claims', r, 2, ccs[i % 5]);
    sb.setCell('Claims', r, 3, cats[(i >> 3) % 4]);
    sb.setCell('Claims', r, 4, amount);
    sb.setCell('Claims', r, 5, `P${i % 17}`);
    sb.setCell('Claims', r, 6, `V${i % 211}`);
    sb.setCell('Claims', r, 7, i);
    sb.setCell('Claims', r, 8, `memo ${i % 1000}`);
    sb.setCell('Claims', r, 9, `R${i % 7}`);
  }
  // The whole block is selected by default. A single cell ('cell') goes through the sandbox's
  // getSurroundingRegion, which grows each side as far as it goes: O(rows x columns) at worst,
  // and near O(rows) on a dense block (each row check stops at its first value). Measured on the
  // 2-core project machine: the region alone 7-16 ms for 100,000 x 10 and 14-32 ms for
  // 1,048,575 x 10; the whole detect() (2 syncs, 2,001-row sample) about 65 ms for either.
  sb.setSelection('Claims', selection === 'cell' ? 'B3' : `A1:J${rows + 1}`);
  return sb;
}

export const BENCH_SETTINGS: RunSettings = {
  valueColumns: ['Amount'],
  groupColumns: ['Cost centre', 'Category'],
  idColumn: 'Claim ID',
  method: 'robust',
  cutoff: 3.5,
  direction: 'both',
  logScale: false,
  minGroupSize: 8,
  smallGroups: 'pool',
  decimal: 'auto',
  reviewer: null,
  detailColumns: null,
};

export async function benchWorkbook(rows = 1_048_575, selection: 'block' | 'cell' = 'block', client: BenchClient = 'sandbox'): Promise<WorkbookBenchResult> {
  let t0 = performance.now();
  const sb = fullHeightSandbox(rows, selection);
  const buildMs = performance.now() - t0;
  const host = client === 'office-js' ? officeClientFor(sb) : null;
  const runner = host ? (host.run as SandboxWorkbook['run']) : sb.run;
  // The pipeline on a worker thread, as `tailmark sandbox` runs it (TAILMARK_BENCH_SAME_THREAD=1: the fallback, to compare).
  const threads = process.env.TAILMARK_BENCH_SAME_THREAD === '1' ? null : nodePipeline();
  const layer = createWorkbookLayer(runner, { now: () => new Date('2025-03-31T09:00:00Z'), ...(threads ? { pipeline: threads.pipeline } : {}) });
  /** Largest request/response: the real JSON through the client, else the sandbox's estimate. */
  const maxReq = () => (host ? host.wire.requestBytes.max : sb.stats.requestBytes.max);
  const maxResp = () => (host ? host.wire.responseBytes.max : sb.stats.responseBytes.max);
  const reset = async () => {
    if (host) await clientSettled();
    sb.stats.reset();
    host?.wire.reset();
  };
  t0 = performance.now();
  await reset();
  const table = await layer.detect();
  const detect = { syncs: sb.stats.syncs, ms: performance.now() - t0 };
  await reset();
  let last = performance.now();
  let longest = 0;
  const ticker = setInterval(() => {
    const now = performance.now();
    longest = Math.max(longest, now - last);
    last = now;
  }, 5);
  t0 = performance.now();
  const summary = await layer.run(table, BENCH_SETTINGS);
  clearInterval(ticker);
  await threads?.close();
  longest = Math.max(longest, performance.now() - last);
  const run = {
    syncs: sb.stats.syncs,
    ms: performance.now() - t0,
    maxRequestBytes: maxReq(),
    maxResponseBytes: maxResp(),
    flagged: summary.flagged,
    longestBlockMs: longest,
  };
  await reset();
  t0 = performance.now();
  await layer.readForPreview(table, BENCH_SETTINGS);
  const preview = { syncs: sb.stats.syncs, ms: performance.now() - t0, maxResponseBytes: maxResp() };
  return { client, rows, columns: 10, buildMs, detect, run, preview, peakRssMb: Math.round(process.resourceUsage().maxRSS / 1024) };
}

const isMain = typeof process !== 'undefined' && process.argv[1] !== undefined && /bench[\\/]workbook\.(js|ts)$/.test(process.argv[1]);
if (isMain) {
  const i = process.argv.indexOf('--rows');
  const rows = i >= 0 ? Number(process.argv[i + 1]) : 1_048_575;
  const c = process.argv.indexOf('--client');
  const clients: BenchClient[] = c >= 0 ? [process.argv[c + 1] === 'office-js' ? 'office-js' : 'sandbox'] : ['sandbox', 'office-js'];
  void (async () => {
    for (const client of clients) {
      const r = await benchWorkbook(rows, process.argv.includes('--cell') ? 'cell' : 'block', client);
      if (process.argv.includes('--json')) process.stdout.write(JSON.stringify(r) + '\n');
      else {
        process.stdout.write(
          `workbook layer, ${r.rows} rows x ${r.columns} columns (${r.client === 'office-js' ? 'real Office.js client, answered by the sandbox' : 'sandbox'})\n` +
            `  detect : ${r.detect.syncs} syncs, ${r.detect.ms.toFixed(0)} ms\n` +
            `  run    : ${r.run.syncs} syncs, ${(r.run.ms / 1000).toFixed(1)} s, max request ${r.run.maxRequestBytes} B, max response ${r.run.maxResponseBytes} B, longest block ${r.run.longestBlockMs.toFixed(0)} ms, ${r.run.flagged} flagged\n` +
            `  preview: ${r.preview.syncs} syncs, ${(r.preview.ms / 1000).toFixed(1)} s, max response ${r.preview.maxResponseBytes} B\n` +
            `  peak memory of the process so far: ${r.peakRssMb} MB\n`,
        );
      }
    }
  })();
}
