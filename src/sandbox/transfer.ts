/**
 * A sandbox workbook in parts that can cross to another thread (structured clone) and be put back
 * together there: the preview page builds a workbook from an .xlsx in a worker and hands it to the
 * page in slices of cells, each applied in its own task. Parts are the snapshot's plain JSON
 * (snapshot.ts) with cells as [row, column, cell] in row order; putting them back gives a workbook
 * whose snapshot equals the original's.
 */
import { columnIndex, parseAddress, type Rect } from './address.js';
import { CellError } from './formula.js';
import { ATTRS, type SheetModel } from './model.js';
import { cellSnapshot, type CellSnapshot, type SheetSnapshot } from './snapshot.js';
import { SandboxWorkbook } from './workbook.js';

/** A sheet without its cells (they come in CellPart slices). */
export type SheetShell = Omit<SheetSnapshot, 'cells'>;

export interface CellPart {
  readonly sheet: string;
  /** [0-based row, 0-based column, what the cell holds], in row order. */
  readonly cells: readonly (readonly [number, number, CellSnapshot])[];
}

export interface WorkbookShell {
  readonly sheets: readonly SheetShell[];
  readonly settings: Readonly<Record<string, unknown>>;
  readonly activeSheet: string;
  readonly selection: { readonly sheet: string; readonly address: string };
  readonly importNotes: readonly string[];
}

/** The workbook's shell, and its cells in parts of at most `cellsPerPart` (row order, whole rows). */
export function toParts(sb: SandboxWorkbook, cellsPerPart: number): { shell: WorkbookShell; parts: CellPart[] } {
  // The snapshot's sheets without their cells (built whole here: this runs in a worker).
  const { sheets, ...rest } = sb.snapshot();
  const snap = { ...rest, sheets: sheets.map(({ cells: _cells, ...shell }) => shell) };
  const parts: CellPart[] = [];
  for (const s of sb.model.sheets) {
    const used = usedColumns(s);
    let cells: [number, number, CellSnapshot][] = [];
    for (let r = 0; r < used.rows; r++) {
      for (const c of used.cols) {
        const cs = cellSnapshot(s, r, c);
        if (cs) cells.push([r, c, cs]);
      }
      if (cells.length >= cellsPerPart) {
        parts.push({ sheet: s.name, cells });
        cells = [];
      }
    }
    if (cells.length > 0) parts.push({ sheet: s.name, cells });
  }
  return { shell: { ...snap, importNotes: [...sb.importNotes] }, parts };
}

function usedColumns(s: SheetModel): { cols: number[]; rows: number } {
  const cols: number[] = [];
  let rows = 0;
  for (let c = 0; c < s.cols.length; c++) {
    const col = s.cols[c];
    if (!col) continue;
    let len = 0;
    for (const a of ATTRS) {
      const arr = col[a] as unknown[] | undefined;
      if (arr && arr.length > len) len = arr.length;
    }
    if (len > 0) {
      cols.push(c);
      rows = Math.max(rows, len);
    }
  }
  return { cols, rows };
}

const rectsOf = (ranges: string): Rect[] =>
  ranges
    .split(',')
    .filter((a) => a !== '')
    .map((a) => {
      const p = parseAddress(a);
      if (!p) throw new RangeError(`transfer: bad range "${a}"`);
      return p.rect;
    });

/** A new workbook with the shell's sheets (empty), ready for `addCells` and `finish`. */
export function fromShell(shell: WorkbookShell): SandboxWorkbook {
  const sb = new SandboxWorkbook();
  const m = sb.model;
  for (const sh of shell.sheets) {
    sb.addSheet(sh.name);
    const s = m.sheetByName(sh.name)!;
    s.visibility = sh.visibility as SheetModel['visibility'];
    s.protected = sh.protected;
    for (const [letters, w] of Object.entries(sh.columnWidths)) s.widths.set(columnIndex(letters), w);
    for (const t of sh.tables) s.tables.push({ id: m.newId('table'), name: t.name, rect: rectsOf(t.address)[0], showHeaders: t.showHeaders });
    for (const cf of sh.conditionalFormats) {
      const rects = rectsOf(cf.ranges);
      s.cfs.push({
        id: m.newId('cf'), type: cf.type as 'Custom', rects, anchor: { row: rects[0].r0, col: rects[0].c0 },
        formula: cf.formula, fill: cf.fill, font: cf.font, bold: cf.bold, stopIfTrue: cf.stopIfTrue,
      });
    }
    for (const v of sh.validations) s.validations.push({ id: m.newId('dv'), rects: rectsOf(v.ranges), rule: { list: { ...v.list } }, ignoreBlanks: v.ignoreBlanks });
  }
  for (const [k, v] of Object.entries(shell.settings)) m.settings.set(k, JSON.stringify(v));
  sb.importNotes.push(...shell.importNotes);
  return sb;
}

/** Put a part's cells in. */
export function addCells(sb: SandboxWorkbook, part: CellPart): void {
  const m = sb.model;
  const s = m.sheetByName(part.sheet);
  if (!s) throw new RangeError(`transfer: no sheet "${part.sheet}"`);
  for (const [r, c, cs] of part.cells) {
    if (cs.value !== undefined) m.setAttr(s, r, c, 'v', typeof cs.value === 'object' ? new CellError(cs.value.error) : cs.value);
    if (cs.formula !== undefined) m.setAttr(s, r, c, 'f', cs.formula);
    if (cs.quotePrefix) m.setAttr(s, r, c, 'qp', true);
    if (cs.numberFormat !== undefined) m.setAttr(s, r, c, 'nf', cs.numberFormat);
    if (cs.fill !== undefined) m.setAttr(s, r, c, 'fill', cs.fill);
    if (cs.font !== undefined) m.setAttr(s, r, c, 'font', cs.font);
    if (cs.bold) m.setAttr(s, r, c, 'bold', true);
    if (cs.wrap) m.setAttr(s, r, c, 'wrap', true);
  }
}

/** The active sheet and the selection, once every part is in. */
export function finish(sb: SandboxWorkbook, shell: WorkbookShell): void {
  const active = sb.model.sheetByName(shell.activeSheet);
  if (active) sb.model.activeSheetId = active.id;
  if (shell.selection.sheet && shell.selection.address) sb.setSelection(shell.selection.sheet, shell.selection.address.split(','));
}
