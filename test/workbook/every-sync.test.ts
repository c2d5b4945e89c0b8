/**
 * All-or-nothing runs: a run or re-run that fails at any one of its syncs leaves the workbook
 * exactly as it was (cells, formats, rules, validation, sheets, settings). The failure is injected
 * with `sb.failSyncAt(k)` for every k from 1 to the number of syncs the run takes, with Excel's
 * failure mode (the statements before the failing one in that sync stay applied).
 */
import { describe, expect, it } from 'vitest';
import { diffSnapshots, type SandboxWorkbook } from '../../src/sandbox/index.js';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import type { RunSettings } from '../../src/workbook/api.js';
import { claimsSandbox, failingAt, hostRun, SETTINGS } from './helpers.js';

const OPTS = { payloadLimit: 60_000, now: () => new Date('2025-03-31T09:00:00Z') };
const ROWS = 600;

interface Scenario {
  /** Workbook state before the run under test (may run and mark through the layer). */
  readonly prepare: (sb: SandboxWorkbook) => Promise<void>;
  readonly settings: RunSettings;
}

/** An invented second amount column ("Mileage") beside the claims, for runs with two value columns. */
function withMileage(sb: SandboxWorkbook): void {
  sb.setValues('Claims', 'F1', [['Mileage'], ...Array.from({ length: ROWS }, (_, i) => [10 + ((i * 37) % 90) + (i % 89 === 5 ? 900 : 0)])]);
}

async function scoredAndMarked(sb: SandboxWorkbook, settings: RunSettings): Promise<void> {
  const layer = createWorkbookLayer(hostRun(sb), OPTS);
  await layer.run(await layer.detect(), settings);
  const ex = await layer.listExceptions();
  await layer.mark([ex[0].row], 'Cleared', 'receipt seen');
}

async function check(s: Scenario): Promise<{ total: number; broken: string[] }> {
  const probe = claimsSandbox(ROWS);
  await s.prepare(probe);
  const ok = createWorkbookLayer(hostRun(probe), OPTS);
  await ok.run(await ok.detect(), s.settings);
  const total = ok.lastStats!.syncs;
  const broken: string[] = [];
  for (let k = 1; k <= total; k++) {
    const sb = claimsSandbox(ROWS);
    await s.prepare(sb);
    const t = await createWorkbookLayer(hostRun(sb), OPTS).detect();
    const before = sb.snapshot();
    const failing = createWorkbookLayer(failingAt(sb, k), OPTS);
    await expect(failing.run(t, s.settings)).rejects.toThrow();
    expect(sb.faultFired).toBe(true);
    const diff = diffSnapshots(before, sb.snapshot());
    if (diff.length) broken.push(`sync ${k} of ${total}: ${diff.slice(0, 3).join('; ')}${diff.length > 3 ? ` (+${diff.length - 3})` : ''}`);
  }
  return { total, broken };
}

const RERUN = { ...SETTINGS, cutoff: 3 };

describe('a run that fails at any sync leaves the workbook as it was', () => {
  it('first run', async () => {
    const { total, broken } = await check({ prepare: () => Promise.resolve(), settings: RERUN });
    expect(total).toBeGreaterThan(4);
    expect(broken).toEqual([]);
  });

  it('re-run of a scored workbook with a review mark (result columns, rules, dropdown, notes, log, settings put back)', async () => {
    const { total, broken } = await check({ prepare: (sb) => scoredAndMarked(sb, SETTINGS), settings: RERUN });
    expect(total).toBeGreaterThan(4);
    expect(broken).toEqual([]);
  });

  it('re-run of an Excel table', async () => {
    const prepare = async (sb: SandboxWorkbook) => {
      sb.addTable('Claims', `A1:E${ROWS + 1}`, 'ClaimTable');
      await scoredAndMarked(sb, SETTINGS);
    };
    const { total, broken } = await check({ prepare, settings: RERUN });
    expect(total).toBeGreaterThan(4);
    expect(broken).toEqual([]);
  });

  it('re-run with fewer result columns (two value columns, then one)', async () => {
    const prepare = async (sb: SandboxWorkbook) => {
      withMileage(sb);
      await scoredAndMarked(sb, { ...SETTINGS, valueColumns: ['Amount', 'Mileage'] });
    };
    const { broken } = await check({ prepare, settings: RERUN });
    expect(broken).toEqual([]);
  });

  it('re-run with more result columns (one value column, then two)', async () => {
    const prepare = async (sb: SandboxWorkbook) => {
      withMileage(sb);
      await scoredAndMarked(sb, SETTINGS);
    };
    const { broken } = await check({ prepare, settings: { ...RERUN, valueColumns: ['Amount', 'Mileage'] } });
    expect(broken).toEqual([]);
  });
});
