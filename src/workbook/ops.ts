/**
 * The other pane actions: remove, mark, listExceptions, selectRow, readForPreview, loadSettings.
 * Each is one Excel.run with a small, fixed number of syncs plus row chunks where it reads data.
 */
import { validateSettings } from '../pipeline/settings.js';
import type { RawCell } from '../scoring/types.js';
import { NOTE_HEADER, NOTES_SHEET_NAME, REVIEW_STATUSES, STATUS_HEADER, isTailmarkFormula, markLine, type PlanCell } from '../report/index.js';
import { TailmarkError, type ClaimRecord, type DetectedTable, type Exception, type PreviewData, type ReviewPrefs, type RunSettings } from './api.js';
import { toRawCell } from './cells.js';
import { MAX_CELL_TEXT } from './a1.js';
import { appendLog } from './log.js';
import { LOG_SHEET_NAME, isLogMarker, isNotesMarker } from './notes.js';
import { claimColumns, claimFrom, exceptionColumns, exceptionOf, headerColumns } from './exceptions.js';
import { MERGED_AREAS_SET, MergedKeys } from './merged.js';
import { readRows } from './read.js';
import { columnOf, protectedError, readOnlyError, resolveTable } from './resolve.js';
import { SETTINGS_KEY, STATE_KEY, parseSettings, parseState, type LayerState } from './state.js';
import { utf8Bytes, type Syncer } from './sync.js';

function noResults(): TailmarkError {
  return new TailmarkError('no-results', 'This workbook has no Tailmark results yet. Select your claims table and run a review first.');
}

interface Located {
  readonly state: LayerState;
  readonly settings: RunSettings | null;
  readonly sheet: Excel.Worksheet;
  readonly table: Excel.Table | null;
  /** 0-based sheet row of the first data row. */
  readonly firstDataRow: number;
  readonly rows: number;
  /** Sheet column of each of our headers. */
  readonly columns: ReadonlyMap<string, number>;
  /** Sheet column of each user header (header row from firstColumn to the end of our block). */
  readonly userColumns: ReadonlyMap<string, number>;
  readonly protected: boolean;
  /** The workbook is open read-only. */
  readonly readOnly: boolean;
}

/**
 * Load our state and find our columns as they are now: by table column name for tables, by the
 * header cells at the remembered place otherwise. 2 syncs.
 */
export async function locate(sync: Syncer, opts: { allowMissing?: boolean } = {}): Promise<Located | null> {
  const wb = sync.context.workbook;
  const st = wb.settings.getItemOrNullObject(STATE_KEY);
  st.load('value');
  const se = wb.settings.getItemOrNullObject(SETTINGS_KEY);
  se.load('value');
  wb.load('readOnly');
  await sync.sync();
  const state = parseState(st.isNullObject ? null : st.value);
  if (!state) {
    if (opts.allowMissing) return null;
    throw noResults();
  }
  const settings = parseSettings(se.isNullObject ? null : se.value);
  const sheet = wb.worksheets.getItemOrNullObject(state.sheet);
  sheet.load('name');
  sheet.protection.load('protected');
  let table: Excel.Table | null = null;
  let tableRange: Excel.Range | null = null;
  let tableCols: Excel.TableColumnCollection | null = null;
  if (state.table) {
    table = wb.tables.getItemOrNullObject(state.table);
    table.load('name');
  }
  await sync.sync();
  if (sheet.isNullObject) {
    if (opts.allowMissing) return null;
    throw new TailmarkError('no-results', `The sheet "${state.sheet}" with Tailmark's results no longer exists.`);
  }
  if (table && table.isNullObject) table = null;
  const lastCol = state.blockColumn + state.columns.length;
  let header: Excel.Range | null = null;
  if (table) {
    tableRange = table.getRange();
    tableRange.load(['rowIndex', 'columnIndex', 'rowCount', 'columnCount']);
    tableCols = table.columns;
    tableCols.load('items/name');
  } else {
    header = sheet.getRangeByIndexes(state.headerRow, state.firstColumn, 1, Math.max(1, lastCol - state.firstColumn));
    header.load('values');
  }
  await sync.sync();
  let columns: ReadonlyMap<string, number> = new Map<string, number>();
  let userColumns: ReadonlyMap<string, number> = new Map<string, number>();
  let firstDataRow = state.headerRow + 1;
  let rows = state.rowCount;
  if (table && tableRange && tableCols) {
    const ourHeaders = new Set(state.columns.map((c) => c.header));
    const ours = new Map<string, number>();
    const user = new Map<string, number>();
    firstDataRow = tableRange.rowIndex + 1;
    rows = tableRange.rowCount - 1;
    tableCols.items.forEach((c, i) => (ourHeaders.has(c.name) ? ours : user).set(c.name, tableRange.columnIndex + i));
    columns = ours;
    userColumns = user;
  } else if (header) {
    ({ columns, userColumns } = headerColumns(state, header.values[0] as unknown[]));
  }
  return { state, settings, sheet, table, firstDataRow, rows, columns, userColumns, protected: sheet.protection.protected, readOnly: wb.readOnly };
}

/** Headers of the columns that hold the reviewer's marks (kept as plain cells on request). */
const MARK_HEADERS: ReadonlySet<string> = new Set([STATUS_HEADER, NOTE_HEADER]);

/**
 * remove(): delete exactly what we added. With `keepMarks` the status and note columns stay where
 * they are as plain cells (their dropdown and our highlighting go); a later run finds them by
 * their headers and carries the marks on.
 */
export async function removeResults(sync: Syncer, includeNotes: boolean, keepMarks = false): Promise<void> {
  const loc = await locate(sync, { allowMissing: true });
  const wb = sync.context.workbook;
  const notes = wb.worksheets.getItemOrNullObject(NOTES_SHEET_NAME);
  notes.load('name');
  const log = wb.worksheets.getItemOrNullObject(LOG_SHEET_NAME);
  log.load('name');
  let cfs: Excel.ConditionalFormatCollection | null = null;
  if (loc) {
    if (loc.readOnly) throw readOnlyError();
    if (loc.protected) throw protectedError(loc.state.sheet);
    const start = Math.min(loc.state.firstColumn, ...loc.columns.values());
    const end = Math.max(loc.state.blockColumn + loc.state.columns.length, ...[...loc.columns.values()].map((c) => c + 1));
    cfs = loc.sheet.getRangeByIndexes(loc.state.headerRow, start, Math.max(loc.rows, loc.state.rowCount) + 1, Math.max(1, end - start)).conditionalFormats;
    cfs.load('items/type');
  }
  await sync.sync();
  const notesA1 = notes.isNullObject ? null : notes.getRange('A1');
  notesA1?.load('values');
  const logA1 = log.isNullObject ? null : log.getRange('A1');
  logA1?.load('values');
  const custom = cfs ? cfs.items.filter((cf) => cf.type === 'Custom') : [];
  for (const cf of custom) cf.custom.rule.load('formula');
  await sync.sync();
  if (!loc && !(includeNotes && (notesA1 || logA1))) throw noResults();
  if (!loc) {
    wb.load('readOnly');
    await sync.sync();
    if (wb.readOnly) throw readOnlyError();
  }

  if (loc) {
    for (const cf of custom) if (isTailmarkFormula(cf.custom.rule.formula)) cf.delete();
    const goes = (header: string) => !(keepMarks && MARK_HEADERS.has(header));
    if (loc.table) {
      for (const c of loc.state.columns) if (loc.columns.has(c.header) && goes(c.header)) loc.table.columns.getItem(c.header).delete();
      if (keepMarks) {
        const sc = loc.columns.get(STATUS_HEADER);
        if (sc !== undefined) loc.sheet.getRangeByIndexes(loc.firstDataRow, sc, Math.max(1, loc.rows), 1).dataValidation.clear();
      }
    } else {
      const rows = Math.max(loc.rows, loc.state.rowCount) + 1;
      // Right to left so the columns to delete keep their places.
      const ours = loc.state.columns
        .map((c) => ({ c, col: loc.columns.get(c.header) }))
        .filter((x): x is { c: (typeof loc.state.columns)[number]; col: number } => x.col !== undefined)
        .sort((a, b) => b.col - a.col);
      for (const { c, col } of ours) {
        if (!goes(c.header)) {
          if (c.header === STATUS_HEADER) loc.sheet.getRangeByIndexes(loc.firstDataRow, col, Math.max(1, loc.rows), 1).dataValidation.clear();
          continue;
        }
        // Kept mark columns must end up next to the data, where a later run looks for them: the
        // columns that go are taken out whole (they were inserted by us, or empty when we wrote
        // into them), so the kept ones move left with every row.
        if (c.inserted || keepMarks) loc.sheet.getRangeByIndexes(0, col, 1, 1).getEntireColumn().delete('Left');
        else {
          const r = loc.sheet.getRangeByIndexes(loc.state.headerRow, col, rows, 1);
          r.dataValidation.clear();
          r.clear('All');
          if (c.width !== null) r.format.columnWidth = c.width;
        }
      }
    }
    wb.settings.getItem(STATE_KEY).delete();
    const se = wb.settings.getItemOrNullObject(SETTINGS_KEY);
    se.load('value');
    await sync.sync();
    if (!se.isNullObject) se.delete();
  }
  if (includeNotes) {
    // Our sheets are cleared, not deleted (deleting a sheet wipes the user's undo history); each
    // keeps its marker in A1, so either host still knows it as ours and reuses it.
    for (const [sheet, a1, ours] of [[notes, notesA1, isNotesMarker], [log, logA1, isLogMarker]] as const) {
      if (!a1 || !ours(a1.values[0][0])) continue;
      sheet.getRange().clear('All');
      const title = sheet.getRange('A1');
      title.numberFormat = [['@']];
      title.values = [[a1.values[0][0] as string]];
      title.format.font.bold = true;
    }
  }
  await sync.sync();
}

/** Status text for a requested label or id; throws on an unknown one. */
function statusText(status: string): string {
  if (status === '') return '';
  const s = REVIEW_STATUSES.find((x) => x.label === status || x.id === status || x.label.toLowerCase() === status.toLowerCase());
  if (!s) {
    throw new TailmarkError('bad-settings', `"${status}" is not a review status; use one of: ${REVIEW_STATUSES.map((x) => x.label).join(', ')}.`);
  }
  return s.label;
}

/**
 * Set the status and/or note of data rows, and add one line per changed claim to the log sheet:
 * who (the name the reviewer typed once, kept in the workbook's settings; never a guessed
 * identity), when, the claim, the status before and after, and the note. Syncs: locate 2-3, the
 * marks before 1, the log sheet 1-2, writes 1 (more only when the marks pass the payload budget).
 */
export async function markRows(sync: Syncer, rows: readonly number[], status: string | null, note: string | null, now: Date = new Date()): Promise<void> {
  const label = status === null ? null : statusText(status);
  if (note !== null && note.length > MAX_CELL_TEXT) {
    throw new TailmarkError(
      'too-large',
      `The note is ${note.length.toLocaleString('en')} characters long; an Excel cell holds at most ${MAX_CELL_TEXT.toLocaleString('en')}. Shorten it, then save again. Nothing was changed.`,
    );
  }
  const loc = await locate(sync);
  if (!loc) throw noResults();
  if (loc.readOnly) throw readOnlyError();
  if (loc.protected) throw protectedError(loc.state.sheet);
  const sc = loc.columns.get(STATUS_HEADER);
  const nc = loc.columns.get(NOTE_HEADER);
  if (sc === undefined || nc === undefined) {
    throw new TailmarkError('no-results', "Tailmark's status and note columns were not found where they were written. Run the review again.");
  }
  for (const r of rows) {
    if (!Number.isInteger(r) || r < 0 || r >= loc.rows) {
      throw new TailmarkError('bad-settings', `Row ${r} is outside the data (0..${loc.rows - 1}).`);
    }
  }
  const sorted = [...new Set(rows)].sort((a, b) => a - b);
  const target = sync.budget.target;
  // Contiguous runs of rows become one range each.
  const runs: { start: number; n: number }[] = [];
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1] === sorted[j] + 1) j++;
    runs.push({ start: sorted[i], n: j - i + 1 });
    i = j + 1;
  }
  // What the claims hold now (for the log's "before"), their claim IDs and the reviewer's name.
  const idCol = loc.settings?.idColumn ? loc.userColumns.get(loc.settings.idColumn) : undefined;
  const before = runs.map((run) => {
    const st = loc.sheet.getRangeByIndexes(loc.firstDataRow + run.start, sc, run.n, 1);
    const nt = loc.sheet.getRangeByIndexes(loc.firstDataRow + run.start, nc, run.n, 1);
    const id = idCol === undefined ? null : loc.sheet.getRangeByIndexes(loc.firstDataRow + run.start, idCol, run.n, 1);
    st.load('values');
    nt.load('values');
    id?.load('values');
    return { st, nt, id };
  });
  await sync.sync();
  const who = loc.settings?.reviewer ?? null;
  const text = (v: unknown) => (v === null || v === undefined ? '' : String(v).trim());
  const lines: PlanCell[][] = [];
  runs.forEach((run, k) => {
    const b = before[k];
    for (let i = 0; i < run.n; i++) {
      const oldStatus = text(b.st.values[i][0]);
      const oldNote = text(b.nt.values[i][0]);
      const newStatus = label ?? oldStatus;
      const newNote = note ?? oldNote;
      if (newStatus === oldStatus && newNote === oldNote) continue;
      const id = b.id ? text(b.id.values[i][0]) : '';
      const claim = id !== '' ? id : `sheet row ${loc.firstDataRow + run.start + i + 1}`;
      lines.push(markLine(now.toISOString(), who, claim, oldStatus, newStatus, newNote === oldNote ? null : newNote));
    }
  });
  await appendLog(sync, lines);
  for (const run of runs) {
    const n = run.n;
    const bytes = n * (utf8Bytes(label ?? '') + utf8Bytes(note ?? '') + 16);
    if (bytes > target) throw new TailmarkError('too-large', 'Too many rows or too long a note to mark at once; mark fewer rows.');
    await sync.reserve(bytes);
    if (label !== null) {
      const r = loc.sheet.getRangeByIndexes(loc.firstDataRow + run.start, sc, n, 1);
      r.numberFormat = Array.from({ length: n }, () => ['@']);
      r.values = Array.from({ length: n }, () => [label]);
    }
    if (note !== null) {
      const r = loc.sheet.getRangeByIndexes(loc.firstDataRow + run.start, nc, n, 1);
      r.numberFormat = Array.from({ length: n }, () => ['@']);
      r.values = Array.from({ length: n }, () => [note]);
    }
  }
  await sync.flush();
}

export async function selectDataRow(sync: Syncer, row: number): Promise<void> {
  const loc = await locate(sync);
  if (!loc) throw noResults();
  if (!Number.isInteger(row) || row < 0 || row >= loc.rows) {
    throw new TailmarkError('bad-settings', `Row ${row} is outside the data (0..${loc.rows - 1}).`);
  }
  const cols = [...loc.columns.values(), ...loc.userColumns.values(), loc.state.firstColumn];
  const start = Math.min(...cols);
  const end = Math.max(...cols) + 1;
  loc.sheet.activate();
  loc.sheet.getRangeByIndexes(loc.firstDataRow + row, start, 1, end - start).select();
  await sync.sync();
}

export async function listExceptionRows(sync: Syncer): Promise<readonly Exception[]> {
  const loc = await locate(sync, { allowMissing: true });
  if (!loc) return [];
  const wanted = exceptionColumns(loc.settings, loc);
  const got = new Map<string, unknown[]>();
  for (const w of wanted) got.set(w.key, new Array<unknown>(loc.rows));
  await readRows(
    sync,
    loc.sheet,
    loc.firstDataRow,
    loc.rows,
    wanted.map((w) => ({ column: w.column, columnCount: 1, props: 'values' as const })),
    (si, offset, d) => {
      const into = got.get(wanted[si].key)!;
      for (let r = 0; r < d.values.length; r++) into[offset + r] = d.values[r][0];
    },
  );
  const out: Exception[] = [];
  for (let r = 0; r < loc.rows; r++) {
    const e = exceptionOf(r, (k) => got.get(k)?.[r], got.has('id'), loc.settings);
    if (e) out.push(e);
  }
  return out;
}

export async function previewColumns(sync: Syncer, table: DetectedTable, settings: RunSettings, supports: (name: string, version: string) => boolean = () => false): Promise<PreviewData> {
  const res = await resolveTable(sync, table);
  const want = [
    ...settings.valueColumns.map((name) => ({ name, kind: 'value' as const, column: columnOf(res, name, 'value') })),
    ...settings.groupColumns.map((name) => ({ name, kind: 'group' as const, column: columnOf(res, name, 'group') })),
  ];
  const cells: RawCell[][] = want.map(() => new Array<RawCell>(res.rows));
  const keys = want.flatMap((w, i) => (w.kind === 'group' ? [{ index: i, column: w.column }] : []));
  const merged = new MergedKeys(res.sheet, res.headerRow + 1, res.rows, keys, supports(MERGED_AREAS_SET.name, MERGED_AREAS_SET.version));
  await readRows(
    sync,
    res.sheet,
    res.headerRow + 1,
    res.rows,
    want.map((w) => ({ column: w.column, columnCount: 1, props: 'typed' as const })),
    (si, offset, d) => {
      const into = cells[si];
      for (let r = 0; r < d.values.length; r++) into[offset + r] = toRawCell(d.values[r][0], d.valueTypes![r][0], d.numberFormat![r][0]);
    },
    { ...(res.bytesPerCell ? { bytesPerRowHint: res.bytesPerCell * want.length * 1.2 } : {}), withEachSync: merged.queue },
  );
  // Merged cells in the key columns, as a run reads them (its notes line is the run's to write).
  merged.fill(want.map((w) => w.name), cells);
  return {
    valueColumns: want.flatMap((w, i) => (w.kind === 'value' ? [{ name: w.name, cells: cells[i] }] : [])),
    groupColumns: want.flatMap((w, i) => (w.kind === 'group' ? [{ name: w.name, cells: cells[i] }] : [])),
  };
}

/**
 * One claim row as the sheet displays it: the reviewer's columns (left of our block, or the
 * table's own columns) and our "why" cells. 3 syncs (locate 2-3, the row 1).
 */
export async function readClaimRow(sync: Syncer, row: number): Promise<ClaimRecord> {
  const loc = await locate(sync);
  if (!loc) throw noResults();
  if (!Number.isInteger(row) || row < 0 || row >= loc.rows) {
    throw new TailmarkError('bad-settings', `Row ${row} is outside the data (0..${loc.rows - 1}).`);
  }
  const shown = claimColumns(loc.settings, loc);
  if (shown.cols.length === 0) return { row, fields: [], reasons: [] };
  const start = Math.min(...shown.cols);
  const end = Math.max(...shown.cols) + 1;
  await sync.reserve(256);
  const r = loc.sheet.getRangeByIndexes(loc.firstDataRow + row, start, 1, end - start);
  r.load('text');
  await sync.sync();
  const line = r.text[0] ?? [];
  return claimFrom(row, shown, (c) => String(line[c - start] ?? ''));
}

/** The reviewer's name and follow-up columns, as saved with the run settings. */
export async function loadReviewPrefs(sync: Syncer): Promise<ReviewPrefs> {
  const saved = await loadRunSettings(sync);
  return { reviewer: saved?.reviewer ?? null, detailColumns: saved?.detailColumns ?? null };
}

/**
 * Keep the reviewer's name and follow-up columns with the saved run settings (no run needed), so
 * the next status change and the next run record them. Needs a workbook with a saved run.
 */
export async function saveReviewPrefs(sync: Syncer, prefs: ReviewPrefs): Promise<void> {
  const wb = sync.context.workbook;
  wb.load('readOnly');
  const saved = await loadRunSettings(sync);
  if (!saved) throw noResults();
  if (wb.readOnly) throw readOnlyError();
  const next = validateSettings({ ...saved, reviewer: prefs.reviewer === null ? null : prefs.reviewer.trim() || null, detailColumns: prefs.detailColumns });
  await sync.reserve(2048);
  sync.context.workbook.settings.add(SETTINGS_KEY, JSON.stringify(next));
  await sync.flush();
}

export async function loadRunSettings(sync: Syncer): Promise<RunSettings | null> {
  const se = sync.context.workbook.settings.getItemOrNullObject(SETTINGS_KEY);
  se.load('value');
  await sync.sync();
  return parseSettings(se.isNullObject ? null : se.value);
}
