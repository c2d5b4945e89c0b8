/**
 * A1 address helpers for the workbook layer (pure; no Excel calls).
 * Grid limits are Excel's: 1,048,576 rows, 16,384 columns (A..XFD).
 */

export const MAX_ROWS = 1_048_576;
export const MAX_COLUMNS = 16_384;
/** Characters a cell holds (Excel's specifications and limits: 32,767). */
export const MAX_CELL_TEXT = 32_767;

import { columnLetters, columnFromLetters } from '../report/columns.js';

export { columnLetters, columnFromLetters };

/** A sheet name as it appears in an address: quoted when it is not a plain word. */
export function quoteSheet(name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_.]*$/.test(name) && !/^[A-Za-z]{1,3}[0-9]+$/.test(name)
    ? name
    : `'${name.replace(/'/g, "''")}'`;
}

export interface GridRect {
  /** 0-based first row. */
  readonly row: number;
  /** 0-based first column. */
  readonly column: number;
  readonly rowCount: number;
  readonly columnCount: number;
}

/** "Sheet!A1:H5001" for a rectangle. */
export function rectAddress(sheet: string, r: GridRect): string {
  const a = `${columnLetters(r.column)}${r.row + 1}`;
  const single = r.rowCount === 1 && r.columnCount === 1;
  const b = `${columnLetters(r.column + r.columnCount - 1)}${r.row + r.rowCount}`;
  return `${quoteSheet(sheet)}!${single ? a : `${a}:${b}`}`;
}

/**
 * Parse "Sheet!A1:H5001", "'My sheet'!B2", "A1:C3" into sheet name and rectangle.
 * Whole-column / whole-row forms ("A:C", "2:5") are expanded to the grid edge.
 * Returns null when it is not a single-area A1 address.
 */
export function parseAddress(address: string): { sheet: string | null; rect: GridRect } | null {
  let sheet: string | null = null;
  let ref = address.trim();
  const bang = ref.lastIndexOf('!');
  if (bang >= 0) {
    let s = ref.slice(0, bang);
    if (s.startsWith("'") && s.endsWith("'")) s = s.slice(1, -1).replace(/''/g, "'");
    sheet = s;
    ref = ref.slice(bang + 1);
  }
  if (ref.includes(',')) return null;
  const parts = ref.replace(/\$/g, '').split(':');
  if (parts.length < 1 || parts.length > 2) return null;
  const cells = parts.map(parseCellRef);
  if (cells.some((c) => c === null)) return null;
  const [a, b] = [cells[0]!, cells[cells.length - 1]!];
  const r0 = Math.min(a.row ?? 0, b.row ?? 0);
  const r1 = Math.max(a.row ?? MAX_ROWS - 1, b.row ?? MAX_ROWS - 1);
  const c0 = Math.min(a.column ?? 0, b.column ?? 0);
  const c1 = Math.max(a.column ?? MAX_COLUMNS - 1, b.column ?? MAX_COLUMNS - 1);
  return { sheet, rect: { row: r0, column: c0, rowCount: r1 - r0 + 1, columnCount: c1 - c0 + 1 } };
}

function parseCellRef(s: string): { row: number | null; column: number | null } | null {
  const m = /^([A-Za-z]{0,3})([0-9]{0,7})$/.exec(s);
  if (!m || (m[1] === '' && m[2] === '')) return null;
  const column = m[1] === '' ? null : columnFromLetters(m[1]);
  const row = m[2] === '' ? null : Number(m[2]) - 1;
  if (column !== null && (column < 0 || column >= MAX_COLUMNS)) return null;
  if (row !== null && (row < 0 || row >= MAX_ROWS)) return null;
  return { row, column };
}
