/**
 * Range.getCellProperties / Range.setCellProperties (ExcelApi 1.9) for the formats the sandbox
 * stores per cell: font bold and colour, fill colour and wrap. Other properties fail with
 * NotImplemented, so a caller that needs more sees it.
 */
import { err, type RangeTarget } from './proxy-base.js';
import { normaliseColour, type WorkbookModel } from './model.js';

/** What getCellProperties may be asked for (a subset of Excel.CellPropertiesLoadOptions). */
interface LoadOptions {
  format?: { font?: { bold?: boolean; color?: boolean }; fill?: { color?: boolean }; wrapText?: boolean };
}

/** One cell's answer / input (a subset of Excel.CellProperties / SettableCellProperties). */
interface CellProps {
  format?: { font?: { bold?: boolean; color?: string }; fill?: { color?: string }; wrapText?: boolean };
}

const where = 'Range.getCellProperties';

function onlyKeys(o: unknown, allowed: readonly string[], at: string): Record<string, unknown> {
  if (o === undefined || o === null) return {};
  if (typeof o !== 'object' || Array.isArray(o)) throw err('InvalidArgument', `${at}: expected an object.`, at);
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) throw err('NotImplemented', `${at}: "${k}" is not modelled by the sandbox (only ${allowed.join(', ')}).`, at);
  }
  return o as Record<string, unknown>;
}

/** Excel's answer for each cell of the range: no fill reads "#FFFFFF", automatic font colour "#000000". */
export function readCellProperties(m: WorkbookModel, t: RangeTarget, options: unknown): CellProps[][] {
  const o = onlyKeys(options, ['format'], where) as LoadOptions;
  const f = onlyKeys(o.format, ['font', 'fill', 'wrapText'], `${where} format`) as NonNullable<LoadOptions['format']>;
  const font = onlyKeys(f.font, ['bold', 'color'], `${where} format.font`) as { bold?: boolean; color?: boolean };
  const fill = onlyKeys(f.fill, ['color'], `${where} format.fill`) as { color?: boolean };
  const out: CellProps[][] = [];
  for (let i = 0; i < t.rect.rows; i++) {
    const row: CellProps[] = [];
    for (let j = 0; j < t.rect.cols; j++) {
      const r = t.rect.r0 + i;
      const c = t.rect.c0 + j;
      const cell: CellProps = {};
      if (o.format) {
        const fmt: NonNullable<CellProps['format']> = {};
        if (f.font) {
          fmt.font = {};
          if (font.bold) fmt.font.bold = m.getAttr(t.sheet, r, c, 'bold') === true;
          if (font.color) fmt.font.color = m.getAttr(t.sheet, r, c, 'font') ?? '#000000';
        }
        if (f.fill && fill.color) fmt.fill = { color: m.getAttr(t.sheet, r, c, 'fill') ?? '#FFFFFF' };
        if (f.wrapText) fmt.wrapText = m.getAttr(t.sheet, r, c, 'wrap') === true;
        cell.format = fmt;
      }
      row.push(cell);
    }
    out.push(row);
  }
  return out;
}

/** Apply per-cell properties; the array must have the range's shape (Excel: InvalidArgument otherwise). */
export function writeCellProperties(m: WorkbookModel, t: RangeTarget, data: unknown): void {
  const at = 'Range.setCellProperties';
  if (!Array.isArray(data) || data.length !== t.rect.rows || data.some((row) => !Array.isArray(row) || row.length !== t.rect.cols)) {
    throw err('InvalidArgument', `${at}: the array must have ${t.rect.rows} row(s) of ${t.rect.cols} cell(s).`, at);
  }
  const rows = data as unknown[][];
  // Check every cell first, so a bad one leaves the range untouched.
  const planned: { r: number; c: number; bold?: boolean; font?: string; fill?: string; wrap?: boolean }[] = [];
  for (let i = 0; i < t.rect.rows; i++) {
    for (let j = 0; j < t.rect.cols; j++) {
      const cell = onlyKeys(rows[i][j], ['format'], at) as CellProps;
      const f = onlyKeys(cell.format, ['font', 'fill', 'wrapText'], `${at} format`) as NonNullable<CellProps['format']>;
      const font = onlyKeys(f.font, ['bold', 'color'], `${at} format.font`) as { bold?: boolean; color?: string };
      const fill = onlyKeys(f.fill, ['color'], `${at} format.fill`) as { color?: string };
      planned.push({
        r: t.rect.r0 + i,
        c: t.rect.c0 + j,
        ...(font.bold !== undefined ? { bold: !!font.bold } : {}),
        ...(font.color !== undefined ? { font: normaliseColour(font.color, `${at} format.font.color`) } : {}),
        ...(fill.color !== undefined ? { fill: normaliseColour(fill.color, `${at} format.fill.color`) } : {}),
        ...(f.wrapText !== undefined ? { wrap: !!f.wrapText } : {}),
      });
    }
  }
  for (const p of planned) {
    if (p.bold !== undefined) m.setAttr(t.sheet, p.r, p.c, 'bold', p.bold ? true : undefined);
    if (p.font !== undefined) m.setAttr(t.sheet, p.r, p.c, 'font', p.font);
    if (p.fill !== undefined) m.setAttr(t.sheet, p.r, p.c, 'fill', p.fill);
    if (p.wrap !== undefined) m.setAttr(t.sheet, p.r, p.c, 'wrap', p.wrap ? true : undefined);
  }
}
