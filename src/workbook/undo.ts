/**
 * Clean-up: undo a write phase that failed part-way, so a failed run leaves the workbook as it was
 * (a first run's additions removed, a re-run's review marks put back).
 */
import { isTailmarkFormula, type Plan } from '../report/index.js';
import { TailmarkError } from './api.js';
import { LOG_SHEET_NAME } from './notes.js';
import type { Placement } from './place.js';
import type { Resolved } from './resolve.js';
import type { Syncer } from './sync.js';

/** Undo a write phase that failed part-way (see the module comment). Never hides the original error. */
export async function compensate(
  sync: Syncer,
  res: Resolved,
  placement: Placement,
  plan: Plan,
  createdNotes: boolean,
  createdLog: boolean,
  oldStatus: readonly string[],
  oldNote: readonly string[],
  firstDataRow: number,
  original: unknown,
): Promise<void> {
  const wb = sync.context.workbook;
  sync.pending = 0;
  try {
    if (!placement.rerun) {
      if (res.table) {
        const added = placement.addNames.map((name) => res.table!.columns.getItemOrNullObject(name));
        for (const c of added) c.load('name');
        await sync.sync();
        for (const c of added) if (!c.isNullObject) c.delete();
      } else {
        for (let i = plan.columns.length - 1; i >= 0; i--) {
          const c = placement.columns[i];
          const b = placement.block[i];
          if (b.inserted) res.sheet.getRangeByIndexes(0, c, 1, 1).getEntireColumn().delete('Left');
          else {
            const r = res.sheet.getRangeByIndexes(res.headerRow, c, res.rows + 1, 1);
            r.dataValidation.clear();
            r.clear('All');
            if (b.width !== null) r.format.columnWidth = b.width;
          }
        }
      }
      await sync.sync();
      const cfs = res.sheet.getRangeByIndexes(firstDataRow, placement.startColumn, res.rows, Math.max(1, placement.endColumn - placement.startColumn)).conditionalFormats;
      cfs.load('items/type');
      await sync.sync();
      const custom = cfs.items.filter((cf) => cf.type === 'Custom');
      for (const cf of custom) cf.custom.rule.load('formula');
      await sync.sync();
      for (const cf of custom) if (isTailmarkFormula(cf.custom.rule.formula)) cf.delete();
    } else if (placement.oldStatus !== null && placement.oldNote !== null && placement.dropColumns.length === 0 && placement.insertCount === 0) {
      // Put the review marks back where they were.
      const s = res.sheet.getRangeByIndexes(firstDataRow, placement.oldStatus, res.rows, 1);
      s.values = oldStatus.map((x) => [x]);
      const n = res.sheet.getRangeByIndexes(firstDataRow, placement.oldNote, res.rows, 1);
      n.values = oldNote.map((x) => [x]);
    }
    const made = [createdNotes ? plan.notes.name : null, createdLog ? LOG_SHEET_NAME : null]
      .filter((n): n is string => n !== null)
      .map((n) => wb.worksheets.getItemOrNullObject(n));
    for (const m of made) m.load('name');
    await sync.sync();
    for (const m of made) if (!m.isNullObject) m.delete();
    await sync.sync();
  } catch (e) {
    const msg = original instanceof Error ? original.message : String(original);
    throw new TailmarkError(
      'changed-during-run',
      `Writing the results failed (${msg}) and undoing the partial write also failed (${e instanceof Error ? e.message : String(e)}). Use "Remove results" and run again.`,
    );
  }
}
