import { describe, expect, it } from 'vitest';
import { diffSnapshots, type SandboxWorkbook } from '../../src/sandbox/index.js';
import { createWorkbookLayer, type ExcelRunner } from '../../src/workbook/index.js';
import { claimsSandbox, SETTINGS, hostRun } from './helpers.js';
import { NOTES_SHEET_NAME } from '../../src/report/index.js';
import { errorText } from '../../src/taskpane/messages.js';
import { TailmarkError } from '../../src/workbook/api.js';

/**
 * A runner around the sandbox whose sync number `failAt` (counted across the whole run) fails the
 * way Excel does when the sheets become protected mid-batch (AccessDenied, nothing of that sync applied).
 */
function failingRunner(sb: SandboxWorkbook, failAt: number): ExcelRunner {
  let n = 0;
  return (options, batch) =>
    hostRun(sb)(options, (context) => {
      const original = context.sync.bind(context);
      context.sync = (async () => {
        n++;
        if (n !== failAt) return original();
        // Every sheet: the failing sync may write the data sheet, the notes sheet or the log.
        const sheets = sb.sheetNames();
        for (const name of sheets) sb.setProtected(name, true);
        try {
          return await original();
        } finally {
          for (const name of sheets) sb.setProtected(name, false);
        }
      });
      return batch(context);
    });
}

const LIMIT = { payloadLimit: 120_000, now: () => new Date('2025-03-31T09:00:00Z') };

async function syncsOfRun(rows: number, rerun: boolean): Promise<number> {
  const sb = claimsSandbox(rows);
  const layer = createWorkbookLayer(hostRun(sb), LIMIT);
  if (rerun) await layer.run(await layer.detect(), SETTINGS);
  const t = await layer.detect();
  await layer.run(t, SETTINGS);
  return layer.lastStats!.syncs;
}

describe('a write phase that fails part-way is undone', () => {
  it('first run: the workbook is as before', async () => {
    const total = await syncsOfRun(1500, false);
    expect(total).toBeGreaterThan(6); // several write syncs under the small budget
    for (const failAt of [total - 1, total - 2]) {
      const sb = claimsSandbox(1500);
      const t = await createWorkbookLayer(hostRun(sb), LIMIT).detect();
      const before = sb.snapshot();
      const layer = createWorkbookLayer(failingRunner(sb, failAt), LIMIT);
      await expect(layer.run(t, SETTINGS)).rejects.toThrow(/protected/);
      expect(diffSnapshots(before, sb.snapshot())).toEqual([]);
    }
  });

  it('re-run: review marks are back where they were', async () => {
    const sb = claimsSandbox(1500);
    const ok = createWorkbookLayer(hostRun(sb), LIMIT);
    await ok.run(await ok.detect(), SETTINGS);
    const ex = await ok.listExceptions();
    await ok.mark([ex[0].row], 'Cleared', 'receipt seen');
    const t = await ok.detect();
    const total = await syncsOfRun(1500, true);
    const layer = createWorkbookLayer(failingRunner(sb, total - 2), LIMIT);
    await expect(layer.run(t, { ...SETTINGS, cutoff: 3 })).rejects.toThrow(/protected/);
    const after = await ok.listExceptions();
    expect(after.find((e) => e.row === ex[0].row)).toMatchObject({ status: 'Cleared', note: 'receipt seen' });
  });

  it('when the undo fails too, the message says changes may remain (never "Nothing was written")', async () => {
    const total = await syncsOfRun(1500, false);
    const sb = claimsSandbox(1500);
    const t = await createWorkbookLayer(hostRun(sb), LIMIT).detect();
    const before = sb.snapshot();
    // From the second-to-last sync on, every sheet stays protected: the write fails and so does its undo.
    let n = 0;
    const stuck: ExcelRunner = (options, batch) =>
      hostRun(sb)(options, (context) => {
        const original = context.sync.bind(context);
        context.sync = (() => {
          if (++n === total - 1) for (const name of sb.sheetNames()) sb.setProtected(name, true);
          return original();
        });
        return batch(context);
      });
    const err = await createWorkbookLayer(stuck, LIMIT).run(t, SETTINGS).then(() => null, (e: unknown) => e);
    for (const name of sb.sheetNames()) sb.setProtected(name, false);
    expect(err).toBeInstanceOf(TailmarkError);
    const e = err as TailmarkError;
    expect(e.code).toBe('partly-written');
    const left = diffSnapshots(before, sb.snapshot()).length;
    expect(left).toBeGreaterThan(0); // the case the message is for: changes did remain
    expect(e.message).toMatch(/may remain/);
    const shown = errorText({ code: e.code, message: e.message });
    expect(`${shown.title} ${shown.message} ${shown.next}`).not.toMatch(/nothing was (written|changed)/i);
    expect(shown.next).toMatch(/Remove results/);
  });
});

describe('messages', () => {
  it('a sheet-name clash is not shown as a taken column name', async () => {
    const sb = claimsSandbox(50);
    sb.addSheet(NOTES_SHEET_NAME);
    sb.setCell(NOTES_SHEET_NAME, 0, 0, 'my own notes');
    const layer = createWorkbookLayer(hostRun(sb), LIMIT);
    const err = await layer.run(await layer.detect(), SETTINGS).then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(TailmarkError);
    const e = err as TailmarkError;
    expect(e.code).toBe('name-clash');
    const shown = errorText({ code: e.code, message: e.message });
    expect(shown.message).toMatch(/sheet named "Tailmark notes"/);
    expect(shown.title).not.toMatch(/column/i);
    expect(shown.next).toMatch(/sheet/);
  });
});
