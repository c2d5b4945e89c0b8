/**
 * Write a scored workbook row by row (Node), for inputs too large to hold in memory: the input is
 * read a second time as a stream and each row is written out through ExcelJS's streaming
 * WorkbookWriter as soon as it is complete (its cells, then our result cells), so memory stays at
 * one row plus the plan. Same result as `writeScoredWorkbook`: the input sheet's values, formulas,
 * number formats and cell styles, our result columns right of the data, our conditional-format rules
 * and status dropdown, the other sheets, and the notes sheet. The input file is never written.
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
 */
import { rename, rm } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import ExcelJS from 'exceljs';
import type { NotesSection, Plan, PlanCell } from '../report/types.js';
import { isTailmarkFormula } from '../report/rules.js';
import { forEachCsvRecord } from './csv-stream.js';
import { type ReadTable } from './read.js';
import {
  checkOutPath,
  inStatusColumn,
  isOurNotesSheet,
  notesLayout,
  ourRules,
  placeColumns,
  RESULT_HEADER_STYLE,
  statusDropdown,
  type Placed,
} from './layout.js';
import type { WriteSummary } from './write.js';
import { describeNotCarried, type SheetHead, type SheetTail, type StreamRow, XlsxStream } from './xlsx-stream.js';
import { TailmarkError, isTailmarkError } from '../pipeline/errors.js';

export interface StreamWriteOptions {
  readonly force?: boolean;
  /** Called now and then with the fraction of data rows written. */
  readonly onProgress?: (phase: 'writing' | 'saving', fraction: number) => void;
  /** Archive deflate level 0-9 (default 1: fast; the sheet XML still shrinks about tenfold). */
  readonly zipLevel?: number;
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

/** A CSV field as a sheet value: plain decimal numbers become numbers, everything else stays text. */
function csvFieldValue(f: string): ExcelJS.CellValue {
  if (f === '') return null;
  if (/^-?(0|[1-9]\d{0,14})(\.\d{1,10})?$/.test(f)) return Number(f);
  return f;
}

type Sheet = ExcelJS.Worksheet; // WorksheetWriter: the same surface for what is used here

interface ResultWriter {
  /** Our cells for a sheet row (header row or data row); null elsewhere. */
  cellsFor(rowNo: number): { col: number; value: PlanCell; style: Partial<ExcelJS.Style> }[] | null;
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
      const out: { col: number; value: PlanCell; style: Partial<ExcelJS.Style> }[] = [];
      // The plan holds the review marks (kept with their claims by the pipeline).
      for (const c of cols) {
        out.push({ col: c.col, value: c.values[r] ?? null, style: c.style });
      }
      return out;
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

interface WriterSheet extends Sheet {
  commit(): void;
  dataValidations: { model: Record<string, ExcelJS.DataValidation> };
}

/** Write one streamed row (input cells and, when given, our cells) and commit it. */
function writeRow(
  ws: WriterSheet,
  src: StreamRow | null,
  rowNo: number,
  x: XlsxStream | null,
  results: ResultWriter | null,
): void {
  const row = ws.getRow(rowNo);
  if (src) {
    if (src.height !== undefined) row.height = src.height;
    if (src.hidden) row.hidden = true;
    if (src.outlineLevel) row.outlineLevel = src.outlineLevel;
    if (src.s && x) {
      const st = x.style(src.s);
      if (st) (row as unknown as { style: Partial<ExcelJS.Style> }).style = st;
    }
    for (const c of src.cells) {
      if (results && results.owns(rowNo, c.col)) continue;
      const cell = row.getCell(c.col);
      cell.style = (x && x.style(c.s)) || EMPTY_STYLE;
      if (c.value !== null) cell.value = c.value;
    }
  }
  const ours = results?.cellsFor(rowNo);
  if (ours) {
    for (const o of ours) {
      const cell = row.getCell(o.col);
      cell.style = o.style;
      if (o.value !== null) cell.value = o.value;
    }
  }
  row.commit();
}

function applyHead(ws: WriterSheet, head: SheetHead, x: XlsxStream): void {
  for (const c of head.columns) {
    const max = Math.min(c.max, 16384);
    for (let k = c.min; k <= max; k++) {
      const col = ws.getColumn(k);
      const defn: Partial<ExcelJS.Column> & { style?: Partial<ExcelJS.Style> } = {};
      if (c.width !== undefined) defn.width = c.width;
      const st = x.style(c.s);
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
  const busy = new Set(info.busyColumns);
  const placed = placeColumns(table, plan, (c) => !busy.has(c));
  const results = resultWriter(table, plan, placed);
  const statusIdx = plan.columns.findIndex((c) => c.kind === 'status');
  const statusColumn = statusIdx >= 0 ? placed[statusIdx].column : null;
  const rules = ourRules(table, plan, placed);
  const lastDataRow = table.headerRow + table.rowCount;
  const progressEvery = Math.max(1, Math.floor(table.rowCount / 50));
  const progress = (rowNo: number) => {
    if (options.onProgress && rowNo % progressEvery === 0) options.onProgress('writing', Math.min(1, (rowNo - table.headerRow) / Math.max(1, table.rowCount)));
  };

  const tmp = join(dirname(resolve(outPath)), `.${basename(outPath)}.${process.pid}.tmp`);
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({
    filename: tmp,
    useStyles: true,
    useSharedStrings: false,
    zip: { zlib: { level: options.zipLevel ?? 1 } },
  });
  wb.creator = 'Tailmark';

  const setOurWidths = (ws: WriterSheet) => {
    plan.columns.forEach((col, i) => {
      if (col.width) ws.getColumn(placed[i].index + 1).width = col.width;
    });
  };
  const finishScored = (ws: WriterSheet, tail: SheetTail | null) => {
    if (tail) applyTail(ws, tail, statusColumn);
    if (rules) ws.addConditionalFormatting(rules);
    if (statusColumn && table.rowCount > 0) {
      ws.dataValidations.model[`${statusColumn}${table.headerRow + 1}:${statusColumn}${lastDataRow}`] = statusDropdown();
    }
  };

  const notCarried: string[] = [];
  const sheetNames: string[] = [];
  let notesName = plan.notes.name;

  try {
    if (info.kind === 'csv') {
      const ws = wb.addWorksheet(table.sheetName) as unknown as WriterSheet;
      sheetNames.push(table.sheetName);
      setOurWidths(ws);
      let rowNo = 0;
      await forEachCsvRecord(inputPath, (rec) => {
        rowNo++;
        const row = ws.getRow(rowNo);
        for (let c = 0; c < rec.length; c++) {
          const v = csvFieldValue(rec[c]);
          if (v !== null && !results.owns(rowNo, c + 1)) row.getCell(c + 1).value = v;
        }
        const ours = results.cellsFor(rowNo);
        if (ours) {
          for (const o of ours) {
            const cell = row.getCell(o.col);
            cell.style = o.style;
            if (o.value !== null) cell.value = o.value;
          }
        }
        row.commit();
        progress(rowNo);
      }, { afterChunk: () => letOutputDrain(ws) });
      for (let r = rowNo + 1; r <= lastDataRow; r++) writeRow(ws, null, r, null, results);
      finishScored(ws, null);
      ws.commit();
    } else {
      const x = new XlsxStream(inputPath);
      // Our notes sheet from an earlier run is replaced; a user's sheet with the same name is kept.
      const chain = new Set<string>();
      for (let k = 1; ; k++) {
        const n = k === 1 ? plan.notes.name : `${plan.notes.name} (${k})`;
        if (!info.sheetNames.includes(n)) break;
        chain.add(n);
      }
      let replaced: string | null = null;
      let sawTarget = false;
      try {
        for await (const sheet of x.sheets()) {
          const isTarget = sheet.name === table.sheetName && !sawTarget;
          const maybeOurs = !isTarget && replaced === null && chain.has(sheet.name);
          let ws: WriterSheet | null = null;
          let head: SheetHead | null = null;
          let skip = false;
          let next = 1; // next sheet row to write (target sheet: rows missing from the file still get results)
          const open = () => {
            if (ws || skip) return ws;
            ws = wb.addWorksheet(sheet.name, sheetOptions(head, sheet.state)) as unknown as WriterSheet;
            sheetNames.push(sheet.name);
            if (head) applyHead(ws, head, x);
            if (isTarget) setOurWidths(ws);
            return ws;
          };
          const tail = await x.readSheet(sheet, {
            onHead(h) {
              head = h;
            },
            onRow(row) {
              if (maybeOurs && !ws && !skip) {
                const a1 = row.r === 1 ? row.cells.find((c) => c.col === 1) : undefined;
                if (a1 && isOurNotesSheet(a1.raw)) {
                  skip = true;
                  replaced = sheet.name;
                  return false;
                }
              }
              const w = open();
              if (!w) return false;
              if (isTarget) {
                for (; next < row.r; next++) if (results.cellsFor(next)) writeRow(w, null, next, x, results);
                next = row.r + 1;
                writeRow(w, row, row.r, x, results);
                progress(row.r);
              } else writeRow(w, row, row.r, x, null);
              return true;
            },
            afterChunk: () => letOutputDrain(ws),
          });
          if (skip) continue;
          const w = open()!;
          if (isTarget) {
            sawTarget = true;
            for (; next <= lastDataRow; next++) if (results.cellsFor(next)) writeRow(w, null, next, x, results);
            finishScored(w, tail);
          } else applyTail(w, tail, null);
          for (const words of describeNotCarried(tail.notCarried)) notCarried.push(`sheet "${sheet.name}": ${words}`);
          w.commit();
        }
      } finally {
        x.close();
      }
      const order = info.sheetNames.filter((n) => sheetNames.includes(n));
      if (order.join('\u0000') !== sheetNames.join('\u0000')) {
        notCarried.push(`the order of the sheets (written in the order they are stored in the file: ${sheetNames.map((n) => `"${n}"`).join(', ')})`);
      }
      if (!sawTarget) throw new TailmarkError('input-file', `sheet "${table.sheetName}" not found in ${basename(inputPath)}`);
      const names = x.definedNameCount;
      if (names > 0) notCarried.push(`${names} named range${names === 1 ? '' : 's'} (defined names)`);
      if (replaced !== null) notesName = replaced;
      else {
        for (let k = 2; sheetNames.includes(notesName) || info.sheetNames.includes(notesName); k++) notesName = `${plan.notes.name} (${k})`;
      }
    }

    // Notes sheet, with a section on what this mode carried over.
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
    const notes = wb.addWorksheet(notesName, { useSharedStrings: true } as Partial<ExcelJS.AddWorksheetOptions>) as unknown as WriterSheet;
    const layout = notesLayout(plan, [extra]);
    notes.getColumn(1).width = 34;
    for (let c = 2; c <= layout.widest; c++) notes.getColumn(c).width = 16;
    for (const c of layout.cells) {
      const cell = notes.getRow(c.row).getCell(c.col);
      if (c.style) cell.style = c.style;
      if (c.value !== null) cell.value = c.value;
    }
    notes.commit();
    options.onProgress?.('saving', 0);
    await wb.commit();
    await rename(tmp, outPath);
    options.onProgress?.('saving', 1);
    return {
      outPath,
      sheetName: table.sheetName,
      placed: placed.map(({ header, column }) => ({ header, column })),
      notesSheet: notesName,
      notCarried,
    };
  } catch (e) {
    await rm(tmp, { force: true });
    if (isTailmarkError(e, 'input-file', 'output-file')) throw e;
    throw new TailmarkError('output-file', `cannot write ${outPath} (${e instanceof Error ? e.message : String(e)})`);
  }
}
