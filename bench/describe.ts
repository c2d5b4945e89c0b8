/**
 * What describing the groups costs, on a full-height sheet (1,048,575 rows, 2,000 groups of uneven
 * size, lognormal amounts: the data of bench/run.ts), per method:
 * - "scoring": `scoreTable` and what scoring produces (scores, flags, each group's centre, scale,
 *   flag count, chance rate): what the pane's live preview reads;
 * - "scoring + every statistic": the same, then `describeColumn` (every descriptive statistic of
 *   every group and of the whole column: median, MAD, scaled MAD, mean absolute deviation, mean,
 *   SD, Q1, Q3, medcouple) and the whole column's fit (`pooled`): what every real run's notes sheet
 *   reads (src/report/plan.ts);
 * - "real run": `runPipeline` (settings, columns, scoring, the plan with its notes sheet; row
 *   explanations on demand, as the large-file writer takes them).
 * Each figure is the best of REPEATS runs in a child process of its own (after a gc()); the
 * children run one after another. Informational (no target): it decided that the descriptive
 * statistics are computed by one explicit function rather than lazily on first read (figures of
 * both in DEVELOPERS.md; the lazy version read the same fields from GroupStats).
 * Usage: npm run build:node && node --expose-gc dist/bench/describe.js [--json]
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describeColumn, scoreTable } from '../src/scoring/index.js';
import type { MethodId, RawCell } from '../src/scoring/index.js';
import { runPipeline } from '../src/pipeline/run.js';
import { mulberry32 } from '../src/demo/random.js';

const ROWS = 1_048_575;
const GROUPS = 2_000;
const REPEATS = 5;
const METHODS: readonly MethodId[] = ['robust', 'classic', 'skew'];
type Mode = 'scoring' | 'all' | 'run';
const MODES: readonly Mode[] = ['scoring', 'all', 'run'];

function makeData(): { keys: RawCell[]; amounts: RawCell[] } {
  const rnd = mulberry32(20240601);
  const names = Array.from({ length: GROUPS }, (_, g) => `CC-${String(1000 + g)}`);
  const mu = Float64Array.from({ length: GROUPS }, () => 3 + 4 * rnd());
  const keys = new Array<RawCell>(ROWS);
  const amounts = new Array<RawCell>(ROWS);
  for (let r = 0; r < ROWS; r++) {
    const g = Math.min(GROUPS - 1, Math.floor(GROUPS * rnd() ** 1.5));
    keys[r] = names[g];
    const z = Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
    amounts[r] = Math.round(Math.exp(mu[g] + 0.8 * z) * 100) / 100;
  }
  return { keys, amounts };
}

function once(method: MethodId, mode: Mode, keys: RawCell[], amounts: RawCell[]): number {
  const settings = { method, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' } as const;
  if (mode === 'run') {
    const run = runPipeline(
      { source: 'bench', sheetName: 'Claims', headers: ['Cost centre', 'Amount'], columns: [keys, amounts], rowCount: ROWS, headerRow: 1, firstColumn: 0 },
      { ...settings, valueColumns: ['Amount'], groupColumns: ['Cost centre'] },
      { when: new Date(0), reasonText: 'on-demand' },
    );
    return run.plan.columns.length;
  }
  const col = scoreTable({ valueColumns: [{ name: 'Amount', cells: amounts }], groupColumns: [{ name: 'Cost centre', cells: keys }] }, settings).columns[0];
  let check = col.scores[0] + col.flagged[0];
  for (const g of col.groups) check += (g.center ?? 0) + (g.scale ?? 0) + g.flagged + (g.chanceRate ?? 0);
  if (mode === 'all') {
    const d = describeColumn(col);
    for (const x of [...d.groups, d.whole]) check += (x.median ?? 0) + (x.mad ?? 0) + (x.sd ?? 0) + (x.q3 ?? 0) + (x.medcouple ?? 0);
    check += col.pooled.n;
  }
  return Number.isFinite(check) ? 0 : 1;
}

function child(method: MethodId, mode: Mode): void {
  const { keys, amounts } = makeData();
  let best = Infinity;
  for (let i = 0; i < REPEATS; i++) {
    (globalThis as { gc?: () => void }).gc?.();
    const t0 = performance.now();
    once(method, mode, keys, amounts);
    best = Math.min(best, performance.now() - t0);
  }
  process.stdout.write(JSON.stringify({ ms: best, peakMB: process.resourceUsage().maxRSS / 1024 }));
}

function main(): void {
  const args = process.argv.slice(2);
  if (args[0] === '--child') {
    child(args[1] as MethodId, args[2] as Mode);
    return;
  }
  const self = fileURLToPath(import.meta.url);
  const out: { method: MethodId; mode: Mode; ms: number; peakMB: number }[] = [];
  for (const method of METHODS) {
    for (const mode of MODES) {
      const r = spawnSync(process.execPath, ['--expose-gc', self, '--child', method, mode], { encoding: 'utf8', maxBuffer: 1 << 20 });
      if (r.status !== 0) throw new Error(`child ${method} ${mode} failed: ${r.stderr}`);
      const got = JSON.parse(r.stdout) as { ms: number; peakMB: number };
      out.push({ method, mode, ms: Math.round(got.ms), peakMB: Math.round(got.peakMB) });
    }
  }
  if (args.includes('--json')) process.stdout.write(JSON.stringify(out) + '\n');
  else {
    console.log(`describing groups: ${ROWS} rows, ${GROUPS} groups, best of ${REPEATS} per child`);
    for (const r of out) console.log(`${r.method.padEnd(8)} ${r.mode.padEnd(8)} ${String(r.ms).padStart(7)} ms ${String(r.peakMB).padStart(6)} MB`);
  }
}

main();
