/** The preview grid's view of a SandboxWorkbook, and the demo workbook the page starts with. */
import { demoClaims, DEMO_SHEET } from '../demo/claims.js';
import type { RawCell } from '../scoring/types.js';
import { CellError, columnLetters, parseAddress, sandboxFromRows, type SandboxWorkbook } from '../sandbox/index.js';
import type { GridSelection, GridSource } from './source.js';

const EXCEL_EPOCH = Date.UTC(1899, 11, 30);
const PX_PER_POINT = 4 / 3;
const DEFAULT_WIDTH_PX = 64;

/** Cell text as a spreadsheet would show it, for the few number formats our sinks write. */
export function displayText(value: number | string | boolean, numberFormat: string | undefined): string {
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE';
  if (typeof value === 'string') return value;
  const nf = numberFormat ?? 'General';
  if (/y{2,4}|d{1,2}[-/]m|m{1,2}[-/]d/i.test(nf)) {
    const d = new Date(EXCEL_EPOCH + Math.round(value * 86_400_000));
    return d.toISOString().slice(0, 10);
  }
  const dec = /0\.(0+)/.exec(nf);
  if (dec) {
    const txt = value.toFixed(dec[1].length);
    return nf.includes(',') || nf.includes('#,##') ? Number(txt).toLocaleString('en', { minimumFractionDigits: dec[1].length }) : txt;
  }
  if (nf === '0') return value.toFixed(0);
  if (Number.isInteger(value)) return String(value);
  return String(Number(value.toPrecision(10)));
}

/** Demo rows -> sandbox cells: error values become the sandbox's error objects, Dates stay Dates. */
export function toSandboxRows(headers: readonly string[], rows: readonly (readonly RawCell[])[]): unknown[][] {
  return [
    [...headers],
    ...rows.map((r) =>
      r.map((v) => (v !== null && typeof v === 'object' && !(v instanceof Date) && 'kind' in v ? new CellError(v.code) : v)),
    ),
  ];
}

export function demoSandbox(): SandboxWorkbook {
  const demo = demoClaims();
  const sb = sandboxFromRows(DEMO_SHEET, toSandboxRows(demo.headers, demo.rows));
  const widths: Record<string, number> = { A: 62, B: 92, C: 52, D: 64, E: 62, F: 56, G: 104 };
  for (const [col, w] of Object.entries(widths)) sb.setColumnWidth(DEMO_SHEET, col, w);
  sb.setSelection(DEMO_SHEET, 'A1');
  return sb;
}

export function sandboxSource(sb: SandboxWorkbook): GridSource {
  const known = (name: string) => sb.sheetNames().includes(name);
  return {
    sheetNames: () => sb.sheetNames(),
    size(sheet) {
      return known(sheet) ? sb.usedRange(sheet) : { rows: 0, cols: 0 };
    },
    columnWidths(sheet, cols) {
      const has = known(sheet);
      const out: number[] = [];
      for (let c = 0; c < cols; c++) {
        const w = has ? sb.columnWidth(sheet, c) : null;
        out.push(w === null ? DEFAULT_WIDTH_PX : Math.round(w * PX_PER_POINT));
      }
      return out;
    },
    columnName: (c) => columnLetters(c),
    text(sheet, row, col) {
      const v = sb.valueAt(sheet, row, col);
      if (v === '') return '';
      return displayText(v, sb.cellAt(sheet, row, col)?.numberFormat);
    },
    isNumber: (sheet, row, col) => typeof sb.valueAt(sheet, row, col) === 'number',
    highlight(sheet, row, col) {
      const h = sb.highlightAt(sheet, row, col);
      if (h) return h;
      const c = sb.cellAt(sheet, row, col);
      return c && (c.fill || c.font || c.bold) ? { fill: c.fill ?? null, font: c.font ?? null, bold: c.bold ?? null } : null;
    },
    validation: (sheet, row, col) => sb.validationAt(sheet, row, col),
    selection(): GridSelection | null {
      const first = sb.selection()[0];
      const p = first ? parseAddress(first) : null;
      if (!p || !p.sheet) return null;
      const r = p.rect;
      return { sheet: p.sheet, row: r.r0, col: r.c0, r0: r.r0, c0: r.c0, r1: r.r0 + r.rows - 1, c1: r.c0 + r.cols - 1 };
    },
  };
}

/** A1 address of a 0-based cell or block. */
export function a1(r0: number, c0: number, r1 = r0, c1 = c0): string {
  const tl = `${columnLetters(Math.min(c0, c1))}${Math.min(r0, r1) + 1}`;
  const br = `${columnLetters(Math.max(c0, c1))}${Math.max(r0, r1) + 1}`;
  return tl === br ? tl : `${tl}:${br}`;
}
