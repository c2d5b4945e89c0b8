/**
 * Streaming .xlsx reading (Node): the workbook's zip is read entry by entry with ExcelJS's
 * WorkbookReader (shared strings, styles and the sheet list are cached; each worksheet's XML comes as
 * a stream), and each worksheet's XML is parsed here, row by row, with the SAX parser ExcelJS uses.
 * Nothing holds a whole sheet: memory is one row plus what the caller keeps.
 *
 * Parsed here rather than by ExcelJS's WorksheetReader because that reader (exceljs 4.4.0) drops
 * shared formulas (dependent cells come out with an empty formula), reads error and boolean formula
 * results as NaN / 1, and builds a full Row object per row. This parser gives per cell: the value to
 * write back (numbers as the stored serial, shared formulas expanded per cell, results typed), the
 * RawCell a source table holds (dates as Date, formula cells as their cached result, errors as
 * CellError), and the cell's style id; per sheet: columns, frozen panes, merged cells, conditional
 * formats, data validations and autofilter, and a count of the parts it does not carry over.
 */
import { createRequire } from 'node:module';
import type ExcelJS from 'exceljs';
import type { RawCell } from '../scoring/types.js';
import { columnLetters } from '../report/columns.js';

const require = createRequire(import.meta.url);

interface SaxNode {
  readonly name: string;
  readonly attributes: Record<string, string>;
}
type SaxEvent =
  | { eventType: 'opentag'; value: SaxNode }
  | { eventType: 'text'; value: string }
  | { eventType: 'closetag'; value: SaxNode };

interface StyleManager {
  getStyleModel(id: number): Partial<ExcelJS.Style> | null;
  getDxfStyle(id: number): unknown;
}
interface SheetEntry {
  readonly name: string;
  readonly state?: string;
  readonly iterator: AsyncIterable<unknown>;
}
interface WorkbookReaderLike {
  parse(): AsyncIterable<{ eventType: string; value: unknown }>;
  sharedStrings?: (string | { richText: { text: string }[] })[];
  styles: StyleManager;
  properties?: { model?: { date1904?: boolean } };
  model?: { sheets?: { name: string; state?: string }[]; definedNames?: unknown[] };
  stream?: { destroy(): void };
}
interface ExcelJsModule {
  stream: { xlsx: { WorkbookReader: new (input: string, options: Record<string, string>) => WorkbookReaderLike } };
}
interface PartXform {
  model: unknown;
  parseOpen(node: SaxNode): boolean;
  parseText(text: string): void;
  parseClose(name: string): boolean;
  reconcile?(model: unknown, options: unknown): void;
}

const ExcelJSLib = require('exceljs') as ExcelJsModule;
const parseSax = require('exceljs/lib/utils/parse-sax') as (it: AsyncIterable<unknown>) => AsyncIterable<SaxEvent[]>;
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
const NOT_CARRIED: Record<string, string> = {
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

/** 1-based column -> letters. */
const colLetters = (col: number): string => columnLetters(col - 1);

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

/** A streamed workbook: sheets come one at a time, in the order they are stored. */
export class XlsxStream {
  private readonly reader: WorkbookReaderLike;

  constructor(readonly path: string) {
    this.reader = new ExcelJSLib.stream.xlsx.WorkbookReader(path, {
      worksheets: 'emit',
      sharedStrings: 'cache',
      styles: 'cache',
      hyperlinks: 'ignore',
      entries: 'ignore',
    });
  }

  get styles(): StyleManager {
    return this.reader.styles;
  }

  /** Sheet names in workbook order (known once the first sheet has been reached). */
  get sheetNames(): string[] {
    return (this.reader.model?.sheets ?? []).map((s) => s.name);
  }

  /** Number of defined names (named ranges) in the workbook. */
  get definedNameCount(): number {
    return (this.reader.model?.definedNames ?? []).length;
  }

  get date1904(): boolean {
    return Boolean(this.reader.properties?.model?.date1904);
  }

  /** Style model of a style id (shared objects: the same id gives the same object). */
  style(id: number | undefined): Partial<ExcelJS.Style> | undefined {
    if (!id) return undefined;
    return this.reader.styles.getStyleModel(id) ?? undefined;
  }

  /** The worksheets, in storage order. Each must be read (`readSheet`) or skipped before the next. */
  async *sheets(): AsyncGenerator<SheetEntry> {
    for await (const { eventType, value } of this.reader.parse()) {
      if (eventType === 'worksheet') {
        yield value as SheetEntry;
      }
    }
  }

  /** Stop reading the file (closes it). */
  close(): void {
    this.reader.stream?.destroy();
  }

  /** Consume a sheet's XML without handling it. */
  async skipSheet(sheet: SheetEntry): Promise<void> {
    for await (const chunk of sheet.iterator) void chunk;
  }

  /** Parse one sheet's XML, calling the handlers; returns what follows the cells. */
  async readSheet(sheet: SheetEntry, handlers: SheetHandlers): Promise<SheetTail> {
    const ss = this.reader.sharedStrings ?? [];
    const styles = this.reader.styles;
    const date1904 = this.date1904;
    const isDate = new Map<number, boolean>();
    const dateStyle = (s: number): boolean => {
      let d = isDate.get(s);
      if (d === undefined) {
        d = s > 0 && utils.isDateFmt(styles.getStyleModel(s)?.numFmt);
        isDate.set(s, d);
      }
      return d;
    };

    const columns: StreamColumn[] = [];
    const head: { frozen?: { xSplit: number; ySplit: number }; showGridLines?: boolean; tabColor?: string } = {};
    let headSent = false;
    const sendHead = () => {
      if (headSent) return;
      headSent = true;
      handlers.onHead?.({ columns, ...head });
    };
    const merges: string[] = [];
    const notCarried = new Map<string, number>();
    const cfXform = new ConditionalFormattingsXform();
    cfXform.model = [];
    let inCf = false;
    const dvXform = new DataValidationsXform();
    let inDv = false;
    const dataValidations: { ranges: string[]; validation: ExcelJS.DataValidation }[] = [];
    let autoFilter: string | undefined;
    let extDepth = 0;
    let pageSetup: Record<string, unknown> | undefined;
    let headerFooter: Record<string, unknown> | undefined;
    let hfPart: string | null = null;
    const num = (v: string | undefined): number | undefined => (v === undefined || v === '' || !Number.isFinite(Number(v)) ? undefined : Number(v));

    // Shared formulas: si -> master formula and address.
    const shared = new Map<string, { formula: string; address: string }>();

    let inData = false;
    let stopped = false;
    let rowNo = 0;
    let row: { r: number; cells: StreamCell[]; s?: number; height?: number; hidden?: boolean; outlineLevel?: number } | null = null;
    let lastCol = 0;
    // current cell
    let cRef = '';
    let cCol = 0;
    let cS = 0;
    let cT = '';
    let fText: string | null = null;
    let fAttrs: Record<string, string> | null = null;
    let vText: string | null = null;
    let isText: string | null = null; // inline string text
    let textTarget: 'f' | 'v' | 't' | null = null;
    let inlineRich = false;

    const finishCell = () => {
      if (!row) return;
      let raw: RawCell = null;
      let value: ExcelJS.CellValue = null;
      const plain = (): { raw: RawCell; value: ExcelJS.CellValue } => {
        if (cT === 's') {
          if (vText === null) return { raw: null, value: null };
          const sv = ss[parseInt(vText, 10)];
          if (sv === undefined || sv === null) return { raw: null, value: null };
          if (typeof sv === 'string') return { raw: sv === '' ? null : sv, value: sv };
          const text = sv.richText.map((r) => r.text ?? '').join('');
          // ExcelJS's shared-string reader (4.4.0) drops run colours given as rgb and strikethrough.
          notCarried.set('sharedRichText', (notCarried.get('sharedRichText') ?? 0) + 1);
          return { raw: text === '' ? null : text, value: sv };
        }
        if (cT === 'inlineStr') {
          const t = isText ?? '';
          return { raw: t === '' ? null : t, value: t };
        }
        if (vText === null) return { raw: null, value: null };
        if (cT === 'str') {
          // saxes has already decoded entities (decoding again, as ExcelJS's reader does, would turn a
          // literal "&lt;" into "<").
          return { raw: vText === '' ? null : vText, value: vText };
        }
        if (cT === 'b') {
          const b = parseInt(vText, 10) !== 0;
          return { raw: b, value: b };
        }
        if (cT === 'e') return { raw: { kind: 'error', code: vText }, value: { error: vText as ExcelJS.CellErrorValue['error'] } };
        if (cT === 'd') {
          const d = new Date(vText);
          return { raw: d, value: d };
        }
        const x = parseFloat(vText);
        if (dateStyle(cS)) {
          const d = utils.excelToDate(x, date1904);
          // The stored serial is written back as it was (its date format is kept), except in a 1904
          // workbook: the writer uses the 1900 system, so the date itself is written.
          return { raw: d, value: date1904 ? d : x };
        }
        return { raw: x, value: x };
      };
      if (fText !== null || fAttrs !== null) {
        const result = plain();
        raw = result.raw;
        let formula = fText ?? '';
        const t = fAttrs?.t;
        const si = fAttrs?.si;
        if (t === 'shared' && si !== undefined) {
          const master = shared.get(si);
          if (formula !== '') shared.set(si, { formula, address: cRef });
          else if (master) formula = slideFormula(master.formula, master.address, cRef);
        }
        const res = result.value === null ? undefined : (result.value as ExcelJS.CellFormulaValue['result']);
        if (formula === '') value = result.value; // a formula we cannot rebuild: keep its last value
        else if (t === 'array' && fAttrs?.ref) {
          value = { formula, shareType: 'array', ref: fAttrs.ref, result: res } as unknown as ExcelJS.CellValue;
        } else value = res === undefined ? { formula } : { formula, result: res };
      } else {
        const p = plain();
        raw = p.raw;
        value = p.value;
      }
      if (value !== null || cS > 0) row.cells.push({ col: cCol, s: cS, value, raw });
    };

    const onOpen = (node: SaxNode) => {
      const a = node.attributes;
      if (extDepth > 0) {
        extDepth++;
        return;
      }
      if (inCf) {
        cfXform.parseOpen(node);
        return;
      }
      if (inDv) {
        if (node.name === 'dataValidation' || node.name === 'formula1' || node.name === 'formula2') dvXform.parseOpen(node);
        return;
      }
      switch (node.name) {
        case 'c': {
          if (!row) return;
          cRef = a.r ?? '';
          if (cRef) cCol = decodeRef(cRef).col;
          else {
            cCol = lastCol + 1;
            cRef = `${colLetters(cCol)}${row.r}`;
          }
          lastCol = cCol;
          cS = a.s ? parseInt(a.s, 10) : 0;
          cT = a.t ?? '';
          fText = null;
          fAttrs = null;
          vText = null;
          isText = null;
          textTarget = null;
          inlineRich = false;
          return;
        }
        case 'v':
          vText = '';
          textTarget = 'v';
          return;
        case 'f':
          fText = '';
          fAttrs = a;
          textTarget = 'f';
          return;
        case 'r':
          if (row && cT === 'inlineStr' && !inlineRich) {
            inlineRich = true;
            notCarried.set('inlineRichText', (notCarried.get('inlineRichText') ?? 0) + 1);
          }
          return;
        case 't':
          if (cT === 'inlineStr') {
            if (isText === null) isText = '';
            textTarget = 't';
          }
          return;
        case 'row': {
          if (!inData) return;
          rowNo = a.r ? parseInt(a.r, 10) : rowNo + 1;
          lastCol = 0;
          row = { r: rowNo, cells: [] };
          if (a.s && a.customFormat !== undefined && a.customFormat !== '0' && a.customFormat !== 'false') row.s = parseInt(a.s, 10);
          if (a.ht && a.customHeight !== undefined && a.customHeight !== '0' && a.customHeight !== 'false') row.height = parseFloat(a.ht);
          if (a.hidden === '1' || a.hidden === 'true') row.hidden = true;
          if (a.outlineLevel) row.outlineLevel = parseInt(a.outlineLevel, 10);
          return;
        }
        case 'sheetData':
          sendHead();
          inData = true;
          return;
        case 'col':
          columns.push({
            min: parseInt(a.min, 10),
            max: parseInt(a.max, 10),
            ...(a.width !== undefined && a.customWidth !== '0' ? { width: parseFloat(a.width) } : {}),
            ...(a.style ? { s: parseInt(a.style, 10) } : {}),
            ...(a.hidden === '1' || a.hidden === 'true' ? { hidden: true } : {}),
            ...(a.outlineLevel ? { outlineLevel: parseInt(a.outlineLevel, 10) } : {}),
          });
          return;
        case 'sheetView':
          if (a.showGridLines === '0' || a.showGridLines === 'false') head.showGridLines = false;
          return;
        case 'pane':
          if (a.state === 'frozen' || a.state === 'frozenSplit') {
            head.frozen = { xSplit: parseInt(a.xSplit ?? '0', 10) || 0, ySplit: parseInt(a.ySplit ?? '0', 10) || 0 };
          }
          return;
        case 'tabColor':
          if (a.rgb) head.tabColor = a.rgb;
          return;
        case 'mergeCell':
          if (a.ref) merges.push(a.ref);
          return;
        case 'conditionalFormatting':
          inCf = true;
          cfXform.parseOpen(node);
          return;
        case 'dataValidations':
          inDv = true;
          dvXform.parseOpen(node);
          return;
        case 'autoFilter':
          if (a.ref) autoFilter = a.ref;
          return;
        case 'pageSetUpPr':
          if (a.fitToPage === '1' || a.fitToPage === 'true') (pageSetup ??= {}).fitToPage = true;
          return;
        case 'pageMargins': {
          const m: Record<string, number> = {};
          for (const k of ['left', 'right', 'top', 'bottom', 'header', 'footer']) {
            const v = num(a[k]);
            if (v !== undefined) m[k] = v;
          }
          (pageSetup ??= {}).margins = m;
          return;
        }
        case 'pageSetup': {
          const ps = (pageSetup ??= {});
          if (a.orientation === 'landscape' || a.orientation === 'portrait') ps.orientation = a.orientation;
          for (const k of ['paperSize', 'scale', 'fitToWidth', 'fitToHeight', 'horizontalDpi', 'verticalDpi', 'firstPageNumber']) {
            const v = num(a[k]);
            if (v !== undefined) ps[k] = v;
          }
          if (a.pageOrder === 'overThenDown' || a.pageOrder === 'downThenOver') ps.pageOrder = a.pageOrder;
          if (a.blackAndWhite === '1') ps.blackAndWhite = true;
          if (a.draft === '1') ps.draft = true;
          return;
        }
        case 'headerFooter':
          headerFooter = {};
          if (a.differentFirst === '1') headerFooter.differentFirst = true;
          if (a.differentOddEven === '1') headerFooter.differentOddEven = true;
          return;
        case 'oddHeader':
        case 'oddFooter':
        case 'evenHeader':
        case 'evenFooter':
        case 'firstHeader':
        case 'firstFooter':
          if (headerFooter) {
            hfPart = node.name;
            headerFooter[hfPart] = '';
          }
          return;
        case 'extLst':
          extDepth = 1;
          notCarried.set('extLst', (notCarried.get('extLst') ?? 0) + 1);
          return;
        default:
          if (node.name in NOT_CARRIED) notCarried.set(node.name, (notCarried.get(node.name) ?? 0) + 1);
      }
    };

    const onText = (text: string) => {
      if (extDepth > 0) return;
      if (inCf) {
        cfXform.parseText(text);
        return;
      }
      if (inDv) {
        dvXform.parseText(text);
        return;
      }
      if (hfPart !== null && headerFooter) {
        const sofar = headerFooter[hfPart];
        headerFooter[hfPart] = (typeof sofar === 'string' ? sofar : '') + text;
        return;
      }
      if (textTarget === 'v') vText += text;
      else if (textTarget === 'f') fText += text;
      else if (textTarget === 't') isText += text;
    };

    const onClose = (node: SaxNode): boolean => {
      if (extDepth > 0) {
        extDepth--;
        return true;
      }
      if (inCf) {
        if (!cfXform.parseClose(node.name)) inCf = false;
        return true;
      }
      if (inDv) {
        if (node.name === 'dataValidations') {
          inDv = false;
        } else if (node.name === 'dataValidation') {
          // Keep the ranges as written (ExcelJS's own parser expands them to one entry per cell).
          const dv = dvXform._dataValidation!;
          if (!dv.formulae || dv.formulae.length === 0) {
            delete dv.formulae;
            delete dv.operator;
          }
          dataValidations.push({ ranges: (dvXform._address ?? '').split(/\s+/).filter(Boolean), validation: dv as unknown as ExcelJS.DataValidation });
        } else if (node.name === 'formula1' || node.name === 'formula2') {
          dvXform.parseClose(node.name);
        }
        return true;
      }
      switch (node.name) {
        case 'v':
        case 'f':
        case 't':
          textTarget = null;
          return true;
        case 'c':
          finishCell();
          return true;
        case 'row':
          if (row && handlers.onRow) {
            if (handlers.onRow(row) === false) {
              row = null;
              return false;
            }
          }
          row = null;
          return true;
        case 'sheetData':
          inData = false;
          return true;
        case 'oddHeader':
        case 'oddFooter':
        case 'evenHeader':
        case 'evenFooter':
        case 'firstHeader':
        case 'firstFooter':
          hfPart = null;
          return true;
        default:
          return true;
      }
    };

    for await (const events of parseSax(sheet.iterator)) {
      if (stopped) continue; // drain the rest of the entry
      for (const ev of events) {
        if (ev.eventType === 'opentag') onOpen(ev.value);
        else if (ev.eventType === 'text') onText(ev.value);
        else if (!onClose(ev.value)) {
          stopped = true;
          break;
        }
      }
      if (handlers.afterChunk) await handlers.afterChunk();
    }
    sendHead();
    const cfs = cfXform.model as ExcelJS.ConditionalFormattingOptions[];
    cfXform.reconcile?.(cfs, { styles });
    return {
      merges,
      conditionalFormattings: cfs,
      dataValidations,
      autoFilter,
      notCarried,
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
