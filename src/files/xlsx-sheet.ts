/**
 * One worksheet's XML parsed row by row (the state machine behind `XlsxStream.readSheet`): SAX
 * events in, rows of cells out, plus what follows the cells (merges, conditional formats, data
 * validations as written, autofilter, page setup, headers and footers, and a count of the parts not
 * carried over). Split by concern: cell values (`CellReader`), page setup (`PageSetupReader`), and the
 * dispatcher (`SheetParser`). Cost O(size of the sheet's XML); memory one row.
 */
import { createRequire } from 'node:module';
import type ExcelJS from 'exceljs';
import type { RawCell } from '../scoring/types.js';
import { columnName } from '../table/names.js';

const require = createRequire(import.meta.url);

export interface SaxNode {
  readonly name: string;
  readonly attributes: Record<string, string>;
}

export interface StyleManager {
  getStyleModel(id: number): Partial<ExcelJS.Style> | null;
  getDxfStyle(id: number): unknown;
}

interface PartXform {
  model: unknown;
  parseOpen(node: SaxNode): boolean;
  parseText(text: string): void;
  parseClose(name: string): boolean;
  reconcile?(model: unknown, options: unknown): void;
}

const { slideFormula } = require('exceljs/lib/utils/shared-formula') as { slideFormula: (f: string, from: string, to: string) => string };
const utils = require('exceljs/lib/utils/utils') as {
  isDateFmt(fmt: string | undefined): boolean;
  excelToDate(v: number, date1904?: boolean): Date;
};
const ConditionalFormattingsXform = require('exceljs/lib/xlsx/xform/sheet/cf/conditional-formattings-xform') as new () => PartXform;
const DataValidationsXform = require('exceljs/lib/xlsx/xform/sheet/data-validations-xform') as new () => PartXform & {
  _dataValidation?: Record<string, unknown> & { formulae?: unknown[]; operator?: unknown };
  _address?: string;
};

/** One cell as read. */
export interface StreamCell {
  /** 1-based column. */
  readonly col: number;
  /** Style id in the source workbook (0 = default). */
  readonly s: number;
  /** What to write back. */
  readonly value: ExcelJS.CellValue;
  /** What a source table holds. */
  readonly raw: RawCell;
}

export interface StreamRow {
  /** 1-based sheet row. */
  readonly r: number;
  readonly cells: StreamCell[];
  /** Row style id when the row has its own format (customFormat). */
  readonly s?: number;
  readonly height?: number;
  readonly hidden?: boolean;
  readonly outlineLevel?: number;
}

export interface StreamColumn {
  readonly min: number;
  readonly max: number;
  readonly width?: number;
  readonly s?: number;
  readonly hidden?: boolean;
  readonly outlineLevel?: number;
}

export interface SheetHead {
  readonly columns: readonly StreamColumn[];
  /** Frozen panes (xSplit columns, ySplit rows) when the sheet has them. */
  readonly frozen?: { readonly xSplit: number; readonly ySplit: number };
  readonly showGridLines?: boolean;
  readonly tabColor?: string;
}

export interface SheetTail {
  readonly merges: readonly string[];
  readonly conditionalFormattings: readonly ExcelJS.ConditionalFormattingOptions[];
  /** Data validations by range (as written in the file, not expanded to cells). */
  readonly dataValidations: readonly { readonly ranges: readonly string[]; readonly validation: ExcelJS.DataValidation }[];
  readonly autoFilter?: string;
  /** Page setup and margins (ExcelJS PageSetup fields), when the sheet has them. */
  readonly pageSetup?: Partial<ExcelJS.PageSetup>;
  /** Print headers and footers (ExcelJS HeaderFooter fields), when the sheet has them. */
  readonly headerFooter?: Partial<ExcelJS.HeaderFooter>;
  /** Parts of the sheet this reader does not carry over, with how many were found. */
  readonly notCarried: ReadonlyMap<string, number>;
}

export interface SheetHandlers {
  /** Columns, panes: called once, before the first row. */
  onHead?(head: SheetHead): void;
  /** Each row in order; return false to stop reading this sheet (the rest is skipped). */
  onRow?(row: StreamRow): void | boolean;
  /** Awaited after each parsed chunk of the sheet's XML (lets a writer wait for its output to drain). */
  afterChunk?(): Promise<void> | void;
}

/** Parts we recognise but do not carry over, by element name -> words for the notes. */
export const NOT_CARRIED: Record<string, string> = {
  hyperlink: 'hyperlink target(s) (the link text is kept)',
  legacyDrawing: 'cell comments / notes',
  drawing: 'pictures, charts or shapes',
  tablePart: 'Excel tables (the cells are kept, the table object is not)',
  extLst: 'extended rules (newer conditional-format or validation features stored as extensions)',
  sheetProtection: 'sheet protection',
  printOptions: 'print options (gridlines, headings, centring on the page)',
  rowBreaks: 'page breaks',
  colBreaks: 'page breaks',
  picture: 'sheet background picture',
  inlineRichText: 'inline rich-text cell(s): formatting inside them (the text is kept)',
  sharedRichText: 'rich-text cell(s): RGB colours and strikethrough of parts of their text (the text, bold, italic, underline, size, font and theme colours are kept)',
};

function decodeRef(ref: string): { col: number; row: number } {
  let i = 0;
  let col = 0;
  while (i < ref.length) {
    const c = ref.charCodeAt(i);
    if (c >= 65 && c <= 90) col = col * 26 + (c - 64);
    else if (c >= 97 && c <= 122) col = col * 26 + (c - 96);
    else if (c !== 36) break; // skip $
    i++;
  }
  return { col, row: parseInt(ref.slice(i).replace('$', ''), 10) };
}

const count = (m: Map<string, number>, k: string) => m.set(k, (m.get(k) ?? 0) + 1);

/** What the cell reader needs from the workbook. */
export interface WorkbookParts {
  readonly sharedStrings: readonly (string | { richText: { text: string }[] })[];
  readonly styles: StyleManager;
  readonly date1904: boolean;
}

/**
 * The cell being read (`<c>` with its `<f>`, `<v>`, inline `<is><t>`) and its conversion to a value
 * to write back and a RawCell: shared strings, inline strings, booleans, errors, dates by number
 * format, formulas with their cached result (shared formulas expanded per cell).
 */
class CellReader {
  ref = '';
  col = 0;
  s = 0;
  t = '';
  fText: string | null = null;
  fAttrs: Record<string, string> | null = null;
  vText: string | null = null;
  isText: string | null = null;
  inlineRich = false;
  /** Shared formulas: si -> master formula and address. */
  private readonly shared = new Map<string, { formula: string; address: string }>();
  private readonly isDate = new Map<number, boolean>();

  constructor(private readonly wb: WorkbookParts, private readonly notCarried: Map<string, number>) {}

  start(ref: string, col: number, a: Record<string, string>): void {
    this.ref = ref;
    this.col = col;
    this.s = a.s ? parseInt(a.s, 10) : 0;
    this.t = a.t ?? '';
    this.fText = null;
    this.fAttrs = null;
    this.vText = null;
    this.isText = null;
    this.inlineRich = false;
  }

  private dateStyle(s: number): boolean {
    let d = this.isDate.get(s);
    if (d === undefined) {
      d = s > 0 && utils.isDateFmt(this.wb.styles.getStyleModel(s)?.numFmt);
      this.isDate.set(s, d);
    }
    return d;
  }

  /** The stored value (a formula's cached result), as RawCell and as a value to write back. */
  private plain(): { raw: RawCell; value: ExcelJS.CellValue } {
    const { t, vText } = this;
    if (t === 's') {
      if (vText === null) return { raw: null, value: null };
      const sv = this.wb.sharedStrings[parseInt(vText, 10)];
      if (sv === undefined || sv === null) return { raw: null, value: null };
      if (typeof sv === 'string') return { raw: sv === '' ? null : sv, value: sv };
      const text = sv.richText.map((r) => r.text ?? '').join('');
      // ExcelJS's shared-string reader (4.4.0) drops run colours given as rgb and strikethrough.
      count(this.notCarried, 'sharedRichText');
      return { raw: text === '' ? null : text, value: sv };
    }
    if (t === 'inlineStr') {
      const s = this.isText ?? '';
      return { raw: s === '' ? null : s, value: s };
    }
    if (vText === null) return { raw: null, value: null };
    // saxes has already decoded entities (decoding again, as ExcelJS's reader does, would turn a
    // literal "&lt;" into "<").
    if (t === 'str') return { raw: vText === '' ? null : vText, value: vText };
    if (t === 'b') {
      const b = parseInt(vText, 10) !== 0;
      return { raw: b, value: b };
    }
    if (t === 'e') return { raw: { kind: 'error', code: vText }, value: { error: vText as ExcelJS.CellErrorValue['error'] } };
    if (t === 'd') {
      const d = new Date(vText);
      return { raw: d, value: d };
    }
    const x = parseFloat(vText);
    if (this.dateStyle(this.s)) {
      const d = utils.excelToDate(x, this.wb.date1904);
      // The stored serial is written back as it was (its date format is kept), except in a 1904
      // workbook: the writer uses the 1900 system, so the date itself is written.
      return { raw: d, value: this.wb.date1904 ? d : x };
    }
    return { raw: x, value: x };
  }

  /** The finished cell, or null when it holds nothing worth writing back. */
  finish(): StreamCell | null {
    const result = this.plain();
    let value = result.value;
    if (this.fText !== null || this.fAttrs !== null) {
      let formula = this.fText ?? '';
      const t = this.fAttrs?.t;
      const si = this.fAttrs?.si;
      if (t === 'shared' && si !== undefined) {
        const master = this.shared.get(si);
        if (formula !== '') this.shared.set(si, { formula, address: this.ref });
        else if (master) formula = slideFormula(master.formula, master.address, this.ref);
      }
      const res = result.value === null ? undefined : (result.value as ExcelJS.CellFormulaValue['result']);
      if (formula === '') value = result.value; // a formula we cannot rebuild: keep its last value
      else if (t === 'array' && this.fAttrs?.ref) {
        value = { formula, shareType: 'array', ref: this.fAttrs.ref, result: res } as unknown as ExcelJS.CellValue;
      } else value = res === undefined ? { formula } : { formula, result: res };
    }
    return value !== null || this.s > 0 ? { col: this.col, s: this.s, value, raw: result.raw } : null;
  }
}

const HF_PARTS = new Set(['oddHeader', 'oddFooter', 'evenHeader', 'evenFooter', 'firstHeader', 'firstFooter']);

/** Page setup, margins, print headers and footers. */
class PageSetupReader {
  pageSetup: Record<string, unknown> | undefined;
  headerFooter: Record<string, unknown> | undefined;
  private hfPart: string | null = null;

  /** Handles an opening tag of page setup; false when the tag is not one of them. */
  open(name: string, a: Record<string, string>): boolean {
    const num = (v: string | undefined): number | undefined => (v === undefined || v === '' || !Number.isFinite(Number(v)) ? undefined : Number(v));
    switch (name) {
      case 'pageSetUpPr':
        if (a.fitToPage === '1' || a.fitToPage === 'true') (this.pageSetup ??= {}).fitToPage = true;
        return true;
      case 'pageMargins': {
        const m: Record<string, number> = {};
        for (const k of ['left', 'right', 'top', 'bottom', 'header', 'footer']) {
          const v = num(a[k]);
          if (v !== undefined) m[k] = v;
        }
        (this.pageSetup ??= {}).margins = m;
        return true;
      }
      case 'pageSetup': {
        const ps = (this.pageSetup ??= {});
        if (a.orientation === 'landscape' || a.orientation === 'portrait') ps.orientation = a.orientation;
        for (const k of ['paperSize', 'scale', 'fitToWidth', 'fitToHeight', 'horizontalDpi', 'verticalDpi', 'firstPageNumber']) {
          const v = num(a[k]);
          if (v !== undefined) ps[k] = v;
        }
        if (a.pageOrder === 'overThenDown' || a.pageOrder === 'downThenOver') ps.pageOrder = a.pageOrder;
        if (a.blackAndWhite === '1') ps.blackAndWhite = true;
        if (a.draft === '1') ps.draft = true;
        return true;
      }
      case 'headerFooter':
        this.headerFooter = {};
        if (a.differentFirst === '1') this.headerFooter.differentFirst = true;
        if (a.differentOddEven === '1') this.headerFooter.differentOddEven = true;
        return true;
      default:
        if (HF_PARTS.has(name)) {
          if (this.headerFooter) {
            this.hfPart = name;
            this.headerFooter[name] = '';
          }
          return true;
        }
        return false;
    }
  }

  /** Takes text inside a header or footer part; false when not inside one. */
  text(text: string): boolean {
    if (this.hfPart === null || !this.headerFooter) return false;
    const sofar = this.headerFooter[this.hfPart];
    this.headerFooter[this.hfPart] = (typeof sofar === 'string' ? sofar : '') + text;
    return true;
  }

  /** Handles a closing tag; false when it is not a header or footer part. */
  close(name: string): boolean {
    if (!HF_PARTS.has(name)) return false;
    this.hfPart = null;
    return true;
  }
}

/** The state machine: feed it SAX events (`open`, `text`, `close`), then take `tail()`. */
export class SheetParser {
  private readonly columns: StreamColumn[] = [];
  private readonly head: { frozen?: { xSplit: number; ySplit: number }; showGridLines?: boolean; tabColor?: string } = {};
  private headSent = false;
  private readonly merges: string[] = [];
  private readonly notCarried = new Map<string, number>();
  private readonly cf = new ConditionalFormattingsXform();
  private inCf = false;
  private readonly dv = new DataValidationsXform();
  private inDv = false;
  private readonly dataValidations: { ranges: string[]; validation: ExcelJS.DataValidation }[] = [];
  private autoFilter: string | undefined;
  private extDepth = 0;
  private readonly setup = new PageSetupReader();
  private readonly cell: CellReader;
  private inData = false;
  private rowNo = 0;
  private row: { r: number; cells: StreamCell[]; s?: number; height?: number; hidden?: boolean; outlineLevel?: number } | null = null;
  private lastCol = 0;
  private textTarget: 'f' | 'v' | 't' | null = null;

  constructor(private readonly wb: WorkbookParts, private readonly handlers: SheetHandlers) {
    this.cf.model = [];
    this.cell = new CellReader(wb, this.notCarried);
  }

  /** Columns and panes go out once, before the first row (or at the end for a sheet without rows). */
  sendHead(): void {
    if (this.headSent) return;
    this.headSent = true;
    this.handlers.onHead?.({ columns: this.columns, ...this.head });
  }

  open(node: SaxNode): void {
    if (this.extDepth > 0) {
      this.extDepth++;
      return;
    }
    if (this.inCf) {
      this.cf.parseOpen(node);
      return;
    }
    if (this.inDv) {
      if (node.name === 'dataValidation' || node.name === 'formula1' || node.name === 'formula2') this.dv.parseOpen(node);
      return;
    }
    if (this.openCellPart(node.name, node.attributes)) return;
    if (this.openSheetPart(node)) return;
    if (this.setup.open(node.name, node.attributes)) return;
    if (node.name in NOT_CARRIED) count(this.notCarried, node.name);
  }

  /** Rows, cells and their parts; false when the tag is none of them. */
  private openCellPart(name: string, a: Record<string, string>): boolean {
    const c = this.cell;
    switch (name) {
      case 'c': {
        if (!this.row) return true;
        let ref = a.r ?? '';
        let col: number;
        if (ref) col = decodeRef(ref).col;
        else {
          col = this.lastCol + 1;
          ref = `${columnName(col - 1)}${this.row.r}`;
        }
        this.lastCol = col;
        c.start(ref, col, a);
        this.textTarget = null;
        return true;
      }
      case 'v':
        c.vText = '';
        this.textTarget = 'v';
        return true;
      case 'f':
        c.fText = '';
        c.fAttrs = a;
        this.textTarget = 'f';
        return true;
      case 'r':
        if (this.row && c.t === 'inlineStr' && !c.inlineRich) {
          c.inlineRich = true;
          count(this.notCarried, 'inlineRichText');
        }
        return true;
      case 't':
        if (c.t === 'inlineStr') {
          if (c.isText === null) c.isText = '';
          this.textTarget = 't';
        }
        return true;
      case 'row': {
        if (!this.inData) return true;
        this.rowNo = a.r ? parseInt(a.r, 10) : this.rowNo + 1;
        this.lastCol = 0;
        const row: NonNullable<SheetParser['row']> = { r: this.rowNo, cells: [] };
        if (a.s && a.customFormat !== undefined && a.customFormat !== '0' && a.customFormat !== 'false') row.s = parseInt(a.s, 10);
        if (a.ht && a.customHeight !== undefined && a.customHeight !== '0' && a.customHeight !== 'false') row.height = parseFloat(a.ht);
        if (a.hidden === '1' || a.hidden === 'true') row.hidden = true;
        if (a.outlineLevel) row.outlineLevel = parseInt(a.outlineLevel, 10);
        this.row = row;
        return true;
      }
      case 'sheetData':
        this.sendHead();
        this.inData = true;
        return true;
      default:
        return false;
    }
  }

  /** Columns, views, merges, rules, validations, filter, extensions; false when none of them. */
  private openSheetPart(node: SaxNode): boolean {
    const a = node.attributes;
    switch (node.name) {
      case 'col':
        this.columns.push({
          min: parseInt(a.min, 10),
          max: parseInt(a.max, 10),
          ...(a.width !== undefined && a.customWidth !== '0' ? { width: parseFloat(a.width) } : {}),
          ...(a.style ? { s: parseInt(a.style, 10) } : {}),
          ...(a.hidden === '1' || a.hidden === 'true' ? { hidden: true } : {}),
          ...(a.outlineLevel ? { outlineLevel: parseInt(a.outlineLevel, 10) } : {}),
        });
        return true;
      case 'sheetView':
        if (a.showGridLines === '0' || a.showGridLines === 'false') this.head.showGridLines = false;
        return true;
      case 'pane':
        if (a.state === 'frozen' || a.state === 'frozenSplit') {
          this.head.frozen = { xSplit: parseInt(a.xSplit ?? '0', 10) || 0, ySplit: parseInt(a.ySplit ?? '0', 10) || 0 };
        }
        return true;
      case 'tabColor':
        if (a.rgb) this.head.tabColor = a.rgb;
        return true;
      case 'mergeCell':
        if (a.ref) this.merges.push(a.ref);
        return true;
      case 'conditionalFormatting':
        this.inCf = true;
        this.cf.parseOpen(node);
        return true;
      case 'dataValidations':
        this.inDv = true;
        this.dv.parseOpen(node);
        return true;
      case 'autoFilter':
        if (a.ref) this.autoFilter = a.ref;
        return true;
      case 'extLst':
        this.extDepth = 1;
        count(this.notCarried, 'extLst');
        return true;
      default:
        return false;
    }
  }

  text(text: string): void {
    if (this.extDepth > 0) return;
    if (this.inCf) {
      this.cf.parseText(text);
      return;
    }
    if (this.inDv) {
      this.dv.parseText(text);
      return;
    }
    if (this.setup.text(text)) return;
    const c = this.cell;
    if (this.textTarget === 'v') c.vText += text;
    else if (this.textTarget === 'f') c.fText += text;
    else if (this.textTarget === 't') c.isText += text;
  }

  /** Returns false when the caller's onRow asked to stop. */
  close(node: SaxNode): boolean {
    if (this.extDepth > 0) {
      this.extDepth--;
      return true;
    }
    if (this.inCf) {
      if (!this.cf.parseClose(node.name)) this.inCf = false;
      return true;
    }
    if (this.inDv) {
      this.closeValidation(node.name);
      return true;
    }
    switch (node.name) {
      case 'v':
      case 'f':
      case 't':
        this.textTarget = null;
        return true;
      case 'c':
        if (this.row) {
          const cell = this.cell.finish();
          if (cell) this.row.cells.push(cell);
        }
        return true;
      case 'row': {
        const row = this.row;
        this.row = null;
        return !(row && this.handlers.onRow && this.handlers.onRow(row) === false);
      }
      case 'sheetData':
        this.inData = false;
        return true;
      default:
        this.setup.close(node.name);
        return true;
    }
  }

  private closeValidation(name: string): void {
    if (name === 'dataValidations') {
      this.inDv = false;
    } else if (name === 'dataValidation') {
      // Keep the ranges as written (ExcelJS's own parser expands them to one entry per cell).
      const dv = this.dv._dataValidation!;
      if (!dv.formulae || dv.formulae.length === 0) {
        delete dv.formulae;
        delete dv.operator;
      }
      this.dataValidations.push({ ranges: (this.dv._address ?? '').split(/\s+/).filter(Boolean), validation: dv as unknown as ExcelJS.DataValidation });
    } else if (name === 'formula1' || name === 'formula2') {
      this.dv.parseClose(name);
    }
  }

  /** What followed the cells. */
  tail(): SheetTail {
    this.sendHead();
    const cfs = this.cf.model as ExcelJS.ConditionalFormattingOptions[];
    this.cf.reconcile?.(cfs, { styles: this.wb.styles });
    const { pageSetup, headerFooter } = this.setup;
    return {
      merges: this.merges,
      conditionalFormattings: cfs,
      dataValidations: this.dataValidations,
      autoFilter: this.autoFilter,
      notCarried: this.notCarried,
      ...(pageSetup ? { pageSetup } : {}),
      ...(headerFooter ? { headerFooter } : {}),
    };
  }
}

/** Words for the notes, from a sheet's not-carried counts. */
export function describeNotCarried(counts: ReadonlyMap<string, number>): string[] {
  const words = new Map<string, number>();
  for (const [name, n] of counts) {
    const w = NOT_CARRIED[name];
    if (w) words.set(w, (words.get(w) ?? 0) + n);
  }
  return [...words].map(([w, n]) => (w.startsWith('hyperlink') || w.startsWith('rich-text') || w.startsWith('inline rich-text') ? `${n} ${w}` : w));
}
