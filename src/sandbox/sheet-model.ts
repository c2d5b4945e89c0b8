/**
 * The sandbox's stored shapes: a sheet's cells per column (one array per attribute per column,
 * never an object per cell), its tables, conditional formats and validations, and the selection.
 *
 * Pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import type { Rect } from './address.js';
import type { CellError } from './formula.js';

/** What a cell stores as its value: a scalar, an error, or undefined (empty / formula not yet computed). */
export type StoredValue = number | string | boolean | CellError | undefined;

export interface ColumnData {
  /** Values (cached results for formula cells, when known). */
  v?: StoredValue[];
  /** Formulas ("=..."), undefined for constants. */
  f?: (string | undefined)[];
  /** Number formats; undefined = "General". */
  nf?: (string | undefined)[];
  /** Fill colour "#RRGGBB"; undefined = no fill. */
  fill?: (string | undefined)[];
  /** Font colour "#RRGGBB"; undefined = automatic (black). */
  font?: (string | undefined)[];
  bold?: (boolean | undefined)[];
  wrap?: (boolean | undefined)[];
  /** Quote prefix: text entered with a leading apostrophe. */
  qp?: (boolean | undefined)[];
}

export type Attr = keyof ColumnData;
export const ATTRS: readonly Attr[] = ['v', 'f', 'nf', 'fill', 'font', 'bold', 'wrap', 'qp'];
export const CONTENT_ATTRS: readonly Attr[] = ['v', 'f', 'qp'];
export const FORMAT_ATTRS: readonly Attr[] = ['nf', 'fill', 'font', 'bold', 'wrap'];

/** Excel's default column width in points (8.43 characters, 64 px). */
export const DEFAULT_COLUMN_WIDTH = 48;

export interface TableModel {
  readonly id: string;
  name: string;
  rect: Rect;
  showHeaders: boolean;
}

export interface ConditionalFormatModel {
  readonly id: string;
  readonly type: 'Custom';
  rects: Rect[];
  /** Cell the formula's relative references are written against (top-left of the range it was added to). */
  anchor: { row: number; col: number };
  formula: string;
  fill: string | null;
  font: string | null;
  bold: boolean | null;
  stopIfTrue: boolean;
}

export interface ListRule {
  readonly list: { readonly source: string; readonly inCellDropDown: boolean };
}

export interface ValidationModel {
  readonly id: string;
  rects: Rect[];
  rule: ListRule;
  ignoreBlanks: boolean;
}

export class SheetModel {
  cols: (ColumnData | undefined)[] = [];
  widths = new Map<number, number>();
  tables: TableModel[] = [];
  /** In priority order: index 0 is priority 0 (evaluated first). */
  cfs: ConditionalFormatModel[] = [];
  validations: ValidationModel[] = [];
  /** Merged areas (set up by tests and the ExcelJS bridge; the layer never merges). */
  merges: Rect[] = [];
  protected = false;
  visibility: 'Visible' | 'Hidden' | 'VeryHidden' = 'Visible';
  constructor(readonly id: string, public name: string) {}
}

export interface SelectionModel {
  sheetId: string;
  areas: Rect[];
}

/** The workbook-wide state a transaction saves and restores. */
export interface WorkbookState {
  sheets: SheetModel[];
  settings: Map<string, string>;
  selection: SelectionModel;
  activeSheetId: string;
  nextId: number;
}
