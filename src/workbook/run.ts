/**
 * run(): read -> score -> plan -> check -> write, inside one Excel.run.
 *
 * Syncs (5,000 rows x 10 columns, fits one chunk): resolve 1, read 1, check 1, backup of an
 * existing notes/log sheet 1 (re-runs), write 1.
 * Every phase grows with cells only: reads and writes go in row chunks under the payload budget;
 * nothing loops over groups or flagged rows with a sync.
 *
 * Safety:
 *  - read-only workbook -> 'read-only'; protected sheet, or protected workbook structure when the
 *    notes or log sheet must be added -> 'protected'; all before any write (the sheet's protection
 *    again at check);
 *  - the data is re-read (values) in the check sync and compared by fingerprint -> 'changed-during-run';
 *  - notes/log sheet names taken by the user's own sheets -> 'name-clash'; no room right of the
 *    data -> 'column-limit'; all before any write;
 *  - cancellation is honoured between phases up to the write phase; a cancelled or refused run
 *    leaves the workbook as it was;
 *  - before the first write, what the write may change is read back (backup.ts); if a write sync
 *    fails part-way, undo.ts restores it, so a failed run or re-run leaves the workbook as it was.
 *
 * Where the parts live: placement of our columns in place.ts, the writes (values, dropdown, rules,
 * notes, log) in write-results.ts, undoing a failed write in undo.ts; the run itself (resolve ->
 * read -> pipeline -> check -> marks -> write) here. Review marks merge in src/report/marks.ts.
 */
import { claimIds, runPipelineYielding, validateSettings, type AsyncPipeline } from '../pipeline/index.js';
import {
  EXCLUSION_LABELS,
  EXCLUSION_REASONS,
  type RawCell,
  type ScoreResult,
} from '../scoring/types.js';
import {
  isTailmarkFormula,
  mergeMarks,
  readMarkRecords,
  NOTES_SHEET_NAME,
  type Plan,
  type PlanCell,
} from '../report/index.js';
import { TailmarkError, type DetectedTable, type GroupSummary, type RunProgress, type RunRecord, type RunSettings, type RunSummary } from './api.js';
import { MAX_CELL_TEXT, columnLetters, rectAddress } from './a1.js';
import { toRawCell } from './cells.js';
import { Fingerprint } from './fingerprint.js';
import {
  LOG_SHEET_NAME,
  isLogMarker,
  isNotesMarker,
} from './notes.js';
import { readRows } from './read.js';
import { columnOf, protectedError, readOnlyError, resolveTable, spanHeaders, structureError, type Resolved } from './resolve.js';
import { SETTINGS_KEY, STATE_KEY, type LayerState } from './state.js';
import { place } from './place.js';
import { MERGED_AREAS_SET, MergedKeys } from './merged.js';
import { logLinesFor, writeAll, writeNotes } from './write-results.js';
import { queueSmallBackup, readSheetBackups, type Backup, type SavedCells } from './backup.js';
import { undoWrites } from './undo.js';
import type { Syncer } from './sync.js';

export interface RunDeps {
  readonly now: () => Date;
  readonly onProgress?: (p: RunProgress) => void;
  readonly signal?: AbortSignal;
  /** Why the cutoff was changed and whether a review budget set it (for the log sheet). */
  readonly record?: RunRecord;
  /** How the pipeline runs (the pane passes a worker-backed one; default: same thread, yielding between steps). */
  readonly pipeline?: AsyncPipeline;
  /** Requirement-set check (feature-detected members such as getMergedAreasOrNullObject); default: none. */
  readonly supports?: (name: string, version: string) => boolean;
}

export interface RunOutcome {
  readonly summary: RunSummary;
  /** Rows whose existing review mark was kept. */
  readonly marksKept: number;
  /** Sheet columns (0-based) of our result columns, in plan order. */
  readonly resultColumns: readonly string[];
}

/** Refusal when inserting whole columns for our block would widen another table on the sheet. */
function obstacleError(count: number, at: number, tables: readonly string[]): TailmarkError {
  return new TailmarkError(
    'column-limit',
    `Tailmark's ${count} result columns need ${count} whole sheet columns inserted at column ${columnLetters(at)} (the cells right of your data are in use), which would widen the table ${tables.map((t) => `"${t}"`).join(', ')} elsewhere on this sheet. Leave ${count} empty columns right of your data, or move that table, then run again. Nothing was changed.`,
  );
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

export async function readSpan(
  sync: Syncer,
  res: Resolved,
  deps: Pick<RunDeps, 'onProgress' | 'signal'>,
  withEachSync?: (rowOffset: number, rows: number) => () => void,
): Promise<SpanData> {
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
      ...(withEachSync ? { withEachSync } : {}),
    },
  );
  return { columns, fingerprint: fp.value, bytesPerRow: out.bytesPerRow };
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

/** Runs of adjacent columns: [3, 4, 5, 9] -> 3 (3 columns), 9 (1). */
function contiguous(columns: readonly number[]): { column: number; count: number }[] {
  const out: { column: number; count: number }[] = [];
  for (const c of columns) {
    const last = out[out.length - 1];
    if (last && last.column + last.count === c) last.count++;
    else out.push({ column: c, count: 1 });
  }
  return out;
}

function textOf(v: unknown): string {
  if (v === null || v === undefined) return '';
  return typeof v === 'string' ? v : String(v);
}

export async function runScoring(sync: Syncer, table: DetectedTable, chosen: RunSettings, deps: RunDeps): Promise<RunOutcome> {
  const settings = validateSettings(chosen);
  const reason = deps.record?.cutoffReason ?? '';
  if (reason.length > MAX_CELL_TEXT) {
    throw new TailmarkError(
      'too-large',
      `The reason for the cutoff is ${reason.length.toLocaleString('en')} characters long; an Excel cell holds at most ${MAX_CELL_TEXT.toLocaleString('en')}. Shorten it, then run again. Nothing was changed.`,
    );
  }
  const { signal } = deps;
  if (signal?.aborted) throw cancelled();
  const ctx = sync.context;

  // ---- resolve (the chosen columns are checked before the read) ----
  const res = await resolveTable(sync, table);
  // Checked before anything is written: read-only, sheet protection, and structure protection
  // when a sheet must be added.
  if (res.readOnly) throw readOnlyError();
  if (res.protected) throw protectedError(res.sheetName);
  const toAdd = [res.notesSheet.isNullObject ? NOTES_SHEET_NAME : null, res.logSheet.isNullObject ? LOG_SHEET_NAME : null].filter((n): n is string => n !== null);
  if (res.structureProtected && toAdd.length > 0) throw structureError(toAdd);
  if (res.rows < 1) throw new TailmarkError('no-numbers', `The table at ${table.address} has no data rows under its header. Add claims, then run again.`);
  for (const n of settings.valueColumns) columnOf(res, n, 'value');
  for (const n of settings.groupColumns) columnOf(res, n, 'group');
  if (settings.idColumn) columnOf(res, settings.idColumn, 'id');

  // ---- read ----
  if (signal?.aborted) throw cancelled();
  // Merged cells in the key columns take the area's value (asked with the read, where Excel can tell).
  const keys = settings.groupColumns.map((n) => columnOf(res, n, 'group')).map((column) => ({ index: column - res.spanStart, column }));
  const mergedKeys = new MergedKeys(res.sheet, res.headerRow + 1, res.rows, keys, deps.supports?.(MERGED_AREAS_SET.name, MERGED_AREAS_SET.version) ?? false);
  const data = await readSpan(sync, res, deps, mergedKeys.queue);
  if (signal?.aborted) throw cancelled();
  const headers = spanHeaders(res);
  const inputNotes = mergedKeys.fill(headers, data.columns);

  // ---- the pipeline: resolve -> parse -> group -> score -> plan ----
  deps.onProgress?.({ phase: 'scoring', fraction: 0 });
  const address = rectAddress(res.sheetName, { row: res.headerRow, column: res.spanStart, rowCount: res.rows + 1, columnCount: res.spanCols });
  const pipeline = deps.pipeline ?? runPipelineYielding;
  const { result, plan: built, columns } = await pipeline(
    {
      // Said in words, as the batch command says it ("sheet Claims, A1:E81"): an address such as
      // 'Expense claims'!A1:C41 written into a cell would begin with Excel's text-prefix apostrophe.
      source: `sheet ${res.sheetName}, ${address.slice(address.lastIndexOf('!') + 1)}${res.tableName ? ` (table ${res.tableName})` : ''}`,
      sheetName: res.sheetName,
      headers,
      columns: data.columns,
      rowCount: res.rows,
      headerRow: res.headerRow + 1,
      firstColumn: res.spanStart,
    },
    settings,
    // The marks sit in our columns outside the data read here: merged below, after the check read them.
    {
      when: deps.now(),
      marks: 'host',
      ...(inputNotes.length > 0 ? { inputNotes } : {}),
      onProgress: (phase, fraction) => deps.onProgress?.({ phase: 'scoring', fraction: phase === 'sending' ? fraction * 0.2 : phase === 'scoring' ? 0.2 + fraction * 0.5 : 0.7 + fraction * 0.3 }),
      ...(signal ? { signal } : {}),
    },
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
  // Our existing result columns, read back to write them back if the write fails (backup.ts).
  const savedCells: SavedCells[] = [];
  const backupSpans = contiguous(placement.oldColumns);
  const firstSpan = 1 + markSpans.length;
  const notesA1 = res.notesSheet.isNullObject ? null : res.notesSheet.getRange('A1');
  const logA1 = res.logSheet.isNullObject ? null : res.logSheet.getRange('A1');
  // The previous run's list of marks (src/report/marks.ts) sits in the first columns of the notes.
  const notesMarks = res.notesSheet.isNullObject ? null : res.notesSheet.getRange('A:C').getUsedRangeOrNullObject(true);
  const logUsed = res.logSheet.isNullObject ? null : res.logSheet.getUsedRangeOrNullObject(true);
  const customRules: Excel.ConditionalFormat[] = res.cfs.items.filter((cf) => cf.type === 'Custom');
  const tableRange = res.table ? res.table.getRange() : null;
  let notesUsed: Excel.Range | null = null;
  // Whole sheet columns inserted for our block must not widen another table on the sheet: a
  // table found both in the column left of the insertion point and in the one right of it spans it.
  const across: { left?: Excel.TableScopedCollection; right?: Excel.TableScopedCollection } = {};
  let small: ReturnType<typeof queueSmallBackup> | null = null;
  // Widths of the empty columns we will write into, kept so removal (or a failed write) puts them back.
  const emptyWidths = placement.pristine.map((i) => res.sheet.getRangeByIndexes(0, placement.columns[i], 1, 1));
  await readRows(
    sync,
    res.sheet,
    res.headerRow + 1,
    res.rows,
    [
      { column: res.spanStart, columnCount: res.spanCols, props: 'values' },
      ...markSpans.map((m) => ({ column: m.column, columnCount: 1, props: 'values' as const })),
      ...backupSpans.map((b) => ({ column: b.column, columnCount: b.count, props: 'cells' as const })),
    ],
    (si, offset, d) => {
      if (si === 0) fp.addRows(d.values);
      else if (si >= firstSpan) {
        savedCells.push({ row: res.headerRow + 1 + offset, column: backupSpans[si - firstSpan].column, formulas: d.values, numberFormat: d.numberFormat!, props: null });
      } else {
        const into = markSpans[si - 1].into;
        for (let r = 0; r < d.values.length; r++) into[offset + r] = textOf(d.values[r][0]);
      }
    },
    {
      bytesPerRowHint: Math.max(16, data.bytesPerRow / 2.5) + 24 * markSpans.length + 40 * placement.oldColumns.length,
      withFirstSync: () => {
        notesUsed = res.notesSheet.isNullObject ? null : res.notesSheet.getUsedRangeOrNullObject(false);
        notesUsed?.load(['rowIndex', 'rowCount', 'columnIndex', 'columnCount']);
        small = queueSmallBackup(sync, res, placement, customRules);
        if (placement.insertCount > 0 && placement.insertAt > 0) {
          const at = (c: number) => res.sheet.getRangeByIndexes(0, c, 1, 1).getEntireColumn().getTables(false);
          across.left = at(placement.insertAt - 1).load('items/name');
          across.right = at(placement.insertAt).load('items/name');
        }
        res.sheet.protection.load('protected');
        notesA1?.load('values');
        notesMarks?.load('values');
        logA1?.load('values');
        logUsed?.load(['rowIndex', 'rowCount']);
        for (const cf of customRules) cf.custom.rule.load('formula');
        tableRange?.load(['rowCount', 'columnCount']);
        for (const r of emptyWidths) r.load('format/columnWidth');
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
  if (across.left && across.right) {
    const right = new Set(across.right.items.map((t) => t.name));
    const widened = across.left.items.map((t) => t.name).filter((n) => right.has(n));
    if (widened.length > 0) throw obstacleError(placement.insertCount, placement.insertAt, widened);
  }
  placement.pristine.forEach((i, j) => (placement.block[i] = { ...placement.block[i], width: emptyWidths[j].format.columnWidth }));
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

  // ---- backup: what the write may change, read before it (backup.ts) ----
  const createdNotes = res.notesSheet.isNullObject;
  const createdLog = res.logSheet.isNullObject;
  const firstDataRow = res.headerRow + 1;
  const logNext = createdLog || !logUsed || logUsed.isNullObject ? 2 : Math.max(2, logUsed.rowIndex + logUsed.rowCount);
  const logLines = logLinesFor(res, plan, settings, deps.record);
  const lastRows = !res.table && res.state && res.state.sheet === res.sheetName ? res.state.rowCount : 0;
  if (lastRows > res.rows && backupSpans.length > 0) {
    // The data shrank: our cells below it are cleared by the write, so read them too.
    await readRows(sync, res.sheet, firstDataRow + res.rows, lastRows - res.rows, backupSpans.map((b) => ({ column: b.column, columnCount: b.count, props: 'cells' as const })), (si, offset, d) => {
      savedCells.push({ row: firstDataRow + res.rows + offset, column: backupSpans[si].column, formulas: d.values, numberFormat: d.numberFormat!, props: null });
    });
  }
  const backup: Backup = {
    cells: savedCells,
    ...small!(),
    ...(await readSheetBackups(sync, res, createdNotes ? null : notesUsed, createdLog ? null : { next: logNext, lines: logLines.length })),
  };

  // ---- write ----
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
    await writeNotes(sync, res, plan, createdNotes, createdLog, logNext, logLines);
    await sync.reserve(2048);
    ctx.workbook.settings.add(SETTINGS_KEY, JSON.stringify(settings));
    ctx.workbook.settings.add(STATE_KEY, JSON.stringify(newState));
    await sync.flush();
  } catch (e) {
    await undoWrites(sync, { res, placement, plan, createdNotes, createdLog, backup }, e);
    throw e;
  }
  deps.onProgress?.({ phase: 'notes', fraction: 1 });
  return {
    summary: summarise(result, plan, sync.syncs),
    marksKept,
    resultColumns: placement.columns.map((c) => columnLetters(c)),
  };
}
