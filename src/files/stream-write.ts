/**
 * Write a scored workbook row by row (Node), for inputs too large to hold in memory. An .xlsx input
 * is not parsed again: its sheets are replayed from the spool the row-by-row reader filled
 * (src/files/xlsx-spool.ts); a CSV input is read again (its tokenizer is cheap). Each row is written
 * through ExcelJS's streaming WorkbookWriter as soon as it is complete (its cells, then our result
 * cells), so memory stays at one row plus the plan. Same result as `writeScoredWorkbook`: the input
 * sheet's values, formulas, number formats and cell styles, our result columns right of the data,
 * our conditional-format rules and status dropdown, the other sheets, the notes sheet, and the log
 * sheet with this run's lines added below the earlier ones. The input file is never written.
 *
 * Carried over from an .xlsx input: values (numbers as stored), formulas (shared formulas written
 * out per cell), cell styles as the streaming reader gives them (number format, font, fill, border,
 * alignment, protection), column widths / styles / hidden columns, row heights / styles / hidden
 * rows, frozen panes, merged cells, the user's conditional formats (main part) and data validations,
 * autofilter range, tab colour, page setup and margins, print headers/footers. NOT carried over
 * (each one found is listed in the notes sheet and in the command's output): hyperlink targets,
 * comments, pictures/charts/shapes, table objects, extension-list rules, sheet protection, print
 * options, page breaks, background pictures, named ranges; inline rich text becomes plain text.
 *
 * Strings are written as inline text cells (no shared-string table, so memory does not grow with the
 * number of distinct strings); a value beginning with = + - @ stays text and never becomes a formula.
 *
 * Parts: `writeScoredWorkbookStreaming` (set up, then copy, notes, log, save), `copyCsv` and
 * `copyWorkbook` (the input's sheets), `copyTarget` / `copyLog` / `copySheet` (one sheet each),
 * `writeNotes` and `writeNewLog` (our sheets), and the row and sheet helpers below.
 */
import { rename, rm } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import ExcelJS from 'exceljs';
import type { NotesSection, Plan, PlanCell } from '../report/types.js';
import { isTailmarkFormula } from '../report/rules.js';
import { forEachCsvRecord } from './csv-stream.js';
import { type ReadTable, type StreamedInfo } from './read.js';
import {
  checkOutPath,
  csvFieldValue,
  inStatusColumn,
  notesLayout,
  ourRules,
  placeColumns,
  RESULT_HEADER_STYLE,
  statusDropdown,
  type Placed,
} from './layout.js';
import {
  firstNewLogRow, LOG_HEADER, LOG_HEADER_FONT, LOG_HEADER_ROW, LOG_TITLE, LOG_TITLE_STYLE, LOG_WIDTHS, logCell, logSheetChoice, newLogLines,
} from './log-sheet.js';
import type { WriteSummary } from './write.js';
import { describeNotCarried, type SheetHead, type SheetTail } from './xlsx-stream.js';
import type { CopyRow, SpooledSheet, WorkbookSpool } from './xlsx-spool.js';
import { TailmarkError, isTailmarkError } from '../pipeline/errors.js';

export interface StreamWriteOptions {
  readonly force?: boolean;
  /** Called now and then with the fraction of data rows written. */
  readonly onProgress?: (phase: 'writing' | 'saving', fraction: number) => void;
  /** Archive deflate level 0-9 (default 1: fast; the sheet XML still shrinks about tenfold). */
  readonly zipLevel?: number;
  /** Who ran it (--reviewer), for the log sheet; null = not given. */
  readonly reviewer?: string | null;
}

export interface StreamWriteSummary extends WriteSummary {
  /** What the input had that this writer did not carry over, in words (empty when nothing). */
  readonly notCarried: readonly string[];
}

/** What streaming mode always carries, for the notes sheet. */
export const STREAM_CARRIED =
  'values, formulas, number formats and cell styles (font, fill, border, alignment), column widths, row heights, ' +
  'frozen panes, merged cells, your conditional formats and data validations, autofilter range, page setup, ' +
  'print headers and footers, and the other sheets';

const EMPTY_STYLE: Partial<ExcelJS.Style> = {};

type Sheet = ExcelJS.Worksheet; // WorksheetWriter: the same surface for what is used here

interface WriterSheet extends Sheet {
  commit(): void;
  dataValidations: { model: Record<string, ExcelJS.DataValidation> };
}

/** Style model of a source style id (from the reader's style table). */
type StyleOf = (id: number | undefined) => Partial<ExcelJS.Style> | undefined;
const NO_STYLES: StyleOf = () => undefined;

interface OurCell {
  readonly col: number;
  readonly value: PlanCell;
  readonly style: Partial<ExcelJS.Style>;
}

interface ResultWriter {
  /** Our cells for a sheet row (header row or data row); null elsewhere. */
  cellsFor(rowNo: number): OurCell[] | null;
  /** Columns (1-based) we write on that row, so input cells there are replaced. */
  owns(rowNo: number, col: number): boolean;
}

function resultWriter(table: ReadTable, plan: Plan, placed: readonly Placed[]): ResultWriter {
  const headerRow = table.headerRow;
  const firstDataRow = headerRow + 1;
  const lastDataRow = headerRow + table.rowCount;
  const scoreStyles = new Map<string, Partial<ExcelJS.Style>>();
  const cols = plan.columns.map((col, ci) => {
    let style = EMPTY_STYLE;
    if (col.numberFormat) {
      style = scoreStyles.get(col.numberFormat) ?? { numFmt: col.numberFormat };
      scoreStyles.set(col.numberFormat, style);
    }
    return { col: placed[ci].index + 1, values: col.values, style, header: col.header };
  });
  const ownCols = new Set(cols.map((c) => c.col));
  return {
    cellsFor(rowNo) {
      if (rowNo === headerRow) return cols.map((c) => ({ col: c.col, value: c.header, style: RESULT_HEADER_STYLE }));
      if (rowNo < firstDataRow || rowNo > lastDataRow) return null;
      const r = rowNo - firstDataRow;
      // The plan holds the review marks (kept with their claims by the pipeline).
      return cols.map((c) => ({ col: c.col, value: c.values[r] ?? null, style: c.style }));
    },
    owns(rowNo, col) {
      return ownCols.has(col) && rowNo >= headerRow && rowNo <= lastDataRow;
    },
  };
}

/** Bytes queued for the zip compressor beyond which the writer waits (the ExcelJS stream has no backpressure). */
const MAX_QUEUED = 16 << 20;

/**
 * Wait while the sheet's output queue is long. ExcelJS's streaming sheet buffer writes into the
 * zip compressor without waiting for it, so a fast reader would otherwise queue the whole sheet in
 * memory; this keeps the queue under MAX_QUEUED.
 */
async function letOutputDrain(ws: WriterSheet | null): Promise<void> {
  const pipes = (ws as unknown as { stream?: { pipes?: { writableLength?: number }[] } } | null)?.stream?.pipes;
  if (!pipes || pipes.length === 0) return;
  const queued = () => pipes.reduce((m, p) => Math.max(m, p.writableLength ?? 0), 0);
  while (queued() > MAX_QUEUED) await new Promise((r) => setTimeout(r, 2));
}

/** Our cells into a row being written. */
function putOurs(row: ExcelJS.Row, ours: readonly OurCell[] | null): void {
  if (!ours) return;
  for (const o of ours) {
    const cell = row.getCell(o.col);
    cell.style = o.style;
    if (o.value !== null) cell.value = o.value;
  }
}

/** Write one copied row (input cells and, when given, our cells) and commit it. */
function writeRow(ws: WriterSheet, src: CopyRow | null, rowNo: number, style: StyleOf, results: ResultWriter | null): void {
  const row = ws.getRow(rowNo);
  if (src) {
    if (src.height !== undefined) row.height = src.height;
    if (src.hidden) row.hidden = true;
    if (src.outlineLevel) row.outlineLevel = src.outlineLevel;
    if (src.s) {
      const st = style(src.s);
      if (st) (row as unknown as { style: Partial<ExcelJS.Style> }).style = st;
    }
    for (const c of src.cells) {
      if (results && results.owns(rowNo, c.col)) continue;
      const cell = row.getCell(c.col);
      cell.style = style(c.s) || EMPTY_STYLE;
      if (c.value !== null) cell.value = c.value;
    }
  }
  putOurs(row, results?.cellsFor(rowNo) ?? null);
  row.commit();
}

function applyHead(ws: WriterSheet, head: SheetHead, style: StyleOf): void {
  for (const c of head.columns) {
    const max = Math.min(c.max, 16384);
    for (let k = c.min; k <= max; k++) {
      const col = ws.getColumn(k);
      const defn: Partial<ExcelJS.Column> & { style?: Partial<ExcelJS.Style> } = {};
      if (c.width !== undefined) defn.width = c.width;
      const st = style(c.s);
      if (st) defn.style = st;
      if (c.hidden) defn.hidden = true;
      if (c.outlineLevel) defn.outlineLevel = c.outlineLevel;
      (col as unknown as { defn: unknown }).defn = defn;
    }
  }
}

function sheetOptions(head: SheetHead | null, state: string | undefined): Partial<ExcelJS.AddWorksheetOptions> {
  const opts: Partial<ExcelJS.AddWorksheetOptions> & { state?: string } = {};
  if (head?.frozen && (head.frozen.xSplit > 0 || head.frozen.ySplit > 0)) {
    opts.views = [{ state: 'frozen', xSplit: head.frozen.xSplit, ySplit: head.frozen.ySplit, ...(head.showGridLines === false ? { showGridLines: false } : {}) }];
  } else if (head?.showGridLines === false) {
    opts.views = [{ showGridLines: false }];
  }
  if (head?.tabColor) opts.properties = { tabColor: { argb: head.tabColor } };
  if (state && state !== 'visible') opts.state = state as ExcelJS.AddWorksheetOptions['state'];
  return opts;
}

/** The user's rules and validations back on the sheet; ours replace any an earlier run left. */
function applyTail(ws: WriterSheet, tail: SheetTail, statusColumn: string | null): void {
  // The rows are committed by now, so WorksheetWriter.mergeCells (which touches the cells) cannot be
  // used; its list of merges is written as text at commit, and the cells were copied as they were.
  const merges = (ws as unknown as { _merges: string[] })._merges;
  for (const m of tail.merges) merges.push(m);
  for (const cf of tail.conditionalFormattings) {
    const rules = cf.rules.filter((rule) => !((rule as { formulae?: unknown[] }).formulae ?? []).some((f) => typeof f === 'string' && isTailmarkFormula(f)));
    if (rules.length) ws.addConditionalFormatting({ ...cf, rules });
  }
  for (const dv of tail.dataValidations) {
    for (const range of dv.ranges) {
      if (statusColumn && inStatusColumn(range, statusColumn)) continue;
      ws.dataValidations.model[range] = dv.validation;
    }
  }
  if (tail.autoFilter) (ws as unknown as { autoFilter: string }).autoFilter = tail.autoFilter;
  if (tail.pageSetup) {
    const { margins, ...rest } = tail.pageSetup;
    Object.assign(ws.pageSetup, rest);
    if (margins) ws.pageSetup.margins = { ...ws.pageSetup.margins, ...margins };
  }
  if (tail.headerFooter) Object.assign(ws.headerFooter, tail.headerFooter);
}

/** What one write shares between its parts. */
interface Job {
  readonly table: ReadTable;
  readonly plan: Plan;
  readonly info: StreamedInfo;
  readonly wb: ExcelJS.stream.xlsx.WorkbookWriter;
  readonly results: ResultWriter;
  readonly placed: readonly Placed[];
  readonly statusColumn: string | null;
  readonly lastDataRow: number;
  readonly reviewer: string | null;
  readonly progress: (rowNo: number) => void;
  /** What the input had that this writer did not carry over, in words. */
  readonly notCarried: string[];
  /** Input sheets written so far, in order. */
  readonly sheetNames: string[];
}

/** Our column widths, rules and dropdown on the scored sheet. */
function setOurWidths(job: Job, ws: WriterSheet): void {
  job.plan.columns.forEach((col, i) => {
    if (col.width) ws.getColumn(job.placed[i].index + 1).width = col.width;
  });
}

function finishScored(job: Job, ws: WriterSheet, tail: SheetTail | null): void {
  const { table, statusColumn } = job;
  if (tail) applyTail(ws, tail, statusColumn);
  const rules = ourRules(table, job.plan, job.placed);
  if (rules) ws.addConditionalFormatting(rules);
  if (statusColumn && table.rowCount > 0) {
    ws.dataValidations.model[`${statusColumn}${table.headerRow + 1}:${statusColumn}${job.lastDataRow}`] = statusDropdown();
  }
}

/** A CSV input: its records on one sheet (read again with the encoding and delimiter found), with our columns. */
async function copyCsv(job: Job, inputPath: string): Promise<void> {
  const { table, info, results, lastDataRow } = job;
  const ws = job.wb.addWorksheet(table.sheetName) as unknown as WriterSheet;
  job.sheetNames.push(table.sheetName);
  setOurWidths(job, ws);
  let rowNo = 0;
  await forEachCsvRecord(
    inputPath,
    (rec) => {
      rowNo++;
      const row = ws.getRow(rowNo);
      for (let c = 0; c < rec.length; c++) {
        const v = csvFieldValue(rec[c]);
        if (v === null || results.owns(rowNo, c + 1)) continue;
        const cell = row.getCell(c + 1);
        // One shared style object: ExcelJS resolves a style it has seen by identity, a fresh one
        // (what a new cell gets) by building its XML key, which cost a tenth of the run.
        cell.style = EMPTY_STYLE;
        cell.value = v;
      }
      putOurs(row, results.cellsFor(rowNo));
      row.commit();
      job.progress(rowNo);
    },
    { afterChunk: () => letOutputDrain(ws), ...(info.text ? { encoding: info.text.encoding, delimiter: info.text.delimiter } : {}) },
  );
  for (let r = rowNo + 1; r <= lastDataRow; r++) writeRow(ws, null, r, NO_STYLES, results);
  finishScored(job, ws, null);
  ws.commit();
}

/** Open an output sheet for a spooled input sheet, with its columns, panes and state. */
function openSheet(job: Job, sheet: SpooledSheet, head: SheetHead | null, style: StyleOf): WriterSheet {
  const ws = job.wb.addWorksheet(sheet.name, sheetOptions(head, sheet.state)) as unknown as WriterSheet;
  job.sheetNames.push(sheet.name);
  if (head) applyHead(ws, head, style);
  return ws;
}

/**
 * Replay a spooled sheet into a new output sheet: `onRow(ws, row)` writes each row. The sheet is
 * opened at its first row (after its head), or at the end for a sheet without rows.
 */
async function replaySheet(
  job: Job,
  spool: WorkbookSpool,
  sheet: SpooledSheet,
  onRow: (ws: WriterSheet, row: CopyRow) => void,
): Promise<{ ws: WriterSheet; tail: SheetTail }> {
  let head: SheetHead | null = null;
  let ws: WriterSheet | null = null;
  const open = () => (ws ??= openSheet(job, sheet, head, spool.style));
  const tail = await spool.replay(sheet, {
    onHead(h) {
      head = h;
    },
    onRow(row) {
      onRow(open(), row);
    },
    afterChunk: () => letOutputDrain(ws),
  });
  return { ws: open(), tail };
}

/** The scored sheet: its rows with our cells (rows missing from the file still get results). */
async function copyTarget(job: Job, spool: WorkbookSpool, sheet: SpooledSheet): Promise<WriterSheet> {
  const { results } = job;
  let next = 1; // next sheet row to write
  let widths = false;
  const { ws, tail } = await replaySheet(job, spool, sheet, (w, row) => {
    if (!widths) {
      setOurWidths(job, w);
      widths = true;
    }
    for (; next < row.r; next++) if (results.cellsFor(next)) writeRow(w, null, next, spool.style, results);
    next = row.r + 1;
    writeRow(w, row, row.r, spool.style, results);
    job.progress(row.r);
  });
  if (!widths) setOurWidths(job, ws);
  for (; next <= job.lastDataRow; next++) if (results.cellsFor(next)) writeRow(ws, null, next, spool.style, results);
  finishScored(job, ws, tail);
  return ws;
}

/** A log line's cells into a row (values only, as the in-memory writer writes them). */
function putLine(row: ExcelJS.Row, line: readonly PlanCell[]): void {
  line.forEach((v, i) => {
    if (v !== null) row.getCell(i + 1).value = v;
  });
}

/** The header row of the log, brought up to today's columns (bold); other cells of the row as they were. */
function putLogHeader(ws: WriterSheet, src: CopyRow | null, style: StyleOf): void {
  const row = ws.getRow(LOG_HEADER_ROW);
  LOG_HEADER.forEach((h, i) => {
    const cell = row.getCell(i + 1);
    cell.style = { ...(style(src?.cells.find((c) => c.col === i + 1)?.s) ?? {}), font: LOG_HEADER_FONT };
    cell.value = h;
  });
  // writeRow takes the same (uncommitted) row, adds the source's other cells and commits it.
  writeRow(ws, src ? { ...src, cells: src.cells.filter((c) => c.col > LOG_HEADER.length) } : null, LOG_HEADER_ROW, style, null);
}

/** Our log sheet from an earlier run: copied as it is, this run's lines added below its last row. */
async function copyLog(job: Job, spool: WorkbookSpool, sheet: SpooledSheet): Promise<WriterSheet> {
  const earlier: PlanCell[][] = [];
  let headerDone = false;
  const { ws, tail } = await replaySheet(job, spool, sheet, (w, row) => {
    if (!headerDone && row.r >= LOG_HEADER_ROW) {
      headerDone = true;
      putLogHeader(w, row.r === LOG_HEADER_ROW ? row : null, spool.style);
      if (row.r === LOG_HEADER_ROW) return;
    }
    if (row.r > LOG_HEADER_ROW) {
      const line = LOG_HEADER.map((): PlanCell => null);
      for (const c of row.cells) if (c.col <= LOG_HEADER.length) line[c.col - 1] = logCell(c.value);
      earlier.push(line);
    }
    writeRow(w, row, row.r, spool.style, null);
  });
  if (!headerDone) putLogHeader(ws, null, spool.style);
  let next = firstNewLogRow(Math.max(sheet.lastRow, LOG_HEADER_ROW));
  for (const line of newLogLines(job.plan, job.reviewer, earlier)) {
    const row = ws.getRow(next++);
    putLine(row, line);
    row.commit();
  }
  applyTail(ws, tail, null);
  return ws;
}

/** Any other sheet, copied as it is. */
async function copySheet(job: Job, spool: WorkbookSpool, sheet: SpooledSheet): Promise<WriterSheet> {
  const { ws, tail } = await replaySheet(job, spool, sheet, (w, row) => writeRow(w, row, row.r, spool.style, null));
  applyTail(ws, tail, null);
  return ws;
}

/**
 * An .xlsx input: every sheet replayed from the spool in storage order, ours added on the scored
 * sheet, our earlier notes sheet left out (it is replaced), our log appended to. Returns the names
 * for the notes sheet and the log sheet, and whether the log was there already.
 */
async function copyWorkbook(job: Job, spool: WorkbookSpool): Promise<{ notesName: string; log: { name: string; exists: boolean } }> {
  const { table, plan, info, notCarried, sheetNames } = job;
  const byName = new Map(spool.sheets.map((s) => [s.name, s]));
  const log = logSheetChoice((n) => byName.has(n), (n) => byName.get(n)?.a1);
  let replaced: string | null = null;
  let sawTarget = false;
  for (const sheet of spool.sheets) {
    if (sheet.replaced) {
      replaced = sheet.name;
      continue;
    }
    const isTarget: boolean = sheet.name === table.sheetName && !sawTarget;
    if (isTarget) sawTarget = true;
    const ws = isTarget
      ? await copyTarget(job, spool, sheet)
      : log.exists && sheet.name === log.name
        ? await copyLog(job, spool, sheet)
        : await copySheet(job, spool, sheet);
    ws.commit();
  }
  if (!sawTarget) throw new TailmarkError('input-file', `sheet "${table.sheetName}" not found in the workbook`);
  for (const sheet of spool.sheets) {
    if (sheet.replaced) continue;
    for (const words of describeNotCarried(sheet.tail.notCarried)) notCarried.push(`sheet "${sheet.name}": ${words}`);
  }
  const order = info.sheetNames.filter((n) => sheetNames.includes(n));
  if (order.join('\u0000') !== sheetNames.join('\u0000')) {
    notCarried.push(`the order of the sheets (written in the order they are stored in the file: ${sheetNames.map((n) => `"${n}"`).join(', ')})`);
  }
  if (spool.definedNames > 0) notCarried.push(`${spool.definedNames} named range${spool.definedNames === 1 ? '' : 's'} (defined names)`);
  let notesName = replaced ?? plan.notes.name;
  if (replaced === null) {
    for (let k = 2; sheetNames.includes(notesName) || info.sheetNames.includes(notesName); k++) notesName = `${plan.notes.name} (${k})`;
  }
  return { notesName, log };
}

/** The notes sheet, with a section on what this mode carried over. */
function writeNotes(job: Job, notesName: string): void {
  const { notCarried, info } = job;
  const extra: NotesSection = {
    title: 'Large-file mode',
    rows: [
      [`This workbook was written row by row (large-file mode). Carried over from the input: ${STREAM_CARRIED}.`],
      [
        notCarried.length
          ? `Not carried over (found in the input): ${notCarried.join('; ')}. Keep the input file for these.`
          : info.kind === 'csv'
            ? 'The input was a CSV file: it has no formatting to carry over.'
            : 'Nothing else was found in the input that this mode leaves out.',
      ],
    ],
  };
  const notes = job.wb.addWorksheet(notesName, { useSharedStrings: true } as Partial<ExcelJS.AddWorksheetOptions>) as unknown as WriterSheet;
  const layout = notesLayout(job.plan, [extra]);
  notes.getColumn(1).width = 34;
  for (let c = 2; c <= layout.widest; c++) notes.getColumn(c).width = 16;
  for (const c of layout.cells) {
    const cell = notes.getRow(c.row).getCell(c.col);
    if (c.style) cell.style = c.style;
    if (c.value !== null) cell.value = c.value;
  }
  notes.commit();
}

/** A new log sheet (none of ours in the input): title, header and this run's lines. */
function writeNewLog(job: Job, name: string): void {
  const ws = job.wb.addWorksheet(name) as unknown as WriterSheet;
  LOG_WIDTHS.forEach((w, i) => (ws.getColumn(i + 1).width = w));
  const title = ws.getRow(1).getCell(1);
  title.style = LOG_TITLE_STYLE;
  title.value = LOG_TITLE;
  ws.getRow(1).commit();
  putLogHeader(ws, null, NO_STYLES);
  let next = firstNewLogRow(LOG_HEADER_ROW);
  for (const line of newLogLines(job.plan, job.reviewer, [])) {
    const row = ws.getRow(next++);
    putLine(row, line);
    row.commit();
  }
  ws.commit();
}

export async function writeScoredWorkbookStreaming(
  inputPath: string,
  table: ReadTable,
  plan: Plan,
  outPath: string,
  options: StreamWriteOptions = {},
): Promise<StreamWriteSummary> {
  await checkOutPath(inputPath, outPath, options.force);
  const info = table.streamed;
  if (!info) throw new Error('writeScoredWorkbookStreaming needs a table from readTableStreaming');
  if (info.kind === 'xlsx' && !info.workbook) throw new Error('writeScoredWorkbookStreaming needs an .xlsx table read with a spool');
  const busy = new Set(info.busyColumns);
  const placed = placeColumns(table, plan, (c) => !busy.has(c));
  const statusIdx = plan.columns.findIndex((c) => c.kind === 'status');
  const progressEvery = Math.max(1, Math.floor(table.rowCount / 50));
  const tmp = join(dirname(resolve(outPath)), `.${basename(outPath)}.${process.pid}.tmp`);
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: tmp, useStyles: true, useSharedStrings: false, zip: { zlib: { level: options.zipLevel ?? 1 } } });
  wb.creator = 'Tailmark';
  const job: Job = {
    table, plan, info, wb, placed,
    results: resultWriter(table, plan, placed),
    statusColumn: statusIdx >= 0 ? placed[statusIdx].column : null,
    lastDataRow: table.headerRow + table.rowCount,
    reviewer: options.reviewer ?? null,
    progress: (rowNo) => {
      if (options.onProgress && rowNo % progressEvery === 0) options.onProgress('writing', Math.min(1, (rowNo - table.headerRow) / Math.max(1, table.rowCount)));
    },
    notCarried: [],
    sheetNames: [],
  };
  try {
    let notesName = plan.notes.name;
    let log = logSheetChoice(() => false, () => null);
    if (info.workbook) ({ notesName, log } = await copyWorkbook(job, info.workbook));
    else await copyCsv(job, inputPath);
    writeNotes(job, notesName);
    if (!log.exists) writeNewLog(job, log.name);
    options.onProgress?.('saving', 0);
    await wb.commit();
    await rename(tmp, outPath);
    options.onProgress?.('saving', 1);
    return { outPath, sheetName: table.sheetName, placed: placed.map(({ header, column }) => ({ header, column })), notesSheet: notesName, notCarried: job.notCarried };
  } catch (e) {
    await rm(tmp, { force: true });
    if (isTailmarkError(e, 'input-file', 'output-file')) throw e;
    throw new TailmarkError('output-file', `cannot write ${outPath} (${e instanceof Error ? e.message : String(e)})`);
  }
}
