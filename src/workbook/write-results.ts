/**
 * The run's writes, in row chunks under the request budget: our columns (structure, headers,
 * widths, values), the status dropdown, our highlight rules, the notes sheet and the run log.
 */
import { REVIEW_STATUSES, ruleFormula, type Plan, type PlanCell, type PlanColumn } from '../report/index.js';
import type { RunProgress } from './api.js';
import { columnLetters } from './a1.js';
import { HEADER_SWATCH, LOG_SHEET_NAME, TITLE_SWATCH, formatFor, notesGrid, toCellValue } from './notes.js';
import { queueLogLines } from './log.js';
import { runLogLines } from '../report/index.js';
import type { RunRecord, RunSettings } from './api.js';
import type { Placement } from './place.js';
import type { Resolved } from './resolve.js';
import { jsonBytes, utf8Bytes, type Syncer } from './sync.js';

/** Points per character of column width (Excel: 8.43 characters = 48 points). */
const POINTS_PER_CHAR = 5.7;

/** Number format for a plan column: its own, or text for anything holding strings. */
function columnFormat(col: PlanColumn): string {
  if (col.numberFormat) return col.numberFormat;
  if (col.kind === 'status' || col.kind === 'note' || col.kind === 'reason' || col.kind === 'flag') return '@';
  return col.values.some((v) => typeof v === 'string') ? '@' : 'General';
}

/** Queue the values of rows [r0, r0+n) of every plan column; returns bytes queued. */
function chunkArrays(values: readonly (readonly PlanCell[])[], formats: readonly string[], i: number, r0: number, n: number) {
  const v: (string | number | boolean)[][] = new Array<(string | number | boolean)[]>(n);
  const f: string[][] = new Array<string[]>(n);
  const col = values[i];
  const fmt = formats[i];
  for (let r = 0; r < n; r++) {
    v[r] = [toCellValue(col[r0 + r] ?? null)];
    f[r] = [fmt];
  }
  return { v, f, bytes: jsonBytes(v) + jsonBytes(f) };
}

export async function writeAll(
  sync: Syncer,
  res: Resolved,
  plan: Plan,
  placement: Placement,
  values: readonly (readonly PlanCell[])[],
  ourRules: Excel.ConditionalFormat[],
  firstDataRow: number,
  deps: { readonly onProgress?: (p: RunProgress) => void },
): Promise<void> {
  const sheet = res.sheet;
  const rows = res.rows;
  const k = plan.columns.length;
  deps.onProgress?.({ phase: 'writing', fraction: 0 });

  // Structure first: take away old extra columns, make room for new ones.
  await sync.reserve(1024);
  const oldRows = Math.max(rows, res.state?.rowCount ?? 0);
  for (const d of placement.dropColumns) {
    if (d.info.inserted) sheet.getRangeByIndexes(0, d.column, 1, 1).getEntireColumn().delete('Left');
    else {
      const r = sheet.getRangeByIndexes(res.headerRow, d.column, oldRows + 1, 1);
      r.dataValidation.clear();
      r.clear('All');
      if (d.info.width !== null) r.format.columnWidth = d.info.width;
    }
  }
  if (placement.insertCount > 0) {
    sheet.getRangeByIndexes(0, placement.insertAt, 1, placement.insertCount).getEntireColumn().insert('Right');
  }
  if (res.table) {
    for (const name of placement.dropNames) res.table.columns.getItem(name).delete();
    for (const name of placement.addNames) res.table.columns.add(undefined, undefined, name);
  }
  // Headers (plain ranges: we own the header cells of our columns).
  if (!res.table) {
    for (let i = 0; i < k; i++) {
      const h = sheet.getRangeByIndexes(res.headerRow, placement.columns[i], 1, 1);
      h.numberFormat = [['@']];
      h.values = [[plan.columns[i].header]];
      h.format.font.bold = true;
      h.format.fill.color = `#${HEADER_SWATCH.fill}`;
      h.format.font.color = `#${HEADER_SWATCH.font}`;
    }
  }
  for (let i = 0; i < k; i++) {
    const w = plan.columns[i].width;
    // Widths on columns new this run: ones we inserted (deleting them restores the sheet), and
    // empty ones we write into, whose earlier width the state keeps for removal and undo.
    const b = placement.block[i];
    if (placement.fresh[i] && (b.inserted || b.width !== null) && w) sheet.getRangeByIndexes(0, placement.columns[i], 1, 1).format.columnWidth = Math.round(w * POINTS_PER_CHAR);
  }
  // Rows the table or block no longer has (the data shrank): clear our cells below.
  if (!res.table && (res.state?.rowCount ?? 0) > rows) {
    const extra = (res.state?.rowCount ?? 0) - rows;
    sheet.getRangeByIndexes(firstDataRow + rows, placement.blockColumn, extra, k).clear('Contents');
  }

  // Values in row chunks under the budget. Text columns get the text format first.
  const formats = plan.columns.map(columnFormat);
  const target = sync.budget.target;
  let bytesPerRow = 0;
  for (let i = 0; i < k; i++) bytesPerRow += chunkArrays(values, formats, i, 0, Math.min(rows, 200)).bytes / Math.max(1, Math.min(rows, 200));
  bytesPerRow = Math.max(8, bytesPerRow * 1.25);
  let done = 0;
  while (done < rows) {
    const n = Math.max(1, Math.min(rows - done, Math.floor((target * 0.9) / bytesPerRow)));
    let chunkBytes = 0;
    const parts = [];
    for (let i = 0; i < k; i++) {
      const a = chunkArrays(values, formats, i, done, n);
      chunkBytes += a.bytes;
      parts.push(a);
    }
    await sync.reserve(chunkBytes);
    for (let i = 0; i < k; i++) {
      const r = sheet.getRangeByIndexes(firstDataRow + done, placement.columns[i], n, 1);
      r.numberFormat = parts[i].f;
      r.values = parts[i].v;
    }
    bytesPerRow = Math.max(8, (chunkBytes / n) * 1.1);
    done += n;
    deps.onProgress?.({ phase: 'writing', fraction: done / rows });
  }

  // Status dropdown.
  deps.onProgress?.({ phase: 'highlighting', fraction: 0 });
  await sync.reserve(1024);
  const statusCol = placement.columns[plan.columns.findIndex((c) => c.kind === 'status')];
  const statusRange = sheet.getRangeByIndexes(firstDataRow, statusCol, rows, 1);
  statusRange.dataValidation.clear();
  statusRange.dataValidation.rule = {
    list: { inCellDropDown: true, source: REVIEW_STATUSES.map((s) => s.label).join(',') },
  };

  // Highlight rules: drop our old ones (recognised by their marker), add the plan's.
  for (const cf of ourRules) cf.delete();
  const flagColumns = plan.columns.flatMap((c, i) => (c.kind === 'flag' ? [columnLetters(placement.columns[i])] : []));
  const cfRange = sheet.getRangeByIndexes(firstDataRow, placement.startColumn, rows, placement.endColumn - placement.startColumn);
  // Excel gives each new rule priority 0 (evaluated first): add the lowest-priority rule first so
  // the plan's first rule ends on top and the rules keep the plan's order.
  const rules = [...plan.rules].sort((a, b) => b.priority - a.priority);
  for (const rule of rules) {
    const formula = ruleFormula(rule, { firstDataRow: firstDataRow + 1, flagColumns, statusColumn: columnLetters(statusCol) });
    await sync.reserve(utf8Bytes(formula) + 200);
    const cf = cfRange.conditionalFormats.add('Custom');
    cf.custom.rule.formula = formula;
    cf.custom.format.fill.color = `#${rule.swatch.fill}`;
    cf.custom.format.font.color = `#${rule.swatch.font}`;
  }
  deps.onProgress?.({ phase: 'highlighting', fraction: 1 });
}

async function writeGrid(sync: Syncer, sheet: Excel.Worksheet, row0: number, grid: readonly (readonly PlanCell[])[], width: number): Promise<void> {
  const target = sync.budget.target;
  let r = 0;
  while (r < grid.length) {
    // Take rows while they fit.
    const v: (string | number | boolean)[][] = [];
    const f: string[][] = [];
    let bytes = 0;
    while (r + v.length < grid.length) {
      const row = grid[r + v.length];
      const vr = row.map(toCellValue);
      const fr = row.map((x) => formatFor(x));
      const b = jsonBytes(vr) + jsonBytes(fr) + 2;
      if (v.length > 0 && bytes + b > target * 0.9) break;
      v.push(vr);
      f.push(fr);
      bytes += b;
    }
    await sync.reserve(bytes);
    const range = sheet.getRangeByIndexes(row0 + r, 0, v.length, width);
    range.numberFormat = f;
    range.values = v;
    r += v.length;
  }
}

/** The log lines of this run (src/report/log.ts): the run's line, and a cutoff-change line when the cutoff differs from the last run's. */
export function logLinesFor(res: Resolved, plan: Plan, settings: RunSettings, record: RunRecord | undefined): PlanCell[][] {
  const previous = res.savedSettings && res.savedSettings.method === settings.method ? res.savedSettings.cutoff : null;
  return runLogLines(plan.log, settings.reviewer, previous, { reason: record?.cutoffReason ?? '', budget: record?.budget ?? null });
}

export async function writeNotes(
  sync: Syncer,
  res: Resolved,
  plan: Plan,
  createdNotes: boolean,
  createdLog: boolean,
  logNext: number,
  logLines: readonly (readonly PlanCell[])[],
): Promise<void> {
  const wb = sync.context.workbook;
  await sync.reserve(1024);
  const notes = createdNotes ? wb.worksheets.add(plan.notes.name) : res.notesSheet;
  if (!createdNotes) notes.getRange().clear('All');
  const grid = notesGrid(plan.notes, plan.caution);
  await writeGrid(sync, notes, 0, grid.rows, grid.width);
  await sync.reserve(256 * (grid.titleRows.length + grid.headerRows.length + 2));
  notes.getRange('A1').format.font.bold = true;
  for (const r of grid.titleRows) {
    const t = notes.getRangeByIndexes(r, 0, 1, 1);
    t.format.font.bold = true;
    t.format.fill.color = `#${TITLE_SWATCH.fill}`;
    t.format.font.color = `#${TITLE_SWATCH.font}`;
  }
  for (const r of grid.headerRows) notes.getRangeByIndexes(r, 0, 1, grid.width).format.font.bold = true;
  if (createdNotes) notes.getRange('A:A').format.columnWidth = 200;

  // Log: lines are only appended.
  const log = createdLog ? wb.worksheets.add(LOG_SHEET_NAME) : res.logSheet;
  await queueLogLines(sync, log, createdLog, logNext, logLines);
}
