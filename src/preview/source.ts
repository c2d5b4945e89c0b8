/** What the preview grid reads from a workbook: implemented over the sandbox in sandboxSource.ts. */
export interface GridSelection {
  readonly sheet: string;
  /** Active cell. */
  readonly row: number;
  readonly col: number;
  /** Selected area (inclusive, 0-based). */
  readonly r0: number;
  readonly c0: number;
  readonly r1: number;
  readonly c1: number;
}

export interface GridSource {
  sheetNames(): readonly string[];
  /** Used size of a sheet (rows x columns from A1), 0 x 0 when empty. */
  size(sheet: string): { readonly rows: number; readonly cols: number };
  columnWidths(sheet: string, cols: number): readonly number[];
  columnName(col: number): string;
  /** Text as the cell shows it. */
  text(sheet: string, row: number, col: number): string;
  isNumber(sheet: string, row: number, col: number): boolean;
  /** Colours from conditional formats / fills ("#RRGGBB"), or null. */
  highlight(sheet: string, row: number, col: number): { fill: string | null; font: string | null; bold: boolean | null } | null;
  /** The dropdown list of a list-validated cell, or null. */
  validation(sheet: string, row: number, col: number): readonly string[] | null;
  selection(): GridSelection | null;
}
