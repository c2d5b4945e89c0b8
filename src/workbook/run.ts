/**
 * run(): read -> score -> plan -> check -> write, inside one Excel.run.
 *
 * Syncs (5,000 rows x 10 columns, fits one chunk): resolve 1, read 1, check 1, write 1.
 * Every phase grows with cells only: reads and writes go in row chunks under the payload budget;
 * nothing loops over groups or flagged rows with a sync.
 *
 * Safety:
 *  - protected sheet -> 'protected' before any write (checked at resolve and again at check);
 *  - the data is re-read (values) in the check sync and compared by fingerprint -> 'changed-during-run';
 *  - notes/log sheet names taken by the user's own sheets -> 'name-clash'; no room right of the
 *    data -> 'column-limit'; all before any write;
 *  - cancellation is honoured between phases up to the write phase; a cancelled or refused run
 *    leaves the workbook as it was;
 *  - if a write sync fails part-way (only possible when the writes need several syncs), the
 *    layer compensates: a first run's additions are removed, a re-run's review marks are put back.
 */
import { claimIds, runPipeline, validateSettings } from '../pipeline/index.js';
import {
  EXCLUSION_LABELS,
  EXCLUSION_REASONS,
  type RawCell,
  type ScoreResult,
} from '../scoring/types.js';
import {
  isTailmarkFormula,
  runLogLines,
  mergeMarks,
  readMarkRecords,
  NOTES_SHEET_NAME,
  PALETTE,
  REVIEW_STATUSES,
  ruleFormula,
  type Plan,
  type PlanCell,
  type PlanColumn,
} from '../report/index.js';
import { TailmarkError, type DetectedTable, type GroupSummary, type RunProgress, type RunRecord, type RunSettings, type RunSummary } from './api.js';
import { MAX_COLUMNS, columnLetters, rectAddress } from './a1.js';
import { toRawCell } from './cells.js';
import { Fingerprint } from './fingerprint.js';
import {
  HEADER_SWATCH,
  LOG_SHEET_NAME,
  TITLE_SWATCH,
  formatFor,
  isLogMarker,
  isNotesMarker,
  notesGrid,
  toCellValue,
} from './notes.js';
import { queueLogLines } from './log.js';
import { readRows } from './read.js';
import { columnOf, protectedError, resolveTable, spanHeaders, type Resolved } from './resolve.js';
import { SETTINGS_KEY, STATE_KEY, isOurHeader, type BlockColumn, type LayerState } from './state.js';
import type { Syncer } from './sync.js';

/** Points per character of column width (Excel: 8.43 characters = 48 points). */
const POINTS_PER_CHAR = 5.7;

export interface RunDeps {
  readonly now: () => Date;
  readonly onProgress?: (p: RunProgress) => void;
  readonly signal?: AbortSignal;
  /** Why the cutoff was changed and whether a review budget set it (for the log sheet). */
  readonly record?: RunRecord;
}

export interface RunOutcome {
  readonly summary: RunSummary;
  /** Rows whose existing review mark was kept. */
  readonly marksKept: number;
  /** Sheet columns (0-based) of our result columns, in plan order. */
  readonly resultColumns: readonly string[];
}

function cancelled(): TailmarkError {
  return new TailmarkError('cancelled', 'Cancelled. Nothing was written to the workbook.');
}

/** Raw cells of the data span, column-major, plus the fingerprint of their values. */
export interface SpanData {
  readonly columns: RawCell[][];
  readonly fingerprint: string;
  readonly bytesPerRow: number;
}

export async function readSpan(sync: Syncer, res: Resolved, deps: Pick<RunDeps, 'onProgress' | 'signal'>): Promise<SpanData> {
  const columns: RawCell[][] = Array.from({ length: res.spanCols }, () => new Array<RawCell>(res.rows));
  const fp = new Fingerprint();
  const hint = res.bytesPerCell !== null && res.bytesPerCell > 0 ? res.bytesPerCell * res.spanCols * 1.1 : undefined;
  const out = await readRows(
    sync,
    res.sheet,
    res.headerRow + 1,
    res.rows,
    [{ column: res.spanStart, columnCount: res.spanCols, props: 'typed' }],
    (_s, offset, d) => {
      fp.addRows(d.values);
      const types = d.valueTypes!;
      const formats = d.numberFormat!;
      for (let r = 0; r < d.values.length; r++) {
        const vr = d.values[r];
        const tr = types[r];
        const fr = formats[r];
        for (let c = 0; c < vr.length; c++) columns[c][offset + r] = toRawCell(vr[c], tr[c], fr[c]);
      }
    },
    {
      ...(hint !== undefined ? { bytesPerRowHint: hint } : {}),
      onProgress: (done, total) => deps.onProgress?.({ phase: 'reading', fraction: total ? done / total : 1 }),
      ...(deps.signal ? { signal: deps.signal } : {}),
    },
  );
  return { columns, fingerprint: fp.value, bytesPerRow: out.bytesPerRow };
}

/** Where each plan column goes, and what happens to the old ones. */
interface Placement {
  /** Sheet column per plan column. */
  readonly columns: number[];
  readonly block: BlockColumn[];
  /** Range path: first column of the block. */
  readonly blockColumn: number;
  /** Range path: insert this many entire columns at `insertAt` (0 = none). */
  readonly insertCount: number;
  readonly insertAt: number;
  /** Range path: old extra columns to take away (right to left). */
  readonly dropColumns: { column: number; info: BlockColumn }[];
  /** Table path: names of our table columns to delete / add. */
  readonly dropNames: string[];
  readonly addNames: string[];
  /** Plan columns that are new this run (for widths). */
  readonly fresh: boolean[];
  /** Fresh columns written into empty sheet columns whose widths we must remember (plan index). */
  readonly pristine: number[];
  /** Old status / note columns (sheet column) to read marks from. */
  readonly oldStatus: number | null;
  readonly oldNote: number | null;
  /** Whether anything of ours existed before this run. */
  readonly rerun: boolean;
  /** Last sheet column (exclusive) covered by the highlight rules. */
  readonly endColumn: number;
  readonly startColumn: number;
}

function columnLimit(k: number): TailmarkError {
  return new TailmarkError(
    'column-limit',
    `There is no room for Tailmark's ${k} result columns right of the data: they would pass the sheet's last column (XFD). Move the table further left or delete unused columns on the right, then run again. Nothing was changed.`,
  );
}

function place(res: Resolved, plan: Plan): Placement {
  const headers = plan.columns.map((c) => c.header);
  const k = headers.length;
  const statusHeader = plan.columns.find((c) => c.kind === 'status')!.header;
  const noteHeader = plan.columns.find((c) => c.kind === 'note')!.header;
  if (res.table && res.tableColumns) {
    const names = [...res.tableColumns];
    const oursNow = names.filter(isOurHeader);
    const dropNames = oursNow.filter((n) => !headers.includes(n));
    const addNames = headers.filter((h) => !names.includes(h));
    const tableEnd = res.tableColumn + names.length;
    if (addNames.length > 0 && (tableEnd + addNames.length > MAX_COLUMNS || Math.max(res.usedEnd, tableEnd) + addNames.length > MAX_COLUMNS)) {
      throw columnLimit(k);
    }
    const finalNames = [...names.filter((n) => !dropNames.includes(n)), ...addNames];
    const columns = headers.map((h) => res.tableColumn + finalNames.indexOf(h));
    return {
      columns,
      block: headers.map((header) => ({ header, inserted: false, width: null })),
      blockColumn: Math.min(...columns),
      insertCount: 0,
      insertAt: 0,
      dropColumns: [],
      dropNames,
      addNames,
      fresh: headers.map((h) => addNames.includes(h)),
      pristine: [],
      oldStatus: res.ours.get(statusHeader) ?? null,
      oldNote: res.ours.get(noteHeader) ?? null,
      rerun: oursNow.length > 0,
      startColumn: res.tableColumn,
      endColumn: res.tableColumn + finalNames.length,
    };
  }
  const spanEnd = res.spanStart + res.spanCols;
  const old: string[] = [];
  for (let i = res.spanCols; i < res.headerCells.length; i++) {
    const h = res.headerCells[i];
    if (!isOurHeader(h)) break;
    old.push(h);
  }
  const w = old.length;
  const st = res.state && res.state.sheet === res.sheetName && res.state.blockColumn === spanEnd ? res.state : null;
  const oldInfo = old.map((header): BlockColumn => st?.columns.find((c) => c.header === header) ?? { header, inserted: false, width: null });
  const block: BlockColumn[] = [];
  const fresh: boolean[] = [];
  const pristine: number[] = [];
  let insertCount = 0;
  const insertAt = spanEnd + w;
  if (k > w) {
    const need = k - w;
    const empty = res.usedEnd <= spanEnd + w;
    if (empty) {
      if (spanEnd + k > MAX_COLUMNS) throw columnLimit(k);
    } else {
      if (res.usedEnd + need > MAX_COLUMNS || spanEnd + k > MAX_COLUMNS) throw columnLimit(k);
      insertCount = need;
    }
    for (let i = 0; i < k; i++) {
      if (i < w) {
        block.push({ ...oldInfo[i], header: headers[i] });
        fresh.push(false);
      } else {
        block.push({ header: headers[i], inserted: !empty, width: null });
        fresh.push(true);
        if (empty) pristine.push(i);
      }
    }
  } else {
    for (let i = 0; i < k; i++) {
      block.push({ ...oldInfo[i], header: headers[i] });
      fresh.push(false);
    }
  }
  const dropColumns: { column: number; info: BlockColumn }[] = [];
  for (let i = w - 1; i >= k; i--) dropColumns.push({ column: spanEnd + i, info: oldInfo[i] });
  const oldIdx = (h: string) => {
    const i = old.indexOf(h);
    return i >= 0 ? spanEnd + i : null;
  };
  return {
    columns: headers.map((_, i) => spanEnd + i),
    block,
    blockColumn: spanEnd,
    insertCount,
    insertAt,
    dropColumns,
    dropNames: [],
    addNames: [],
    fresh,
    pristine,
    oldStatus: oldIdx(statusHeader),
    oldNote: oldIdx(noteHeader),
    rerun: w > 0,
    startColumn: res.spanStart,
    endColumn: spanEnd + k,
  };
}

function summarise(result: ScoreResult, plan: Plan, syncs: number): RunSummary {
  const groups: GroupSummary[] = [];
  const multi = result.columns.length > 1;
  for (const col of result.columns) {
    for (const g of col.groups) {
      groups.push({
        label: multi ? `${col.column}: ${g.label}` : g.label,
        n: g.n,
        flagged: g.flagged,
        cutoffUnreachable: g.fallbacks.includes('cutoff-unreachable'),
        fallbacks: g.fallbacks,
      });
    }
  }
  const excluded: { reason: string; count: number }[] = [];
  for (const reason of EXCLUSION_REASONS) {
    let count = 0;
    for (const col of result.columns) count += col.excludedCounts[reason];
    if (count > 0) excluded.push({ reason: EXCLUSION_LABELS[reason], count });
  }
  return {
    rowsScored: plan.log.rowsScored,
    flagged: plan.log.flagged,
    groups,
    excluded,
    notesSheet: plan.notes.name,
    syncs,
  };
}

function textOf(v: unknown): string {
  if (v === null || v === undefined) return '';
  return typeof v === 'string' ? v : String(v);
}

/** Number format for a plan column: its own, or text for anything holding strings. */
function columnFormat(col: PlanColumn): string {
  if (col.numberFormat) return col.numberFormat;
  if (col.kind === 'status' || col.kind === 'note' || col.kind === 'reason' || col.kind === 'flag') return '@';
  return col.values.some((v) => typeof v === 'string') ? '@' : 'General';
}

export async function runScoring(sync: Syncer, table: DetectedTable, chosen: RunSettings, deps: RunDeps): Promise<RunOutcome> {
  const settings = validateSettings(chosen);
  const { signal } = deps;
  if (signal?.aborted) throw cancelled();
  const ctx = sync.context;

  // ---- resolve (the chosen columns are checked before the read) ----
  const res = await resolveTable(sync, table);
  if (res.protected) throw protectedError(res.sheetName);
  if (res.rows < 1) throw new TailmarkError('no-numbers', `The table at ${table.address} has no data rows under its header. Add claims, then run again.`);
  for (const n of settings.valueColumns) columnOf(res, n, 'value');
  for (const n of settings.groupColumns) columnOf(res, n, 'group');
  if (settings.idColumn) columnOf(res, settings.idColumn, 'id');

  // ---- read ----
  if (signal?.aborted) throw cancelled();
  const data = await readSpan(sync, res, deps);
  if (signal?.aborted) throw cancelled();

  // ---- the pipeline: resolve -> parse -> group -> score -> plan ----
  deps.onProgress?.({ phase: 'scoring', fraction: 0 });
  const address = rectAddress(res.sheetName, { row: res.headerRow, column: res.spanStart, rowCount: res.rows + 1, columnCount: res.spanCols });
  const { result, plan: built, columns } = runPipeline(
    {
      source: res.tableName ? `${address} (table ${res.tableName})` : address,
      sheetName: res.sheetName,
      headers: spanHeaders(res),
      columns: data.columns,
      rowCount: res.rows,
      headerRow: res.headerRow + 1,
      firstColumn: res.spanStart,
    },
    settings,
    // The marks sit in our columns outside the data read here: merged below, after the check read them.
    { when: deps.now(), marks: 'host' },
  );
  deps.onProgress?.({ phase: 'scoring', fraction: 1 });
  if (signal?.aborted) throw cancelled();

  const placement = place(res, built);

  // ---- check (one pass: fingerprint, marks, notes/log sheets, our old rules, widths) ----
  const fp = new Fingerprint();
  const oldStatus: string[] = new Array<string>(res.rows).fill('');
  const oldNote: string[] = new Array<string>(res.rows).fill('');
  const markSpans: { column: number; into: string[] }[] = [];
  if (placement.oldStatus !== null) markSpans.push({ column: placement.oldStatus, into: oldStatus });
  if (placement.oldNote !== null) markSpans.push({ column: placement.oldNote, into: oldNote });
  const notesA1 = res.notesSheet.isNullObject ? null : res.notesSheet.getRange('A1');
  const logA1 = res.logSheet.isNullObject ? null : res.logSheet.getRange('A1');
  // The previous run's list of marks (src/report/marks.ts) sits in the first columns of the notes.
  const notesMarks = res.notesSheet.isNullObject ? null : res.notesSheet.getRange('A:C').getUsedRangeOrNullObject(true);
  const logUsed = res.logSheet.isNullObject ? null : res.logSheet.getUsedRangeOrNullObject(true);
  const customRules: Excel.ConditionalFormat[] = res.cfs.items.filter((cf) => cf.type === 'Custom');
  const tableRange = res.table ? res.table.getRange() : null;
  await readRows(
    sync,
    res.sheet,
    res.headerRow + 1,
    res.rows,
    [
      { column: res.spanStart, columnCount: res.spanCols, props: 'values' },
      ...markSpans.map((m) => ({ column: m.column, columnCount: 1, props: 'values' as const })),
    ],
    (si, offset, d) => {
      if (si === 0) fp.addRows(d.values);
      else {
        const into = markSpans[si - 1].into;
        for (let r = 0; r < d.values.length; r++) into[offset + r] = textOf(d.values[r][0]);
      }
    },
    {
      bytesPerRowHint: Math.max(16, data.bytesPerRow / 2.5) + 24 * markSpans.length,
      withFirstSync: () => {
        res.sheet.protection.load('protected');
        notesA1?.load('values');
        notesMarks?.load('values');
        logA1?.load('values');
        logUsed?.load(['rowIndex', 'rowCount']);
        for (const cf of customRules) cf.custom.rule.load('formula');
        tableRange?.load(['rowCount', 'columnCount']);
      },
    },
  );
  if (res.sheet.protection.protected) throw protectedError(res.sheetName);
  if (fp.value !== data.fingerprint || (tableRange && tableRange.rowCount - 1 !== res.rows)) {
    throw new TailmarkError(
      'changed-during-run',
      `The data in ${address} changed while Tailmark was scoring it. Nothing was written; run again when you have finished editing.`,
    );
  }
  if (notesA1 && !isNotesMarker(notesA1.values[0][0])) {
    throw new TailmarkError(
      'name-clash',
      `A sheet named "${NOTES_SHEET_NAME}" already exists and was not made by Tailmark. Rename or move that sheet, then run again. Nothing was changed.`,
    );
  }
  if (logA1 && !isLogMarker(logA1.values[0][0])) {
    throw new TailmarkError(
      'name-clash',
      `A sheet named "${LOG_SHEET_NAME}" already exists and was not made by Tailmark. Rename that sheet, then run again. Nothing was changed.`,
    );
  }
  const ourRules = customRules.filter((cf) => isTailmarkFormula(cf.custom.rule.formula));
  if (signal?.aborted) throw cancelled();

  // ---- review marks: each row keeps its own; the previous run's list fills in when our columns are new ----
  const merged = mergeMarks(
    built,
    placement.oldStatus !== null || placement.oldNote !== null ? { status: oldStatus, note: oldNote } : null,
    columns.id !== null ? claimIds(data.columns[columns.id], res.rows) : null,
    notesMarks && !notesMarks.isNullObject && isNotesMarker(notesA1?.values[0][0]) ? readMarkRecords(notesMarks.values) : [],
  );
  const plan = merged.plan;
  const marksKept = merged.kept + merged.restored;
  const values: (readonly PlanCell[])[] = plan.columns.map((c) => c.values);

  // ---- write ----
  const createdNotes = res.notesSheet.isNullObject;
  const createdLog = res.logSheet.isNullObject;
  const firstDataRow = res.headerRow + 1;
  const newState: LayerState = {
    v: 1,
    sheet: res.sheetName,
    table: res.tableName,
    headerRow: res.headerRow,
    firstColumn: res.spanStart,
    rowCount: res.rows,
    blockColumn: placement.blockColumn,
    columns: placement.block,
    notesSheet: plan.notes.name,
  };
  try {
    await writeAll(sync, res, plan, placement, values, ourRules, firstDataRow, deps);
    await writeNotes(sync, res, plan, createdNotes, createdLog, logUsed, settings, deps.record);
    await sync.reserve(2048);
    ctx.workbook.settings.add(SETTINGS_KEY, JSON.stringify(settings));
    ctx.workbook.settings.add(STATE_KEY, JSON.stringify(newState));
    await sync.flush();
  } catch (e) {
    await compensate(sync, res, placement, plan, createdNotes, createdLog, oldStatus, oldNote, firstDataRow, e);
    throw e;
  }
  deps.onProgress?.({ phase: 'notes', fraction: 1 });
  return {
    summary: summarise(result, plan, sync.syncs),
    marksKept,
    resultColumns: placement.columns.map((c) => columnLetters(c)),
  };
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
  return { v, f, bytes: JSON.stringify(v).length + JSON.stringify(f).length };
}

async function writeAll(
  sync: Syncer,
  res: Resolved,
  plan: Plan,
  placement: Placement,
  values: readonly (readonly PlanCell[])[],
  ourRules: Excel.ConditionalFormat[],
  firstDataRow: number,
  deps: RunDeps,
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
    // Widths only on columns we inserted (deleting them restores the sheet exactly); an empty
    // column we wrote into keeps its width, because an explicit width cannot be un-set.
    if (placement.fresh[i] && placement.block[i].inserted && w) sheet.getRangeByIndexes(0, placement.columns[i], 1, 1).format.columnWidth = Math.round(w * POINTS_PER_CHAR);
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
  const rules = [...plan.rules].sort((a, b) => a.priority - b.priority);
  for (const rule of rules) {
    const formula = ruleFormula(rule, { firstDataRow: firstDataRow + 1, flagColumns, statusColumn: columnLetters(statusCol) });
    await sync.reserve(formula.length + 200);
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
      const b = JSON.stringify(vr).length + JSON.stringify(fr).length + 2;
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

async function writeNotes(
  sync: Syncer,
  res: Resolved,
  plan: Plan,
  createdNotes: boolean,
  createdLog: boolean,
  logUsed: Excel.Range | null,
  settings: RunSettings,
  record: RunRecord | undefined,
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

  // Log: append the run's line, and a cutoff-change line when the cutoff differs from the last run's.
  const log = createdLog ? wb.worksheets.add(LOG_SHEET_NAME) : res.logSheet;
  const next = createdLog || !logUsed || logUsed.isNullObject ? 2 : Math.max(2, logUsed.rowIndex + logUsed.rowCount);
  const previous = res.savedSettings && res.savedSettings.method === settings.method ? res.savedSettings.cutoff : null;
  const lines = runLogLines(plan.log, settings.reviewer, previous, { reason: record?.cutoffReason ?? '', budget: record?.budget ?? null });
  await queueLogLines(sync, log, createdLog, next, lines);
  void PALETTE;
}

/** Undo a write phase that failed part-way (see the module comment). Never hides the original error. */
async function compensate(
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
