/**
 * A transaction over the sandbox's workbook state, so a failed sync can be rolled back.
 *
 * Pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import type { Rect } from './address.js';
import type { ColumnData, ConditionalFormatModel, SelectionModel, SheetModel, TableModel, ValidationModel, WorkbookState } from './sheet-model.js';

interface SheetSaved {
  name: string;
  cols: (ColumnData | undefined)[];
  widths: Map<number, number>;
  tables: TableModel[];
  cfs: ConditionalFormatModel[];
  validations: ValidationModel[];
  protected: boolean;
  visibility: SheetModel['visibility'];
}

const cloneRects = (rs: Rect[]): Rect[] => rs.map((r) => ({ ...r }));

/**
 * A transaction over the workbook state. Cell writes are undone from a log (cost proportional to
 * what was written); structural changes copy the affected column arrays first (copy on write).
 */
export class Tx {
  private readonly logArr: unknown[][] = [];
  private readonly logStart: number[] = [];
  private readonly logOld: unknown[][] = [];
  private readonly logLen: number[] = [];
  readonly fresh = new Set<unknown[]>();
  private readonly sheetSaved = new Map<SheetModel, SheetSaved>();
  private readonly wbSaved: { sheets: SheetModel[]; settings: Map<string, string>; selection: SelectionModel; activeSheetId: string; nextId: number };

  constructor(private readonly wb: WorkbookState) {
    this.wbSaved = {
      sheets: [...wb.sheets],
      settings: new Map(wb.settings),
      selection: { sheetId: wb.selection.sheetId, areas: cloneRects(wb.selection.areas) },
      activeSheetId: wb.activeSheetId,
      nextId: wb.nextId,
    };
  }

  touch(s: SheetModel): void {
    if (this.sheetSaved.has(s)) return;
    this.sheetSaved.set(s, {
      name: s.name,
      cols: s.cols.map((c) => (c ? { ...c } : undefined)),
      widths: new Map(s.widths),
      tables: s.tables.map((t) => ({ ...t, rect: { ...t.rect } })),
      cfs: s.cfs.map((c) => ({ ...c, rects: cloneRects(c.rects), anchor: { ...c.anchor } })),
      validations: s.validations.map((v) => ({ ...v, rects: cloneRects(v.rects) })),
      protected: s.protected,
      visibility: s.visibility,
    });
  }

  /** Remember entries [start, start+n) of `arr` (and its length) before they are overwritten. */
  log(arr: unknown[], start: number, n = 1): void {
    if (this.fresh.has(arr)) return;
    this.logArr.push(arr);
    this.logStart.push(start);
    this.logOld.push(start < arr.length ? arr.slice(start, Math.min(start + n, arr.length)) : []);
    this.logLen.push(arr.length);
  }

  rollback(): void {
    for (let k = this.logArr.length - 1; k >= 0; k--) {
      const arr = this.logArr[k];
      const old = this.logOld[k];
      const start = this.logStart[k];
      for (let i = 0; i < old.length; i++) arr[start + i] = old[i];
      if (arr.length !== this.logLen[k]) arr.length = this.logLen[k];
    }
    for (const [s, saved] of this.sheetSaved) {
      s.name = saved.name;
      s.cols = saved.cols;
      s.widths = saved.widths;
      s.tables = saved.tables;
      s.cfs = saved.cfs;
      s.validations = saved.validations;
      s.protected = saved.protected;
      s.visibility = saved.visibility;
    }
    this.wb.sheets = this.wbSaved.sheets;
    this.wb.settings = this.wbSaved.settings;
    this.wb.selection = this.wbSaved.selection;
    this.wb.activeSheetId = this.wbSaved.activeSheetId;
    this.wb.nextId = this.wbSaved.nextId;
  }
}
