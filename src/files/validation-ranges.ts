/**
 * Data validations written back with the ranges they were read with. ExcelJS (4.4.0) reads a
 * validation on "D2:D81" as one entry per cell and, on writing, squeezes alike cells into rectangles
 * after sorting addresses as text ("D10" before "D2"), which gives overlapping ranges ("D10:D81" and
 * "D2:D81"). `compactValidations` regroups the per-cell entries into non-overlapping rectangles
 * (runs of rows per column, then equal runs in adjacent columns joined) keyed by range, which ExcelJS
 * writes as they are. Cost O(cells with a validation x log).
 */
import { columnName } from '../table/names.js';

type Model = Record<string, unknown>;

function decode(address: string): { col: number; row: number } | null {
  const m = /^\$?([A-Z]+)\$?(\d+)$/.exec(address);
  if (!m) return null;
  let col = 0;
  for (const ch of m[1]) col = col * 26 + (ch.charCodeAt(0) - 64);
  return { col: col - 1, row: Number(m[2]) };
}

/** Rewrite `model` (address or range -> validation) in place so that every range is a non-overlapping rectangle. */
export function compactValidations(model: Model): void {
  const groups = new Map<string, { validation: unknown; cells: { col: number; row: number }[] }>();
  for (const [address, validation] of Object.entries(model)) {
    const at = decode(address);
    if (!at) continue; // already a range: kept as it is
    const key = JSON.stringify(validation);
    let g = groups.get(key);
    if (!g) groups.set(key, (g = { validation, cells: [] }));
    g.cells.push(at);
    delete model[address];
  }
  for (const { validation, cells } of groups.values()) {
    // Runs of consecutive rows per column.
    const byCol = new Map<number, number[]>();
    for (const c of cells) {
      const rows = byCol.get(c.col) ?? [];
      rows.push(c.row);
      byCol.set(c.col, rows);
    }
    const runs: { col: number; top: number; bottom: number }[] = [];
    for (const [col, rows] of byCol) {
      rows.sort((a, b) => a - b);
      let top = rows[0];
      for (let i = 1; i <= rows.length; i++) {
        if (i < rows.length && rows[i] === rows[i - 1] + 1) continue;
        runs.push({ col, top, bottom: rows[i - 1] });
        if (i < rows.length) top = rows[i];
      }
    }
    // Join a run with the same rows in the next column.
    runs.sort((a, b) => a.top - b.top || a.bottom - b.bottom || a.col - b.col);
    for (let i = 0; i < runs.length; ) {
      let j = i + 1;
      while (j < runs.length && runs[j].top === runs[i].top && runs[j].bottom === runs[i].bottom && runs[j].col === runs[j - 1].col + 1) j++;
      const { top, bottom } = runs[i];
      const left = columnName(runs[i].col);
      const right = columnName(runs[j - 1].col);
      const ref = top === bottom && left === right ? `${left}${top}` : `${left}${top}:${right}${bottom}`;
      model[ref] = validation;
      i = j;
    }
  }
}
