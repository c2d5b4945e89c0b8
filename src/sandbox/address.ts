/**
 * A1 address parsing and formatting for the sandbox. Pure; no imports.
 *
 * Grid limits are Excel's: 1,048,576 rows and 16,384 columns (A..XFD).
 */

export const MAX_ROWS = 1_048_576;
export const MAX_COLS = 16_384;

/** A rectangle of cells, 0-based, inclusive of r0/c0, `rows`/`cols` counts (both >= 1). */
export interface Rect {
  readonly r0: number;
  readonly c0: number;
  readonly rows: number;
  readonly cols: number;
}

export function rect(r0: number, c0: number, rows: number, cols: number): Rect {
  return { r0, c0, rows, cols };
}

export function rectEnd(r: Rect): { r1: number; c1: number } {
  return { r1: r.r0 + r.rows - 1, c1: r.c0 + r.cols - 1 };
}

export function inGrid(r: Rect): boolean {
  return (
    Number.isInteger(r.r0) && Number.isInteger(r.c0) && Number.isInteger(r.rows) && Number.isInteger(r.cols) &&
    r.r0 >= 0 && r.c0 >= 0 && r.rows >= 1 && r.cols >= 1 &&
    r.r0 + r.rows <= MAX_ROWS && r.c0 + r.cols <= MAX_COLS
  );
}

/** 0-based column index -> letters ("A", "XFD"). */
export function columnLetters(c: number): string {
  let s = '';
  let n = c + 1;
  while (n > 0) {
    const m = (n - 1) % 26;
    s = String.fromCharCode(65 + m) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

/** Letters -> 0-based column index; -1 when not letters. */
export function columnIndex(letters: string): number {
  if (!/^[A-Za-z]{1,3}$/.test(letters)) return -1;
  let n = 0;
  for (const ch of letters.toUpperCase()) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}

/** Quote a sheet name for an address when Excel would ("My Sheet" -> 'My Sheet'). */
export function quoteSheetName(name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_.]*$/.test(name) && !/^[A-Za-z]{1,3}[0-9]+$/.test(name)
    ? name
    : `'${name.replace(/'/g, "''")}'`;
}

/** Format a rectangle as Excel does in Range.address: "A1", "A1:C5", "A:A" (entire columns), "1:1" (entire rows). */
export function formatRect(r: Rect): string {
  const { r1, c1 } = rectEnd(r);
  if (r.r0 === 0 && r.rows === MAX_ROWS && !(r.c0 === 0 && r.cols === MAX_COLS)) {
    return `${columnLetters(r.c0)}:${columnLetters(c1)}`;
  }
  if (r.c0 === 0 && r.cols === MAX_COLS) {
    return `${r.r0 + 1}:${r1 + 1}`;
  }
  const a = `${columnLetters(r.c0)}${r.r0 + 1}`;
  if (r.rows === 1 && r.cols === 1) return a;
  return `${a}:${columnLetters(c1)}${r1 + 1}`;
}

export function formatAddress(sheet: string, r: Rect): string {
  return `${quoteSheetName(sheet)}!${formatRect(r)}`;
}

export interface ParsedAddress {
  /** Sheet name when the address names one. */
  readonly sheet: string | null;
  readonly rect: Rect;
}

interface Corner {
  readonly row: number | null;
  readonly col: number | null;
}

function parseCorner(s: string): Corner | null {
  const m = /^\$?([A-Za-z]{0,3})\$?([0-9]{0,7})$/.exec(s);
  if (!m) return null;
  const [, letters, digits] = m;
  if (!letters && !digits) return null;
  const col = letters ? columnIndex(letters) : null;
  const row = digits ? Number(digits) - 1 : null;
  if (col !== null && (col < 0 || col >= MAX_COLS)) return null;
  if (row !== null && (row < 0 || row >= MAX_ROWS)) return null;
  return { row, col };
}

/**
 * Parse "Sheet1!A1:C5", "'My sheet'!B2", "A1", "A:A", "A:C", "3:5", with optional `$`.
 * Returns null when the text is not an address inside the grid (the caller raises InvalidArgument).
 */
export function parseAddress(text: string): ParsedAddress | null {
  let s = text.trim();
  let sheet: string | null = null;
  const bang = s.lastIndexOf('!');
  if (bang >= 0) {
    let name = s.slice(0, bang);
    s = s.slice(bang + 1);
    if (name.startsWith("'") && name.endsWith("'") && name.length >= 2) name = name.slice(1, -1).replace(/''/g, "'");
    if (!name) return null;
    sheet = name;
  }
  const parts = s.split(':');
  if (parts.length < 1 || parts.length > 2) return null;
  const a = parseCorner(parts[0]);
  const b = parts.length === 2 ? parseCorner(parts[1]) : a;
  if (!a || !b) return null;
  // Both corners must be the same kind: cell, column-only or row-only.
  const kind = (c: Corner) => (c.row !== null && c.col !== null ? 'cell' : c.col !== null ? 'col' : 'row');
  if (kind(a) !== kind(b)) return null;
  if (parts.length === 1 && kind(a) !== 'cell') return null;
  let r0: number, r1: number, c0: number, c1: number;
  if (kind(a) === 'col') {
    r0 = 0; r1 = MAX_ROWS - 1;
    c0 = Math.min(a.col!, b.col!); c1 = Math.max(a.col!, b.col!);
  } else if (kind(a) === 'row') {
    c0 = 0; c1 = MAX_COLS - 1;
    r0 = Math.min(a.row!, b.row!); r1 = Math.max(a.row!, b.row!);
  } else {
    r0 = Math.min(a.row!, b.row!); r1 = Math.max(a.row!, b.row!);
    c0 = Math.min(a.col!, b.col!); c1 = Math.max(a.col!, b.col!);
  }
  return { sheet, rect: rect(r0, c0, r1 - r0 + 1, c1 - c0 + 1) };
}

export function intersect(a: Rect, b: Rect): Rect | null {
  const r0 = Math.max(a.r0, b.r0);
  const c0 = Math.max(a.c0, b.c0);
  const r1 = Math.min(a.r0 + a.rows, b.r0 + b.rows);
  const c1 = Math.min(a.c0 + a.cols, b.c0 + b.cols);
  if (r1 <= r0 || c1 <= c0) return null;
  return rect(r0, c0, r1 - r0, c1 - c0);
}

export function contains(outer: Rect, inner: Rect): boolean {
  return (
    inner.r0 >= outer.r0 && inner.c0 >= outer.c0 &&
    inner.r0 + inner.rows <= outer.r0 + outer.rows && inner.c0 + inner.cols <= outer.c0 + outer.cols
  );
}

export function containsCell(r: Rect, row: number, col: number): boolean {
  return row >= r.r0 && row < r.r0 + r.rows && col >= r.c0 && col < r.c0 + r.cols;
}

/** a minus b as up to four disjoint rectangles. */
export function subtract(a: Rect, b: Rect): Rect[] {
  const x = intersect(a, b);
  if (!x) return [a];
  const out: Rect[] = [];
  const aEndR = a.r0 + a.rows;
  const aEndC = a.c0 + a.cols;
  const xEndR = x.r0 + x.rows;
  const xEndC = x.c0 + x.cols;
  if (x.r0 > a.r0) out.push(rect(a.r0, a.c0, x.r0 - a.r0, a.cols));
  if (xEndR < aEndR) out.push(rect(xEndR, a.c0, aEndR - xEndR, a.cols));
  if (x.c0 > a.c0) out.push(rect(x.r0, a.c0, x.rows, x.c0 - a.c0));
  if (xEndC < aEndC) out.push(rect(x.r0, xEndC, x.rows, aEndC - xEndC));
  return out;
}

export function sameRect(a: Rect, b: Rect): boolean {
  return a.r0 === b.r0 && a.c0 === b.c0 && a.rows === b.rows && a.cols === b.cols;
}
