/**
 * Undoing a write phase that failed part-way, so that a failed run or re-run leaves the workbook
 * exactly as it was: our new columns taken out and the ones a re-run took away put back, then
 * everything the backup (backup.ts) read before the first write written back: our result cells,
 * headers and widths, the status dropdown, our highlight rules at their old priorities, the notes
 * sheet, the log rows, the saved settings. Sheets the run added are deleted (only here: a normal
 * run never deletes a sheet).
 */
import { isTailmarkFormula, type Plan } from '../report/index.js';
import { TailmarkError } from './api.js';
import { LOG_SHEET_NAME } from './notes.js';
import type { Placement } from './place.js';
import type { Resolved } from './resolve.js';
import { bytesOf, sizeOf, type Backup, type SavedCells } from './backup.js';
import type { Syncer } from './sync.js';

export interface UndoInput {
  readonly res: Resolved;
  readonly placement: Placement;
  readonly plan: Plan;
  readonly createdNotes: boolean;
  readonly createdLog: boolean;
  readonly backup: Backup;
}

/**
 * Per-cell formats to write back: what differs from a cleared cell (bold, a font colour other
 * than automatic, a fill, wrap); `explicitBold` also writes bold = false (cells not cleared first).
 */
function settable(props: readonly (readonly Excel.CellProperties[])[], explicitBold: boolean): Excel.SettableCellProperties[][] {
  return props.map((row) =>
    row.map((p) => {
      const font: Excel.CellPropertiesFont = {};
      const bold = p.format?.font?.bold === true;
      if (bold || explicitBold) font.bold = bold;
      const color = p.format?.font?.color;
      if (color && color.toUpperCase() !== '#000000') font.color = color;
      const format: Excel.CellPropertiesFormat = {};
      if (Object.keys(font).length) format.font = font;
      const fill = p.format?.fill?.color;
      if (fill && fill.toUpperCase() !== '#FFFFFF') format.fill = { color: fill };
      if (p.format?.wrapText === true) format.wrapText = true;
      return Object.keys(format).length ? { format } : {};
    }),
  );
}

/** Queue writing a saved block back (number formats first, so text stays text). */
async function putBack(sync: Syncer, sheet: Excel.Worksheet, c: SavedCells, explicitBold: boolean): Promise<void> {
  const { rows, cols } = sizeOf(c);
  if (rows === 0 || cols === 0) return;
  await sync.reserve(bytesOf(c));
  const r = sheet.getRangeByIndexes(c.row, c.column, rows, cols);
  r.numberFormat = c.numberFormat.map((x) => [...x]);
  r.formulas = c.formulas.map((x) => [...x]);
  if (c.props) r.setCellProperties(settable(c.props, explicitBold));
}

/** Undo a write phase that failed part-way (see the module comment). Never hides the original error. */
export async function undoWrites(sync: Syncer, u: UndoInput, original: unknown): Promise<void> {
  const { res, placement, plan, backup } = u;
  const wb = sync.context.workbook;
  const sheet = res.sheet;
  sync.pending = 0;
  try {
    // 1. Structure back: our new columns out, the ones a re-run took away back in.
    if (res.table) {
      const added = placement.addNames.map((name) => res.table!.columns.getItemOrNullObject(name));
      for (const c of added) c.load('name');
      await sync.sync();
      for (const c of added) if (!c.isNullObject) c.delete();
      // Our table columns a re-run took away, back at their places (left to right).
      const names = res.tableColumns ?? [];
      for (const name of [...placement.dropNames].sort((a, b) => names.indexOf(a) - names.indexOf(b))) res.table.columns.add(names.indexOf(name), undefined, name);
    } else {
      for (let i = plan.columns.length - 1; i >= 0; i--) {
        if (!placement.fresh[i]) continue;
        const c = placement.columns[i];
        if (placement.block[i].inserted) sheet.getRangeByIndexes(0, c, 1, 1).getEntireColumn().delete('Left');
        else {
          const r = sheet.getRangeByIndexes(res.headerRow, c, res.rows + 1, 1);
          r.dataValidation.clear();
          r.clear('All');
          // The width the empty column had before we widened it (kept in the block's state).
          const w = placement.block[i].width;
          if (w !== null) r.format.columnWidth = w;
        }
      }
      for (const d of [...placement.dropColumns].sort((a, b) => a.column - b.column)) {
        if (d.info.inserted) sheet.getRangeByIndexes(0, d.column, 1, 1).getEntireColumn().insert('Right');
      }
      for (const w of backup.widths) sheet.getRangeByIndexes(0, w.column, 1, 1).format.columnWidth = w.width;
    }
    // 2. Our highlight rules: the ones there now out, the saved ones back at their priorities.
    const cfs = sheet.getRange().conditionalFormats;
    cfs.load('items/type');
    await sync.sync();
    const custom = cfs.items.filter((cf) => cf.type === 'Custom');
    for (const cf of custom) cf.custom.rule.load('formula');
    await sync.sync();
    for (const cf of custom) if (isTailmarkFormula(cf.custom.rule.formula)) cf.delete();
    for (const r of [...backup.rules].sort((a, b) => a.priority - b.priority)) {
      await sync.reserve(r.formula.length + 300);
      const cf = sheet.getRange(r.address).conditionalFormats.add('Custom');
      cf.custom.rule.formula = r.formula;
      if (r.fill !== null) cf.custom.format.fill.color = r.fill;
      if (r.font !== null) cf.custom.format.font.color = r.font;
      if (r.stopIfTrue) cf.stopIfTrue = true;
      cf.priority = r.priority;
    }
    // 3. Our result cells, headers and the status dropdown.
    for (const c of backup.cells) await putBack(sync, sheet, c, false);
    if (backup.headers) {
      const { cols } = sizeOf(backup.headers);
      sheet.getRangeByIndexes(backup.headers.row, backup.headers.column, 1, cols).format.fill.clear();
      await putBack(sync, sheet, backup.headers, true);
    }
    // The dropdown this run put on its status column, then the one there was.
    const v = backup.validation;
    const statusIndex = plan.columns.findIndex((c) => c.kind === 'status');
    const newStatus = placement.columns[statusIndex];
    // (A fresh status column was taken out above; only an old column of ours can still hold it.)
    if (newStatus !== undefined && !placement.fresh[statusIndex] && !(v && v.column === newStatus)) {
      await sync.reserve(300);
      sheet.getRangeByIndexes(res.headerRow + 1, newStatus, Math.max(1, res.rows), 1).dataValidation.clear();
    }
    if (v) {
      await sync.reserve(v.list ? v.list.source.length + 300 : 300);
      const span = Math.max(v.rowCount, res.rows);
      sheet.getRangeByIndexes(v.row, v.column, span, 1).dataValidation.clear();
      if (v.list) {
        const dv = sheet.getRangeByIndexes(v.row, v.column, v.rowCount, 1).dataValidation;
        dv.rule = { list: { source: v.list.source, inCellDropDown: v.list.inCellDropDown } };
        if (!v.ignoreBlanks) dv.ignoreBlanks = false;
      }
    }
    // 4. The notes and log sheets: added ones deleted, existing ones written back.
    const settingsNow = backup.settings.map((x) => wb.settings.getItemOrNullObject(x.key));
    for (const x of settingsNow) x.load('value');
    const made = [u.createdNotes ? plan.notes.name : null, u.createdLog ? LOG_SHEET_NAME : null]
      .filter((n): n is string => n !== null)
      .map((n) => wb.worksheets.getItemOrNullObject(n));
    for (const m of made) m.load('name');
    await sync.sync();
    for (const m of made) if (!m.isNullObject) m.delete();
    if (backup.notes) {
      res.notesSheet.getRange().clear('All');
      for (const c of backup.notes) await putBack(sync, res.notesSheet, c, false);
    }
    if (backup.log) for (const c of backup.log) await putBack(sync, res.logSheet, c, true);
    // 5. The saved settings.
    await sync.reserve(4096);
    backup.settings.forEach((s, i) => {
      if (s.value !== null) wb.settings.add(s.key, s.value);
      else if (!settingsNow[i].isNullObject) settingsNow[i].delete();
    });
    await sync.sync();
  } catch (e) {
    const msg = original instanceof Error ? original.message : String(original);
    throw new TailmarkError(
      'partly-written',
      `Writing the results failed (${msg}) and undoing the partial write also failed (${e instanceof Error ? e.message : String(e)}), so some of the run's changes may remain. Use "Remove results" and run again.`,
    );
  }
}
