/** Shared fixtures for the workbook-layer tests: an invented claims sheet in the sandbox. */
import { SandboxWorkbook, sandboxFromRows } from '../../src/sandbox/index.js';
import { createWorkbookLayer, type ExcelRunner, type TailmarkWorkbookLayer, type WorkbookLayerOptions } from '../../src/workbook/index.js';
import type { RunSettings } from '../../src/workbook/api.js';
import { mulberry32 } from '../../src/demo/random.js';
import { clientSettled, officeClientFor, type OfficeClientHost } from '../../src/cli/office-client.js';

/**
 * Which client the workbook-layer tests run through: the sandbox directly, or Microsoft's real
 * Office.js client whose requests the sandbox answers (vitest project "office-js" sets
 * TAILMARK_TEST_CLIENT=office-js; see vitest.config.ts).
 */
export const CLIENT: 'sandbox' | 'office-js' = process.env.TAILMARK_TEST_CLIENT === 'office-js' ? 'office-js' : 'sandbox';

const hosts = new WeakMap<SandboxWorkbook, OfficeClientHost>();

/** The office-js host of a sandbox (one per sandbox). */
export function officeHost(sb: SandboxWorkbook): OfficeClientHost {
  let h = hosts.get(sb);
  if (!h) {
    h = officeClientFor(sb);
    hosts.set(sb, h);
  }
  return h;
}

/** Excel.run for the workbook layer under test: the sandbox's own, or the real client's. */
export function hostRun(sb: SandboxWorkbook): SandboxWorkbook['run'] {
  return CLIENT === 'office-js' ? (officeHost(sb).run as SandboxWorkbook['run']) : sb.run;
}

export const HEADERS = ['Claim ID', 'Employee', 'Cost centre', 'Category', 'Amount'] as const;

/** Deterministic pseudo-random generator (mulberry32), so fixtures are the same every run. */
export const rng = mulberry32;

/**
 * n invented claims: 4 cost centres x 3 categories; amounts around 100 with a few planted large ones
 * (every 97th row x 20) so that the robust score flags them.
 */
export function claimRows(n: number, seed = 7): (string | number)[][] {
  const r = rng(seed);
  const ccs = ['CC-101', 'CC-202', 'CC-303', 'CC-404'];
  const cats = ['Travel', 'Meals', 'Lodging'];
  const rows: (string | number)[][] = [[...HEADERS]];
  for (let i = 0; i < n; i++) {
    const base = 80 + Math.round(r() * 4000) / 100;
    const amount = i % 97 === 13 ? base * 20 : base;
    rows.push([`CL-${String(i + 1).padStart(6, '0')}`, `Person ${1 + (i % 37)}`, ccs[i % 4], cats[(i >> 2) % 3], Math.round(amount * 100) / 100]);
  }
  return rows;
}

export function claimsSandbox(n = 200, seed = 7): SandboxWorkbook {
  const sb = sandboxFromRows('Claims', claimRows(n, seed));
  sb.setSelection('Claims', 'B3');
  return sb;
}

export function layerFor(sb: SandboxWorkbook, options: WorkbookLayerOptions = {}): TailmarkWorkbookLayer {
  const run = hostRun(sb);
  return createWorkbookLayer(run, { now: () => new Date('2025-03-31T09:00:00Z'), runInContext: run, ...options });
}

export const SETTINGS: RunSettings = {
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

/**
 * Let the real client's clean-up requests of earlier Excel.runs arrive (it releases kept
 * references in a request it does not wait for, answered a task later, as a round trip), so they
 * are not counted with, or fault-injected into, what a test measures next. A no-op on the sandbox.
 */
export async function settled(): Promise<void> {
  if (CLIENT === 'office-js') await clientSettled();
}

/** A runner whose k-th sync (counted from now, across everything run through the sandbox) fails part-way. */
export function failingAt(sb: SandboxWorkbook, k: number): ExcelRunner {
  const run = hostRun(sb);
  let armed = false;
  return async (options, batch) => {
    if (!armed) {
      await settled();
      armed = true;
      sb.failSyncAt(k);
    }
    return run(options, batch);
  };
}
