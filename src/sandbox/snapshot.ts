/**
 * Plain-JSON snapshots of a sandbox workbook and the differences between two of them, for
 * "nothing lost" and "unchanged by a failed run" checks.
 *
 * Runs in Node and in the browser (no Node-only imports).
 */
import { columnLetters, formatRect } from './address.js';
import { CellError, ATTRS, DEFAULT_COLUMN_WIDTH, type Attr, type SheetModel, type StoredValue, type WorkbookModel } from './model.js';

export interface CellSnapshot {
  value?: number | string | boolean | { error: string };
  formula?: string;
  quotePrefix?: true;
  numberFormat?: string;
  fill?: string;
  font?: string;
  bold?: true;
  wrap?: true;
}

export interface SheetSnapshot {
  name: string;
  position: number;
  visibility: string;
  protected: boolean;
  /** Keyed by A1 address ("B7"); only cells with something stored. */
  cells: Record<string, CellSnapshot>;
  /** Column letters -> width in points, only for columns whose width was set. */
  columnWidths: Record<string, number>;
  tables: { name: string; address: string; showHeaders: boolean }[];
  /** In priority order. */
  conditionalFormats: { priority: number; type: string; ranges: string; formula: string; fill: string | null; font: string | null; bold: boolean | null; stopIfTrue: boolean }[];
  validations: { ranges: string; list: { source: string; inCellDropDown: boolean }; ignoreBlanks: boolean }[];
}

export interface SandboxSnapshot {
  sheets: SheetSnapshot[];
  settings: Record<string, unknown>;
  activeSheet: string;
  selection: { sheet: string; address: string };
}

/** Deep plain-JSON copy of everything the workbook holds, for before/after comparisons. */
export function snapshotOf(m: WorkbookModel): SandboxSnapshot {
  const sheets = m.sheets.map((s, position): SheetSnapshot => {
    const cells: Record<string, CellSnapshot> = {};
    // Row-major over the stored extent of the used columns.
    const used: number[] = [];
    let maxLen = 0;
    for (let c = 0; c < s.cols.length; c++) {
      const col = s.cols[c];
      if (!col) continue;
      let len = 0;
      for (const a of ATTRS) { const arr = col[a] as unknown[] | undefined; if (arr && arr.length > len) len = arr.length; }
      if (len > 0) { used.push(c); if (len > maxLen) maxLen = len; }
    }
    const letters = used.map((c) => columnLetters(c));
    for (let r = 0; r < maxLen; r++) {
      for (let k = 0; k < used.length; k++) {
        const cs = cellSnapshot(s, r, used[k]);
        if (cs) cells[letters[k] + (r + 1)] = cs;
      }
    }
    const columnWidths: Record<string, number> = {};
    // A column set to the standard width looks, prints and reads (RangeFormat.columnWidth) the same
    // as one never set, and Excel has no call to un-set a width: such columns are left out.
    for (const [c, w] of [...s.widths].sort((x, y) => x[0] - y[0])) if (w !== DEFAULT_COLUMN_WIDTH) columnWidths[columnLetters(c)] = w;
    return {
      name: s.name, position, visibility: s.visibility, protected: s.protected, cells, columnWidths,
      tables: s.tables.map((t) => ({ name: t.name, address: formatRect(t.rect), showHeaders: t.showHeaders })),
      conditionalFormats: s.cfs.map((cf, priority) => ({
        priority, type: cf.type, ranges: cf.rects.map(formatRect).join(','), formula: cf.formula,
        fill: cf.fill, font: cf.font, bold: cf.bold, stopIfTrue: cf.stopIfTrue,
      })),
      validations: s.validations.map((v) => ({ ranges: v.rects.map(formatRect).join(','), list: { ...v.rule.list }, ignoreBlanks: v.ignoreBlanks })),
    };
  });
  const settings: Record<string, unknown> = {};
  for (const [k, v] of [...m.settings].sort((a, b) => (a[0] < b[0] ? -1 : 1))) settings[k] = JSON.parse(v);
  const selSheet = m.sheetById(m.selection.sheetId) ?? m.sheets[0];
  return {
    sheets, settings,
    activeSheet: m.sheetById(m.activeSheetId)?.name ?? '',
    selection: { sheet: selSheet?.name ?? '', address: m.selection.areas.map(formatRect).join(',') },
  };
}

export function cellSnapshot(s: SheetModel, r: number, c: number): CellSnapshot | null {
  const col = s.cols[c];
  if (!col) return null;
  const get = (a: Attr) => (col[a] as unknown[] | undefined)?.[r];
  const out: CellSnapshot = {};
  const v = get('v') as StoredValue;
  if (v !== undefined) out.value = v instanceof CellError ? { error: v.code } : v;
  const f = get('f') as string | undefined;
  if (f !== undefined) out.formula = f;
  if (get('qp')) out.quotePrefix = true;
  const nf = get('nf') as string | undefined;
  if (nf !== undefined) out.numberFormat = nf;
  const fill = get('fill') as string | undefined;
  if (fill !== undefined) out.fill = fill;
  const font = get('font') as string | undefined;
  if (font !== undefined) out.font = font;
  if (get('bold')) out.bold = true;
  if (get('wrap')) out.wrap = true;
  return Object.keys(out).length ? out : null;
}

/**
 * Human-readable differences between two snapshots ("Claims!B7 value: 12 -> 13",
 * "Claims conditional format 0 added", "setting tailmark.run changed"). Empty when equal.
 */
export function diffSnapshots(before: SandboxSnapshot, after: SandboxSnapshot): string[] {
  const out: string[] = [];
  const j = (x: unknown) => JSON.stringify(x);
  const byName = (ss: SheetSnapshot[]) => new Map(ss.map((s) => [s.name, s]));
  const a = byName(before.sheets);
  const b = byName(after.sheets);
  for (const [name] of a) if (!b.has(name)) out.push(`sheet ${name} removed`);
  for (const [name, sb] of b) {
    const sa = a.get(name);
    if (!sa) { out.push(`sheet ${name} added`); continue; }
    for (const k of ['position', 'visibility', 'protected'] as const) if (sa[k] !== sb[k]) out.push(`sheet ${name} ${k}: ${j(sa[k])} -> ${j(sb[k])}`);
    const keys = new Set([...Object.keys(sa.cells), ...Object.keys(sb.cells)]);
    for (const k of keys) {
      const x = sa.cells[k] ?? {};
      const y = sb.cells[k] ?? {};
      for (const f of new Set([...Object.keys(x), ...Object.keys(y)]) as Set<keyof CellSnapshot>) {
        if (j(x[f]) !== j(y[f])) out.push(`${name}!${k} ${f}: ${j(x[f]) ?? 'none'} -> ${j(y[f]) ?? 'none'}`);
      }
    }
    for (const c of new Set([...Object.keys(sa.columnWidths), ...Object.keys(sb.columnWidths)])) {
      if (sa.columnWidths[c] !== sb.columnWidths[c]) out.push(`${name} column ${c} width: ${sa.columnWidths[c] ?? 'default'} -> ${sb.columnWidths[c] ?? 'default'}`);
    }
    for (const k of ['tables', 'conditionalFormats', 'validations'] as const) {
      const xa = sa[k].map(j);
      const xb = sb[k].map(j);
      for (const x of xa) if (!xb.includes(x)) out.push(`${name} ${k} removed/changed: ${x}`);
      for (const x of xb) if (!xa.includes(x)) out.push(`${name} ${k} added/changed: ${x}`);
    }
  }
  for (const k of new Set([...Object.keys(before.settings), ...Object.keys(after.settings)])) {
    if (j(before.settings[k]) !== j(after.settings[k])) out.push(`setting ${k}: ${j(before.settings[k]) ?? 'none'} -> ${j(after.settings[k]) ?? 'none'}`);
  }
  return out;
}
