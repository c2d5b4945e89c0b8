/**
 * Inserting and deleting cells (Range.insert / Range.delete): cells, tables, conditional formats,
 * validations, same-sheet references in formulas and the selection move as in Excel.
 *
 * Pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import { MAX_COLS, MAX_ROWS, type Rect, rect, intersect, subtract, columnLetters } from './address.js';
import { rewriteReferences } from './formula.js';
import { SandboxError } from './errors.js';
import { ATTRS, type Attr, type SheetModel, type SelectionModel, type TableModel } from './sheet-model.js';

/** What a shift needs of the workbook model. */
export interface ShiftTarget {
  selection: SelectionModel;
  touch(s: SheetModel): void;
  /** Replace an attribute array by a private copy (structural changes); returns the copy. */
  freshen(s: SheetModel, c: number, attr: Attr): unknown[] | undefined;
  setAttr(s: SheetModel, r: number, c: number, attr: Attr, value: unknown): void;
  isEmptyCell(s: SheetModel, r: number, c: number, valuesOnly: boolean): boolean;
}

export function shiftCells(m: ShiftTarget, s: SheetModel, rr: Rect, op: ShiftOp): void {
  const mover = makeMover(rr, op);
  // 1. Validate tables first (no change yet).
  const newTables: TableModel[] = [];
  for (const t of s.tables) {
    const moved = mover.rect(t.rect);
    if (moved === 'conflict') throw new SandboxError('InvalidOperation', `This operation would move part of the table "${t.name}"; insert or delete whole table rows or columns instead.`, 'Range.insert');
    if (moved === null) continue;
    if (t.showHeaders && moved.r0 !== mover.point(t.rect.r0, t.rect.c0)?.row && (op === 'deleteUp')) {
      // Header row deleted while rows remain.
      throw new SandboxError('InvalidOperation', `This operation would delete the header row of table "${t.name}".`, 'Range.delete');
    }
    newTables.push({ ...t, rect: moved });
  }
  // 2. Overflow check.
  const usedCols = s.cols.length;
  if (op === 'insertDown') {
    const limit = MAX_ROWS - rr.rows;
    for (let c = rr.c0; c < Math.min(rr.c0 + rr.cols, usedCols); c++) {
      for (const a of ATTRS) {
        const arr = s.cols[c]?.[a] as unknown[] | undefined;
        if (!arr) continue;
        for (let r = Math.max(limit, rr.r0); r < arr.length; r++) if (arr[r] !== undefined) {
          throw new SandboxError('NonBlankCellOffSheet', `Inserting ${rr.rows} row(s) would push non-empty cells in ${columnLetters(c)} off the sheet.`, 'Range.insert');
        }
      }
    }
  } else if (op === 'insertRight') {
    for (let c = Math.max(MAX_COLS - rr.cols, rr.c0); c < usedCols; c++) {
      for (let r = rr.r0; r < rr.r0 + rr.rows; r++) if (!m.isEmptyCell(s, r, c, false)) {
        throw new SandboxError('NonBlankCellOffSheet', `Inserting ${rr.cols} column(s) would push non-empty cells past column XFD.`, 'Range.insert');
      }
      if (!s.cols[c]) continue;
    }
  }
  m.touch(s);
  // 3. Move cells.
  const fullCols = rr.r0 === 0 && rr.rows === MAX_ROWS;
  if (op === 'insertDown' || op === 'deleteUp') {
    for (let c = rr.c0; c < Math.min(rr.c0 + rr.cols, s.cols.length); c++) {
      for (const a of ATTRS) {
        const arr = m.freshen(s, c, a);
        if (!arr || arr.length <= rr.r0) continue;
        if (op === 'insertDown') {
          insertHoles(arr, rr.r0, rr.rows, MAX_ROWS);
        } else {
          arr.splice(rr.r0, rr.rows);
        }
      }
    }
  } else if (fullCols) {
    if (op === 'insertRight') {
      if (s.cols.length > rr.c0) {
        insertHoles(s.cols, rr.c0, rr.cols, MAX_COLS);
      }
    } else if (s.cols.length > rr.c0) {
      s.cols.splice(rr.c0, rr.cols);
    }
    const w = new Map<number, number>();
    for (const [c, width] of s.widths) {
      const p = mover.point(0, c);
      if (p) w.set(p.col, width);
    }
    s.widths = w;
  } else {
    // Partial rows: move cell by cell within rows r0..r1.
    const last = s.cols.length - 1;
    const rEnd = rr.r0 + rr.rows;
    const moveCell = (from: number, to: number) => {
      for (const a of ATTRS) {
        for (let r = rr.r0; r < rEnd; r++) {
          const arr = s.cols[from]?.[a] as unknown[] | undefined;
          const v = arr ? arr[r] : undefined;
          if (to >= 0 && to < MAX_COLS) m.setAttr(s, r, to, a, v);
        }
      }
    };
    if (op === 'insertRight') {
      for (let c = last; c >= rr.c0; c--) moveCell(c, c + rr.cols);
      for (let c = rr.c0; c < rr.c0 + rr.cols; c++) for (const a of ATTRS) for (let r = rr.r0; r < rEnd; r++) m.setAttr(s, r, c, a, undefined);
    } else {
      for (let c = rr.c0 + rr.cols; c <= last; c++) moveCell(c, c - rr.cols);
      for (let c = Math.max(rr.c0, last - rr.cols + 1); c <= last; c++) for (const a of ATTRS) for (let r = rr.r0; r < rEnd; r++) m.setAttr(s, r, c, a, undefined);
    }
  }
  // 4. Move objects and rewrite same-sheet references.
  s.tables = newTables;
  s.cfs = s.cfs
    .map((cf) => {
      const rects = cf.rects.flatMap((x) => mover.rectSplit(x));
      const anchor = mover.point(cf.anchor.row, cf.anchor.col) ?? (rects[0] ? { row: rects[0].r0, col: rects[0].c0 } : cf.anchor);
      return { ...cf, rects, anchor, formula: rewriteReferences(cf.formula, mover.point) };
    })
    .filter((cf) => cf.rects.length > 0);
  s.validations = s.validations
    .map((v) => ({
      ...v,
      rects: v.rects.flatMap((x) => mover.rectSplit(x)),
      rule: { list: { ...v.rule.list, source: v.rule.list.source.startsWith('=') ? rewriteReferences(v.rule.list.source, mover.point) : v.rule.list.source } },
    }))
    .filter((v) => v.rects.length > 0);
  for (let c = 0; c < s.cols.length; c++) {
    const f = s.cols[c]?.f;
    if (!f) continue;
    for (let r = 0; r < f.length; r++) {
      const x = f[r];
      if (x === undefined) continue;
      const y = rewriteReferences(x, mover.point);
      if (y !== x) { m.setAttr(s, r, c, 'f', y); m.setAttr(s, r, c, 'v', undefined); }
    }
  }
  if (m.selection.sheetId === s.id) {
    const areas = m.selection.areas.flatMap((a) => mover.rectSplit(a));
    m.selection = { sheetId: s.id, areas: areas.length ? areas : [rect(rr.r0, rr.c0, 1, 1)] };
  }
}

/** Insert `n` undefined entries at `at` without spreading (safe for millions), truncating to `max`. */
function insertHoles(arr: unknown[], at: number, n: number, max: number): void {
  const oldLen = arr.length;
  const newLen = Math.min(oldLen + n, max);
  for (let k = oldLen; k < newLen; k++) arr.push(undefined);
  // Move the tail down from the end (copyWithin handles overlap).
  arr.copyWithin(at + n, at, newLen - n);
  arr.fill(undefined, at, Math.min(at + n, newLen));
}

export type ShiftOp = 'insertDown' | 'insertRight' | 'deleteUp' | 'deleteLeft';

interface Mover {
  point: (row: number, col: number) => { row: number; col: number } | null;
  /** Moved rect, null when deleted entirely, 'conflict' when only part of it would move. */
  rect: (x: Rect) => Rect | null | 'conflict';
  /** Moved rect(s), splitting a rect that only partly lies in the shifted band. */
  rectSplit: (x: Rect) => Rect[];
}

/** Geometry of an insert/delete shift. Rows/columns are swapped for the horizontal cases. */
function makeMover(rr: Rect, op: ShiftOp): Mover {
  const vertical = op === 'insertDown' || op === 'deleteUp';
  const insert = op === 'insertDown' || op === 'insertRight';
  // Along = the shift axis; across = the band the shift applies to.
  const a0 = vertical ? rr.r0 : rr.c0;
  const aN = vertical ? rr.rows : rr.cols;
  const b0 = vertical ? rr.c0 : rr.r0;
  const bN = vertical ? rr.cols : rr.rows;
  const maxA = vertical ? MAX_ROWS : MAX_COLS;
  const inBand = (b: number) => b >= b0 && b < b0 + bN;
  const moveA = (a: number): number | null => {
    if (a < a0) return a;
    if (insert) return a + aN < maxA ? a + aN : null;
    if (a < a0 + aN) return null;
    return a - aN;
  };
  const point = (row: number, col: number) => {
    const a = vertical ? row : col;
    const b = vertical ? col : row;
    if (!inBand(b)) return { row, col };
    const na = moveA(a);
    if (na === null) return null;
    return vertical ? { row: na, col } : { row, col: na };
  };
  const toAB = (x: Rect) => (vertical ? { a: x.r0, an: x.rows, b: x.c0, bn: x.cols } : { a: x.c0, an: x.cols, b: x.r0, bn: x.rows });
  const fromAB = (a: number, an: number, b: number, bn: number): Rect => (vertical ? rect(a, b, an, bn) : rect(b, a, bn, an));
  const moveSpan = (a: number, an: number): [number, number] | null => {
    const end = a + an; // exclusive
    if (insert) {
      if (a >= a0) {
        const na = a + aN;
        if (na >= maxA) return null;
        return [na, Math.min(an, maxA - na)];
      }
      if (end > a0) return [a, Math.min(an + aN, maxA - a)]; // insertion inside: expand
      return [a, an];
    }
    const dEnd = a0 + aN;
    const overlap = Math.max(0, Math.min(end, dEnd) - Math.max(a, a0));
    const n = an - overlap;
    if (n <= 0) return null;
    const na = a < a0 ? a : a >= dEnd ? a - aN : a0;
    return [na, n];
  };
  const rectFn = (x: Rect): Rect | null | 'conflict' => {
    const { a, an, b, bn } = toAB(x);
    const bandStart = b0; const bandEnd = b0 + bN;
    if (b + bn <= bandStart || b >= bandEnd) return x;
    if (a + an <= a0) return x; // entirely before the shift point: unaffected
    if (b < bandStart || b + bn > bandEnd) return 'conflict';
    const m = moveSpan(a, an);
    return m ? fromAB(m[0], m[1], b, bn) : null;
  };
  const rectSplit = (x: Rect): Rect[] => {
    const r = rectFn(x);
    if (r === null) return [];
    if (r !== 'conflict') return [r];
    const band = vertical ? rect(0, b0, MAX_ROWS, bN) : rect(b0, 0, bN, MAX_COLS);
    const inside = intersect(x, band);
    const outside = subtract(x, band);
    const moved = inside ? rectFn(inside) : null;
    return [...outside, ...(moved && moved !== 'conflict' ? [moved] : [])];
  };
  return { point, rect: rectFn, rectSplit };
}
