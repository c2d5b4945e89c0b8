/**
 * The off-thread pipeline (src/pipeline/offthread.ts): the client and the worker's side of the
 * protocol, joined here by an in-memory port that copies every message with structuredClone (as
 * postMessage does), so what arrives is what a real worker would hand back. The expected values
 * come from runPipeline on the same table (same thread), and the robust z of the outlier from its
 * definition, worked by hand.
 */
import { describe, expect, it } from 'vitest';
import {
  TailmarkError,
  createWorkerPipeline,
  runPipeline,
  runPipelineYielding,
  servePipeline,
  type FromWorker,
  type PipelinePort,
  type ToWorker,
} from '../../src/pipeline/index.js';

const table = {
  source: 'test table',
  sheetName: 'Claims',
  headers: ['Team', null, 'Amount', 'Memo'],
  columns: [
    ['a', 'a', 'a', 'a', 'a', 'b', 'b', 'b'],
    ['x', 'x', 'x', 'x', 'x', 'x', 'x', 'x'],
    [10, 11, 12, 13, 500, 7, '8', 9],
    ['m', 'm', 'm', 'm', 'm', 'm', 'm', 'm'],
  ],
  rowCount: 8,
  headerRow: 1,
  firstColumn: 0,
};
const settings = { valueColumns: ['Amount'], groupColumns: ['Team'], minGroupSize: 2, method: 'robust' as const };

/** A worker in this thread: messages cross as structured clones, one macrotask later. */
function memoryPort(log: { sent: ToWorker[]; terminated: number }, mute = false): PipelinePort {
  let toHost: ((m: FromWorker) => void) | null = null;
  const serve = servePipeline((msg, transfer) => {
    const copy = structuredClone(msg, { transfer: transfer ?? [] });
    setTimeout(() => toHost?.(copy), 0);
  });
  return {
    post(m) {
      log.sent.push(m);
      const copy = structuredClone(m);
      if (!mute) setTimeout(() => serve(copy), 0);
    },
    listen(onMessage) {
      toHost = onMessage;
    },
    terminate() {
      log.terminated++;
      toHost = null;
    },
  };
}

describe('createWorkerPipeline', () => {
  it('gives the same result and plan as the same-thread run, sending only the columns the run reads', async () => {
    const log = { sent: [] as ToWorker[], terminated: 0 };
    const phases: string[] = [];
    const pipeline = createWorkerPipeline(() => memoryPort(log), { sliceRows: 3 });
    const run = await pipeline(table, settings, { when: new Date(0), marks: 'host', onProgress: (p) => phases.push(p) });
    const same = runPipeline(table, settings, { when: new Date(0), marks: 'host' });
    // Median of group a is 12, MAD 1 -> (500 - 12) / 1.4826 (worked by hand from the definition).
    expect(run.result.columns[0].scores[4]).toBeCloseTo(488 / 1.4826, 6);
    expect(Array.from(run.result.columns[0].scores)).toEqual(Array.from(same.result.columns[0].scores));
    expect(Array.from(run.result.columns[0].flagged)).toEqual(Array.from(same.result.columns[0].flagged));
    expect(run.plan.columns.map((c) => c.values)).toEqual(same.plan.columns.map((c) => c.values));
    expect(run.plan.notes).toEqual(same.plan.notes);
    expect(run.plan.table).toEqual(same.plan.table);
    expect(run.columns).toEqual(same.columns);
    // Team (0) and Amount (2) travel, in slices of 3 rows; column 1 (ours) and Memo (3) do not.
    const cells = log.sent.filter((m) => m.type === 'cells');
    expect(cells.map((m) => [m.column, m.offset, m.cells.length]).sort((a, b) => a[0] - b[0] || a[1] - b[1])).toEqual([
      [0, 0, 3], [0, 3, 3], [0, 6, 2], [2, 0, 3], [2, 3, 3], [2, 6, 2],
    ]);
    expect(phases).toContain('sending');
    expect(phases).toContain('planning');
  });

  it('with marks from the table (the default) sends every column and gives the same marks', async () => {
    const log = { sent: [] as ToWorker[], terminated: 0 };
    const pipeline = createWorkerPipeline(() => memoryPort(log));
    const run = await pipeline(table, settings, { when: new Date(0) });
    const same = runPipeline(table, settings, { when: new Date(0) });
    expect(run.marks).toEqual(same.marks);
    expect(run.plan.columns.map((c) => c.values)).toEqual(same.plan.columns.map((c) => c.values));
    expect(new Set(log.sent.flatMap((m) => (m.type === 'cells' ? [m.column] : [])))).toEqual(new Set([0, 1, 2, 3]));
  });

  it('reuses an idle worker and reports a setting error as the same TailmarkError', async () => {
    const log = { sent: [] as ToWorker[], terminated: 0 };
    let spawned = 0;
    const pipeline = createWorkerPipeline(() => (spawned++, memoryPort(log)));
    await pipeline(table, settings, { when: new Date(0) });
    await pipeline(table, settings, { when: new Date(0) });
    expect(spawned).toBe(1);
    const err = await pipeline(table, { valueColumns: ['Nope'] }, { when: new Date(0) }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(TailmarkError);
    expect((err as TailmarkError).code).toBe('bad-settings');
    // A column without numbers is found by the worker and comes back with its code.
    const none = await pipeline(table, { valueColumns: ['Memo'] }, { when: new Date(0) }).catch((e: unknown) => e);
    expect((none as TailmarkError).code).toBe('no-numbers');
  });

  it('Cancel rejects at once and terminates a worker that does not answer', async () => {
    const log = { sent: [] as ToWorker[], terminated: 0 };
    const pipeline = createWorkerPipeline(() => memoryPort(log, true));
    const ac = new AbortController();
    const pending = pipeline(table, settings, { when: new Date(0), signal: ac.signal });
    await new Promise((r) => setTimeout(r, 20));
    const t0 = performance.now();
    ac.abort();
    const err = await pending.catch((e: unknown) => e);
    const ms = performance.now() - t0;
    expect((err as TailmarkError).code).toBe('cancelled');
    expect(ms, `cancel took ${ms.toFixed(1)} ms`).toBeLessThan(250);
    expect(log.terminated).toBe(1);
    expect(log.sent.some((m) => m.type === 'cancel')).toBe(true);
  });
});

describe('runPipelineYielding (same-thread fallback)', () => {
  it('gives runPipeline\'s result and honours an aborted signal', async () => {
    const run = await runPipelineYielding(table, settings, { when: new Date(0) });
    expect(run.result.columns[0].scores[4]).toBeCloseTo(488 / 1.4826, 6);
    const ac = new AbortController();
    ac.abort();
    const err = await runPipelineYielding(table, settings, { when: new Date(0), signal: ac.signal }).catch((e: unknown) => e);
    expect((err as TailmarkError).code).toBe('cancelled');
  });
});
