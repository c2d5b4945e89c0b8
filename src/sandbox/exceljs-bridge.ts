/**
 * Bridges between the sandbox and exceljs workbooks (exceljs runs in Node and in the browser), so
 * the add-in can run headless on an .xlsx file and a test can round-trip a workbook.
 *
 * Carried both ways: values (numbers, text, booleans, errors; dates as serial numbers), formulas
 * (with cached results when exceljs has them), number formats, solid fills, font colour and bold,
 * wrap, column widths, custom ("expression") conditional formats with fill/font colour and
 * priority order, list data validations, and tables (name, range; header row always shown).
 *
 * Not carried (listed in `SandboxWorkbook.importNotes` on import when met): other
 * conditional-format types, other validation types, theme/indexed colours, rich-text runs
 * (flattened to text), hyperlinks (their text is kept). Workbook settings (an Office add-in part,
 * not an xlsx feature here) and sheet protection are not exported.
 *
 * Widths: exceljs measures columns in characters; the sandbox in points, like Excel's
 * RangeFormat.columnWidth. Conversion uses Excel's default font metrics (7 px per character plus
 * 5 px padding, 0.75 pt per px: 8.43 characters = 64 px = 48 pt); other fonts will differ slightly.
 */
import ExcelJS from 'exceljs';
import { SandboxWorkbook } from './workbook.js';
import { CellError } from './formula.js';
import { parseAddress, formatRect, columnLetters, type Rect } from './address.js';
import { dateToSerial, type SheetModel } from './model.js';

/** exceljs members its type declarations omit (present in exceljs 4.4's Worksheet). */
interface WorksheetInternals {
  conditionalFormattings?: { ref: string; rules: unknown[] }[];
  dataValidations: { model: Record<string, Record<string, unknown> | undefined>; add(address: string, v: ExcelJS.DataValidation): void };
  _columns?: ({ width?: number; number: number } | undefined)[];
}
const internals = (ws: ExcelJS.Worksheet): WorksheetInternals => ws as unknown as WorksheetInternals;

const charsToPoints = (w: number): number => Math.round((Math.trunc(w * 7 + 5) * 0.75) * 100) / 100;
const pointsToChars = (pt: number): number => Math.round(((pt / 0.75 - 5) / 7) * 100) / 100;

function argbToHex(c: unknown): string | undefined {
  const argb = (c as { argb?: unknown } | undefined)?.argb;
  if (typeof argb !== 'string') return undefined;
  const s = argb.length === 8 ? argb.slice(2) : argb.length === 6 ? argb : '';
  return /^[0-9a-fA-F]{6}$/.test(s) ? `#${s.toUpperCase()}` : undefined;
}
const hexToArgb = (hex: string): string => `FF${hex.replace('#', '').toUpperCase()}`;

function dateSerial(d: Date): number {
  // exceljs gives dates as UTC instants; keep the fraction of the day for date-times.
  const day = dateToSerial(d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate());
  const frac = (d.getUTCHours() * 3600 + d.getUTCMinutes() * 60 + d.getUTCSeconds() + d.getUTCMilliseconds() / 1000) / 86400;
  return day + frac;
}

type Plain = number | string | boolean | CellError | null;

function plainOf(v: unknown): Plain {
  if (v === null || v === undefined) return null;
  if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') return v;
  if (v instanceof Date) return dateSerial(v);
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if (typeof o.error === 'string') return new CellError(o.error);
    if (Array.isArray(o.richText)) return (o.richText as { text?: string }[]).map((r) => r.text ?? '').join('');
    if (typeof o.text === 'string') return o.text;
  }
  return null;
}

function rectsOf(ref: string): Rect[] {
  return ref.split(/[\s,]+/).filter(Boolean).map((a) => {
    const p = parseAddress(a);
    if (!p) throw new Error(`exceljs bridge: cannot read range "${a}".`);
    return p.rect;
  });
}

/**
 * Merge rectangles that touch exactly (exceljs reads a validated range back as one entry per
 * cell): vertical runs with the same columns, then horizontal runs with the same rows.
 */
function mergeRects(input: Rect[]): Rect[] {
  let rs = input.map((r) => ({ ...r }));
  const pass = (vertical: boolean) => {
    rs.sort((a, b) => (vertical ? a.c0 - b.c0 || a.cols - b.cols || a.r0 - b.r0 : a.r0 - b.r0 || a.rows - b.rows || a.c0 - b.c0));
    const out: Rect[] = [];
    for (const r of rs) {
      const last = out[out.length - 1];
      if (last && vertical && last.c0 === r.c0 && last.cols === r.cols && last.r0 + last.rows === r.r0) out[out.length - 1] = { ...last, rows: last.rows + r.rows };
      else if (last && !vertical && last.r0 === r.r0 && last.rows === r.rows && last.c0 + last.cols === r.c0) out[out.length - 1] = { ...last, cols: last.cols + r.cols };
      else out.push(r);
    }
    rs = out;
  };
  pass(true);
  pass(false);
  return rs.sort((a, b) => a.r0 - b.r0 || a.c0 - b.c0);
}

/** An .xlsx file's bytes as an ExcelJS workbook (for the browser preview, which reaches ExcelJS only through this module). */
export async function readXlsx(data: Parameters<ExcelJS.Xlsx['load']>[0]): Promise<ExcelJS.Workbook> {
  const wb = new ExcelJS.Workbook();
  await wb.xlsx.load(data);
  return wb;
}

/** Build a sandbox from an exceljs workbook (sheet order, names and contents as listed above). */
export function sandboxFromExcelJs(wb: ExcelJS.Workbook): SandboxWorkbook {
  const sb = new SandboxWorkbook();
  const model = sb.model;
  wb.eachSheet((ws) => {
    sb.addSheet(ws.name);
    const s = model.sheetByName(ws.name)!;
    if (ws.state === 'hidden' || ws.state === 'veryHidden') s.visibility = ws.state === 'hidden' ? 'Hidden' : 'VeryHidden';
    ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
      row.eachCell({ includeEmpty: false }, (cell, colNumber) => {
        const r = rowNumber - 1;
        const c = colNumber - 1;
        const v = cell.value as unknown;
        let formula: string | undefined;
        let value: Plain;
        if (v && typeof v === 'object' && ('formula' in v || 'sharedFormula' in v)) {
          const f = (cell as unknown as { formula?: string }).formula ?? (v as { formula?: string }).formula;
          formula = f ? `=${f}` : undefined;
          value = plainOf((v as { result?: unknown }).result);
        } else value = plainOf(v);
        if (value !== null) model.setAttr(s, r, c, 'v', value);
        if (formula !== undefined) model.setAttr(s, r, c, 'f', formula);
        const nf = cell.numFmt;
        if (typeof nf === 'string' && nf !== '' && nf !== 'General') model.setAttr(s, r, c, 'nf', nf);
        else if (v instanceof Date) model.setAttr(s, r, c, 'nf', 'yyyy-mm-dd');
        const fill = cell.fill as { type?: string; pattern?: string; fgColor?: unknown } | undefined;
        if (fill && fill.type === 'pattern' && fill.pattern === 'solid') {
          const hex = argbToHex(fill.fgColor);
          if (hex) model.setAttr(s, r, c, 'fill', hex);
          else sb.importNotes.push(`${ws.name}!${columnLetters(c)}${r + 1}: fill colour is a theme/indexed colour (not carried).`);
        }
        const font = cell.font as { color?: unknown; bold?: boolean } | undefined;
        const fc = argbToHex(font?.color);
        if (fc) model.setAttr(s, r, c, 'font', fc);
        if (font?.bold) model.setAttr(s, r, c, 'bold', true);
        if ((cell.alignment as { wrapText?: boolean } | undefined)?.wrapText) model.setAttr(s, r, c, 'wrap', true);
      });
    });
    const cols = internals(ws)._columns ?? [];
    for (const col of cols) if (col && typeof col.width === 'number') s.widths.set(col.number - 1, charsToPoints(col.width));
    // Conditional formats, highest precedence first.
    const rules: { priority: number; rects: Rect[]; rule: Record<string, unknown> }[] = [];
    for (const cf of internals(ws).conditionalFormattings ?? []) {
      for (const rule of cf.rules as Record<string, unknown>[]) {
        if (rule.type !== 'expression') {
          sb.importNotes.push(`${ws.name}!${cf.ref}: conditional format of type "${String(rule.type)}" is not carried.`);
          continue;
        }
        rules.push({ priority: typeof rule.priority === 'number' ? rule.priority : 1e9, rects: rectsOf(cf.ref), rule });
      }
    }
    rules.sort((a, b) => a.priority - b.priority);
    for (const { rects, rule } of rules) {
      const formulae = rule.formulae as string[] | undefined;
      const style = (rule.style ?? {}) as { fill?: { bgColor?: unknown; fgColor?: unknown }; font?: { color?: unknown; bold?: boolean } };
      const f = formulae?.[0] ?? '';
      s.cfs.push({
        id: model.newId('cf'), type: 'Custom', rects, anchor: { row: rects[0].r0, col: rects[0].c0 },
        formula: f.startsWith('=') ? f : `=${f}`,
        fill: argbToHex(style.fill?.bgColor) ?? argbToHex(style.fill?.fgColor) ?? null,
        font: argbToHex(style.font?.color) ?? null,
        bold: style.font?.bold ?? null,
        stopIfTrue: false,
      });
    }
    // Merged cells (as the file lists them; their other cells are blank there too).
    for (const m of (ws.model as { merges?: string[] }).merges ?? []) s.merges.push(...rectsOf(m));
    // Data validations (exceljs keys them by address or range).
    const dvs = internals(ws).dataValidations.model;
    const byRule = new Map<string, Rect[]>();
    for (const [addr, dv] of Object.entries(dvs)) {
      if (!dv) continue;
      if (dv.type !== 'list') {
        sb.importNotes.push(`${ws.name}!${addr}: data validation of type "${String(dv.type)}" is not carried.`);
        continue;
      }
      const f = String((dv.formulae as unknown[] | undefined)?.[0] ?? '');
      const source = f.startsWith('"') && f.endsWith('"') ? f.slice(1, -1) : `=${f}`;
      const key = JSON.stringify([source, dv.allowBlank !== false]);
      const list = byRule.get(key) ?? [];
      list.push(...rectsOf(addr.replace(/^range:/, '')));
      byRule.set(key, list);
    }
    for (const [key, rects] of byRule) {
      const [source, ignoreBlanks] = JSON.parse(key) as [string, boolean];
      s.validations.push({ id: model.newId('dv'), rects: mergeRects(rects), rule: { list: { source, inCellDropDown: true } }, ignoreBlanks });
    }
    // Tables.
    for (const t of ws.getTables() as unknown as { table?: Record<string, unknown>; model?: Record<string, unknown> }[]) {
      const m = (t.table ?? t.model ?? {}) as { name?: string; tableRef?: string; ref?: string; headerRow?: boolean; columns?: unknown[]; rows?: unknown[] };
      let ref = m.tableRef;
      if (!ref && m.ref && m.columns) {
        const p = parseAddress(m.ref);
        if (p) ref = formatRect({ r0: p.rect.r0, c0: p.rect.c0, rows: (m.rows?.length ?? 0) + 1, cols: m.columns.length });
      }
      const p = ref ? parseAddress(ref) : null;
      if (!p || !m.name) continue;
      if (m.headerRow === false) sb.importNotes.push(`${ws.name}: table "${m.name}" has no header row; imported with its first row as headers.`);
      s.tables.push({ id: model.newId('table'), name: m.name, rect: p.rect, showHeaders: true });
    }
  });
  return sb;
}

function cellValueOut(s: SheetModel, sb: SandboxWorkbook, r: number, c: number): ExcelJS.CellValue | undefined {
  const col = s.cols[c];
  const v = col?.v?.[r];
  const f = col?.f?.[r];
  const plain = (x: unknown): ExcelJS.CellValue =>
    x instanceof CellError ? ({ error: x.code } as ExcelJS.CellErrorValue) : (x as ExcelJS.CellValue);
  if (f !== undefined) {
    const cached = v !== undefined ? v : sb.model.readValue(s, r, c);
    const result = cached === null || (typeof cached === 'string' && cached === f) ? undefined : plain(cached);
    return { formula: f.slice(1), ...(result !== undefined ? { result } : {}) } as ExcelJS.CellFormulaValue;
  }
  if (v === undefined) return undefined;
  return plain(v);
}

/** Build an exceljs workbook from a sandbox (see the module comment for what is carried). */
export function sandboxToExcelJs(sb: SandboxWorkbook): ExcelJS.Workbook {
  const wb = new ExcelJS.Workbook();
  for (const s of sb.model.sheets) {
    const ws = wb.addWorksheet(s.name, s.visibility === 'Visible' ? {} : { state: s.visibility === 'Hidden' ? 'hidden' : 'veryHidden' });
    // Tables first: exceljs writes a table's cells when it is added; the cell pass below then
    // restores exact values, formulas and formats.
    for (const t of s.tables) {
      const headers: string[] = [];
      for (let j = 0; j < t.rect.cols; j++) {
        const h = sb.model.readValue(s, t.rect.r0, t.rect.c0 + j);
        headers.push(h === null ? `Column${j + 1}` : String(h instanceof CellError ? h.code : h));
      }
      const rows: ExcelJS.CellValue[][] = [];
      for (let i = 1; i < t.rect.rows; i++) {
        const row: ExcelJS.CellValue[] = [];
        for (let j = 0; j < t.rect.cols; j++) {
          const x = sb.model.readValue(s, t.rect.r0 + i, t.rect.c0 + j);
          row.push(x instanceof CellError ? ({ error: x.code } as ExcelJS.CellErrorValue) : x);
        }
        rows.push(row);
      }
      ws.addTable({
        name: t.name,
        ref: `${columnLetters(t.rect.c0)}${t.rect.r0 + 1}`,
        headerRow: true,
        columns: headers.map((name) => ({ name })),
        rows,
      });
    }
    for (let c = 0; c < s.cols.length; c++) {
      const col = s.cols[c];
      if (!col) continue;
      let len = 0;
      for (const a of Object.values(col) as (readonly unknown[] | undefined)[]) if (a && a.length > len) len = a.length;
      for (let r = 0; r < len; r++) {
        const value = cellValueOut(s, sb, r, c);
        const nf = col.nf?.[r];
        const fill = col.fill?.[r];
        const font = col.font?.[r];
        const bold = col.bold?.[r];
        const wrap = col.wrap?.[r];
        if (value === undefined && nf === undefined && fill === undefined && font === undefined && !bold && !wrap) continue;
        const cell = ws.getCell(r + 1, c + 1);
        cell.value = value === undefined ? null : value;
        if (nf !== undefined) cell.numFmt = nf;
        if (fill !== undefined) cell.fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: hexToArgb(fill) } };
        if (font !== undefined || bold) cell.font = { ...(font !== undefined ? { color: { argb: hexToArgb(font) } } : {}), ...(bold ? { bold: true } : {}) };
        if (wrap) cell.alignment = { wrapText: true };
      }
    }
    for (const [c, w] of s.widths) ws.getColumn(c + 1).width = pointsToChars(w);
    for (const m of s.merges) ws.mergeCells(formatRect(m));
    s.cfs.forEach((cf, i) => {
      const style: Record<string, unknown> = {};
      if (cf.fill) style.fill = { type: 'pattern', pattern: 'solid', bgColor: { argb: hexToArgb(cf.fill) } };
      if (cf.font || cf.bold !== null) style.font = { ...(cf.font ? { color: { argb: hexToArgb(cf.font) } } : {}), ...(cf.bold !== null ? { bold: cf.bold } : {}) };
      ws.addConditionalFormatting({
        ref: cf.rects.map(formatRect).join(' '),
        rules: [{ type: 'expression', priority: i + 1, formulae: [cf.formula.replace(/^=/, '')], style } as unknown as ExcelJS.ConditionalFormattingRule],
      });
    });
    for (const v of s.validations) {
      const src = v.rule.list.source;
      const formulae = [src.startsWith('=') ? src.slice(1) : `"${src}"`];
      for (const r of v.rects) {
        internals(ws).dataValidations.add(formatRect(r), { type: 'list', allowBlank: v.ignoreBlanks, formulae });
      }
    }
  }
  return wb;
}

