/**
 * Write a scored workbook (Node): a NEW .xlsx holding the input sheet as it was (values, formulas,
 * formats, the user's own rules) plus our result columns to the right of the data, our highlight
 * rules, a status dropdown and the notes sheet. The input file is never written.
 *
 * Strings are written as shared-string text cells, so a value beginning with = + - @ stays text and
 * never becomes a formula.
 */
import { rename, rm } from 'node:fs/promises';
import { basename, dirname, join, resolve } from 'node:path';
import ExcelJS from 'exceljs';
import type { SourceTable } from '../scoring/types.js';
import type { Plan, PlanCell } from '../report/types.js';
import { isTailmarkFormula } from '../report/rules.js';
import { firstNewLogRow, LOG_HEADER, LOG_HEADER_FONT, LOG_HEADER_ROW, LOG_TITLE, LOG_TITLE_STYLE, LOG_WIDTHS, logCell, logSheetChoice, newLogLines } from './log-sheet.js';
import { fileKind, readTable, type ReadTable } from './read.js';
import { compactValidations } from './validation-ranges.js';
import { checkOutPath, csvFieldValue, inStatusColumn, isOurNotesSheet, notesLayout, ourRules, placeColumns, RESULT_HEADER_STYLE, statusDropdown } from './layout.js';
import { TailmarkError } from '../pipeline/errors.js';


export interface WriteOptions {
  /** Replace outPath if it exists (never the input). */
  readonly force?: boolean;
  /** The workbook `readTable` returned (xlsx), to avoid reading the input twice. It is modified. */
  readonly workbook?: unknown;
  readonly onProgress?: (phase: 'writing' | 'saving', fraction: number) => void;
  /** Lines for the notes sheet about how the file was written (e.g. what streaming could not carry). */
  readonly extraNotes?: Plan['notes']['sections'];
  /** Who ran it (--reviewer), for the log sheet; null = not given. */
  readonly reviewer?: string | null;
}

export interface WriteSummary {
  readonly outPath: string;
  readonly sheetName: string;
  /** Header and column letter of each plan column as placed. */
  readonly placed: readonly { readonly header: string; readonly column: string }[];
  readonly notesSheet: string;
}

interface SheetValidations {
  model: Record<string, unknown>;
  add(address: string, validation: ExcelJS.DataValidation): void;
}

/** Zip settings for output: deflate level 1 is several times faster than the default 6, for files ~10-15% larger. */
export const ZIP_FAST = { compression: 'DEFLATE', compressionOptions: { level: 1 } } as const;

function isEmptyValue(v: ExcelJS.CellValue): boolean {
  return v === null || v === undefined || v === '';
}

/** The plan's cells as sheet values: strings stay strings (text), null is an empty cell. */
function planValue(v: PlanCell): ExcelJS.CellValue {
  return v === null ? null : v;
}

/**
 * The log sheet, as the add-in keeps it (src/report/log.ts, src/files/log-sheet.ts): this run's lines
 * are added below the last one and nothing above is rewritten. A sheet of that name that is not ours
 * is left alone and ours gets a suffix, as for the notes sheet.
 */
function appendLogSheet(wb: ExcelJS.Workbook, plan: Plan, reviewer: string | null): void {
  const choice = logSheetChoice(
    (name) => wb.getWorksheet(name) !== undefined,
    (name) => wb.getWorksheet(name)?.getCell('A1').value,
  );
  let log = choice.exists ? wb.getWorksheet(choice.name) : undefined;
  if (!log) {
    log = wb.addWorksheet(choice.name);
    log.getCell('A1').value = LOG_TITLE;
    log.getCell('A1').font = LOG_TITLE_STYLE.font!;
    LOG_WIDTHS.forEach((w, i) => (log!.getColumn(i + 1).width = w));
  }
  const header = log.getRow(LOG_HEADER_ROW);
  LOG_HEADER.forEach((h, i) => {
    header.getCell(i + 1).value = h;
    header.getCell(i + 1).font = LOG_HEADER_FONT;
  });
  const earlier: PlanCell[][] = [];
  for (let r = LOG_HEADER_ROW + 1; r <= log.rowCount; r++) {
    const row = log.getRow(r);
    earlier.push(LOG_HEADER.map((_, i) => logCell(row.getCell(i + 1).value)));
  }
  let next = firstNewLogRow(log.rowCount);
  for (const l of newLogLines(plan, reviewer, earlier)) {
    const row = log.getRow(next++);
    l.forEach((v, i) => {
      if (v !== null) row.getCell(i + 1).value = v;
    });
  }
}

export async function writeScoredWorkbook(
  inputPath: string,
  table: SourceTable,
  plan: Plan,
  outPath: string,
  options: WriteOptions = {},
): Promise<WriteSummary> {
  await checkOutPath(inputPath, outPath, options.force);

  const kind = fileKind(inputPath);
  let wb: ExcelJS.Workbook;
  let ws: ExcelJS.Worksheet;
  if (kind === 'xlsx') {
    wb = (options.workbook as ExcelJS.Workbook | undefined) ?? ((await readTable(inputPath, { sheet: table.sheetName })).workbook as ExcelJS.Workbook);
    const found = wb.getWorksheet(table.sheetName);
    if (!found) throw new TailmarkError('input-file', `sheet "${table.sheetName}" not found in ${basename(inputPath)}`);
    ws = found;
  } else if (kind === 'csv') {
    const again = (table as ReadTable).csvRecords ?? (await readTable(inputPath)).csvRecords ?? [];
    wb = new ExcelJS.Workbook();
    ws = wb.addWorksheet(table.sheetName);
    again.forEach((rec, r) => {
      const row = ws.getRow(r + 1);
      rec.forEach((f, c) => {
        const v = csvFieldValue(f);
        if (v !== null) row.getCell(c + 1).value = v;
      });
    });
  } else {
    throw new TailmarkError('input-file', `unsupported input type: ${inputPath}`);
  }
  wb.creator = wb.creator || 'Tailmark';

  const headerRow = table.headerRow;
  const firstDataRow = headerRow + 1;
  const lastDataRow = headerRow + table.rowCount;

  // Re-run: our columns already in the table are reused in place; the plan holds the review marks
  // (kept with their claims by the pipeline, src/report/marks.ts), so every cell is written from it.
  const isFree = (col0: number): boolean => {
    for (let r = headerRow; r <= Math.max(lastDataRow, headerRow); r++) {
      const cell = ws.findRow(r)?.findCell(col0 + 1);
      if (cell && !isEmptyValue(cell.value)) return false;
    }
    return true;
  };
  const placed = placeColumns(table, plan, isFree);

  const total = plan.columns.length * Math.max(table.rowCount, 1);
  let done = 0;
  plan.columns.forEach((col, ci) => {
    const c = placed[ci].index + 1;
    const head = ws.getRow(headerRow).getCell(c);
    head.value = col.header;
    head.font = RESULT_HEADER_STYLE.font!;
    head.fill = RESULT_HEADER_STYLE.fill!;
    const column = ws.getColumn(c);
    if (col.width) column.width = col.width;
    for (let r = 0; r < table.rowCount; r++) {
      const cell = ws.getRow(firstDataRow + r).getCell(c);
      cell.value = planValue(col.values[r] ?? null);
      if (col.numberFormat) cell.numFmt = col.numberFormat;
    }
    done += table.rowCount;
    options.onProgress?.('writing', done / total);
  });

  // Highlight rules: drop our old ones (recognised by marker), keep the user's, add ours.
  const statusIdx = plan.columns.findIndex((c) => c.kind === 'status');
  const rules = ourRules(table, plan, placed);
  if (rules && statusIdx >= 0) {
    const statusColumn = placed[statusIdx].column;
    const model = ws as unknown as { conditionalFormattings?: { ref: string; rules: { formulae?: unknown[] }[] }[] };
    if (Array.isArray(model.conditionalFormattings)) {
      model.conditionalFormattings = model.conditionalFormattings.filter(
        (cf) => !cf.rules.some((rule) => (rule.formulae ?? []).some((f) => typeof f === 'string' && isTailmarkFormula(f))),
      );
    }
    ws.addConditionalFormatting(rules);
    // Our dropdown replaces any per-cell validation a previous run left in the status column.
    // ExcelJS has worksheet.dataValidations at runtime but not in its type definitions.
    const dv = (ws as unknown as { dataValidations: SheetValidations }).dataValidations;
    for (const address of Object.keys(dv.model)) if (inStatusColumn(address, statusColumn)) delete dv.model[address];
    dv.add(`${statusColumn}${firstDataRow}:${statusColumn}${lastDataRow}`, statusDropdown());
  }

  // Notes sheet: replaced on a re-run when it is ours (whichever host made it: A1 says so, see
  // src/report/notesSheet.ts); a sheet of the user's with the same name is left alone and ours gets a suffix.
  let notesName = plan.notes.name;
  for (let k = 2; ; k++) {
    const old = wb.getWorksheet(notesName);
    if (!old) break;
    if (isOurNotesSheet(old.getCell('A1').value)) {
      wb.removeWorksheet(old.id);
      break;
    }
    notesName = `${plan.notes.name} (${k})`;
  }
  const notes = wb.addWorksheet(notesName);
  const layout = notesLayout(plan, options.extraNotes);
  for (const c of layout.cells) {
    const cell = notes.getRow(c.row).getCell(c.col);
    cell.value = planValue(c.value);
    if (c.style?.font) cell.font = c.style.font;
    if (c.style?.fill) cell.fill = c.style.fill;
  }
  notes.getColumn(1).width = 34;
  for (let c = 2; c <= layout.widest; c++) notes.getColumn(c).width = 16;

  // Validations go back with the ranges they came with (ExcelJS would write overlapping ones).
  for (const sheet of wb.worksheets) compactValidations((sheet as unknown as { dataValidations: SheetValidations }).dataValidations.model);
  appendLogSheet(wb, plan, options.reviewer ?? null);

  options.onProgress?.('saving', 0);
  const tmp = join(dirname(resolve(outPath)), `.${basename(outPath)}.${process.pid}.tmp`);
  try {
    await wb.xlsx.writeFile(tmp, { zip: ZIP_FAST });
    await rename(tmp, outPath);
  } catch (e) {
    await rm(tmp, { force: true });
    throw new TailmarkError('output-file', `cannot write ${outPath} (${e instanceof Error ? e.message : String(e)})`);
  }
  options.onProgress?.('saving', 1);
  return { outPath, sheetName: ws.name, placed: placed.map(({ header, column }) => ({ header, column })), notesSheet: notes.name };
}
