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
import { describeNotCarried, SheetParser, type SaxNode, type SheetHandlers, type SheetTail, type StyleManager } from './xlsx-sheet.js';

export type { SheetHandlers, SheetHead, SheetTail, StreamCell, StreamColumn, StreamRow } from './xlsx-sheet.js';

const require = createRequire(import.meta.url);

type SaxEvent =
  | { eventType: 'opentag'; value: SaxNode }
  | { eventType: 'text'; value: string }
  | { eventType: 'closetag'; value: SaxNode };

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
  model?: { sheets?: { name: string; state?: string; rId?: string }[]; definedNames?: unknown[] };
  stream?: { destroy(): void };
}
interface ExcelJsModule {
  stream: { xlsx: { WorkbookReader: new (input: string, options: Record<string, string>) => WorkbookReaderLike } };
}
const ExcelJSLib = require('exceljs') as ExcelJsModule;
const parseSax = require('exceljs/lib/utils/parse-sax') as (it: AsyncIterable<unknown>) => AsyncIterable<SaxEvent[]>;
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
        const ws = value as SheetEntry & { id?: string | number; name?: string; state?: string };
        if (!ws.name || !this.sheetNames.includes(ws.name)) this.nameFromRels(ws);
        yield ws;
      }
    }
  }

  /**
   * ExcelJS's reader (4.4.0) names a worksheet only when the workbook's relationship target reads
   * exactly "worksheets/sheetN.xml"; openpyxl (what pandas' to_excel uses) writes absolute targets
   * ("/xl/worksheets/sheetN.xml"), so its sheets came out unnamed and `--sheet Claims` was "not
   * found". Match the target after removing a leading "/xl/" or "/".
   */
  private nameFromRels(ws: { id?: string | number; name?: string; state?: string }): void {
    const rels = (this.reader as unknown as { workbookRels?: { Id: string; Target: string }[] }).workbookRels ?? [];
    const want = `worksheets/sheet${String(ws.id)}.xml`;
    const rel = rels.find((r) => r.Target.replace(/^\/?(?:xl\/)?/, '') === want);
    const sheet = rel && this.reader.model?.sheets?.find((s) => s.rId === rel.Id);
    if (sheet) {
      ws.name = sheet.name;
      if (sheet.state !== undefined) ws.state = sheet.state;
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

  /** Parse one sheet's XML, calling the handlers; returns what follows the cells (see SheetParser). */
  async readSheet(sheet: SheetEntry, handlers: SheetHandlers): Promise<SheetTail> {
    const parser = new SheetParser({ sharedStrings: this.reader.sharedStrings ?? [], styles: this.reader.styles, date1904: this.date1904 }, handlers);
    let stopped = false;
    for await (const events of parseSax(sheet.iterator)) {
      if (stopped) continue; // drain the rest of the entry
      for (const ev of events) {
        if (ev.eventType === 'opentag') parser.open(ev.value);
        else if (ev.eventType === 'text') parser.text(ev.value);
        else if (!parser.close(ev.value)) {
          stopped = true;
          break;
        }
      }
      if (handlers.afterChunk) await handlers.afterChunk();
    }
    return parser.tail();
  }
}

export { describeNotCarried };
