/**
 * Streaming CSV: the same grammar as `parseCsv` (RFC 4180 plus the same leniencies: LF / lone CR line
 * ends, a UTF-8 byte-order mark, `;` or tab delimiter detected from the first record, text after a
 * closing quote appended, a quote inside an unquoted field kept), fed in chunks of any size, so a
 * full-height file is never held as one string or one array of records. Cost O(n) in the text.
 * A chunk may end anywhere (inside a quoted field, between CR and LF); records come out once complete.
 */
import { createReadStream } from 'node:fs';
import { StringDecoder } from 'node:string_decoder';
import { detectDelimiter, type CsvDelimiter } from './csv.js';
import { TailmarkError } from '../pipeline/errors.js';

const QUOTE = 34;
const CR = 13;
const LF = 10;

/** Incremental CSV parser. `push` text, then `end`; `onRecord` receives each complete record. */
export class CsvChunkParser {
  private record: string[] = [];
  private field = '';
  private quoted = false; // the current field was quoted
  private inQuotes = false; // inside an open quoted field
  private quoteOpenedAt = 0;
  private pendingQuote = false; // chunk ended on a `"` inside a quoted field: `""` or close?
  private pendingCr = false; // chunk ended on CR: skip a following LF
  private pendingQuotedCr = false; // chunk ended on CR inside quotes: a line unless LF follows
  private afterClose = false; // a quoted field closed; text up to the delimiter is appended
  private line = 1;
  private readonly delim: number;

  constructor(delimiter: CsvDelimiter, private readonly onRecord: (record: string[]) => void) {
    this.delim = delimiter.charCodeAt(0);
  }

  private endRecord(): void {
    this.record.push(this.field);
    this.onRecord(this.record);
    this.record = [];
    this.field = '';
    this.quoted = false;
    this.afterClose = false;
    this.line++;
  }

  push(text: string): void {
    const n = text.length;
    // An empty chunk changes nothing (and must not clear a CR or quote left pending by the last one).
    if (n === 0) return;
    const d = this.delim;
    let i = 0;
    if (this.pendingQuotedCr && n > 0) {
      this.pendingQuotedCr = false;
      if (text.charCodeAt(0) !== LF) this.line++;
    }
    if (this.pendingCr) {
      this.pendingCr = false;
      if (n > 0 && text.charCodeAt(0) === LF) i = 1;
    }
    if (this.pendingQuote) {
      this.pendingQuote = false;
      if (n === 0) {
        this.pendingQuote = true;
        return;
      }
      if (text.charCodeAt(i) === QUOTE) {
        this.field += '"';
        i++;
      } else {
        this.inQuotes = false;
        this.afterClose = true;
      }
    }
    while (i < n) {
      if (this.inQuotes) {
        // Inside a quoted field: copy up to the next quote, counting line breaks.
        let j = i;
        while (j < n) {
          const c = text.charCodeAt(j);
          if (c === QUOTE) break;
          if (c === LF) this.line++;
          else if (c === CR) {
            if (j + 1 >= n) this.pendingQuotedCr = true;
            else if (text.charCodeAt(j + 1) !== LF) this.line++;
          }
          j++;
        }
        this.field += text.slice(i, j);
        if (j >= n) return;
        // text[j] is a quote
        if (j + 1 >= n) {
          this.pendingQuote = true;
          return;
        }
        if (text.charCodeAt(j + 1) === QUOTE) {
          this.field += '"';
          i = j + 2;
        } else {
          this.inQuotes = false;
          this.afterClose = true;
          i = j + 1;
        }
        continue;
      }
      const ch = text.charCodeAt(i);
      if (ch === QUOTE && this.field === '' && !this.afterClose) {
        this.inQuotes = true;
        this.quoted = true;
        this.quoteOpenedAt = this.line;
        i++;
        continue;
      }
      if (ch === d) {
        this.record.push(this.field);
        this.field = '';
        this.quoted = false;
        this.afterClose = false;
        i++;
        continue;
      }
      if (ch === CR || ch === LF) {
        this.endRecord();
        if (ch === CR) {
          if (i + 1 >= n) {
            this.pendingCr = true;
            return;
          }
          i += text.charCodeAt(i + 1) === LF ? 2 : 1;
        } else i++;
        continue;
      }
      let j = i + 1;
      while (j < n) {
        const c = text.charCodeAt(j);
        if (c === d || c === LF || c === CR) break;
        j++;
      }
      this.field += text.slice(i, j);
      i = j;
    }
  }

  /** No more text: emit the last record (a file ending in a line break adds no empty record). */
  end(): void {
    if (this.pendingQuote) {
      this.pendingQuote = false;
      this.inQuotes = false;
    }
    if (this.inQuotes) {
      throw new TailmarkError('input-file', `CSV line ${this.quoteOpenedAt}: a quoted field is never closed (missing ")`, this.quoteOpenedAt);
    }
    if (this.field !== '' || this.quoted || this.record.length > 0) {
      this.record.push(this.field);
      this.onRecord(this.record);
      this.record = [];
      this.field = '';
      this.quoted = false;
    }
  }
}

/** Has `text` a line end outside quotes (so detectDelimiter sees the whole first record)? */
function firstRecordComplete(text: string): boolean {
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === QUOTE) inQuotes = !inQuotes;
    else if (!inQuotes && (c === LF || c === CR)) return true;
  }
  return false;
}

export interface CsvStreamOptions {
  readonly delimiter?: CsvDelimiter;
  /** Read size in bytes (default 1 MiB). */
  readonly chunkBytes?: number;
  /** Awaited after each chunk's records are handled (lets a writer wait for its output to drain). */
  readonly afterChunk?: () => Promise<void> | void;
}

/**
 * Read a CSV file record by record. `onRecord(record, index)` (0-based index) may return `false`
 * to stop reading early. UTF-8; a leading byte-order mark is dropped.
 */
export async function forEachCsvRecord(
  path: string,
  onRecord: (record: string[], index: number) => void | boolean,
  options: CsvStreamOptions = {},
): Promise<void> {
  const decoder = new StringDecoder('utf8');
  const stream = createReadStream(path, { highWaterMark: options.chunkBytes ?? 1 << 20 });
  let parser: CsvChunkParser | null = null;
  let head = '';
  let index = 0;
  let stopped = false;
  const emit = (rec: string[]) => {
    if (stopped) return;
    if (onRecord(rec, index++) === false) stopped = true;
  };
  const start = (text: string) => {
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    parser = new CsvChunkParser(options.delimiter ?? detectDelimiter(text), emit);
    parser.push(text);
  };
  try {
    for await (const chunk of stream) {
      const text = decoder.write(chunk as Buffer);
      if (parser) (parser as CsvChunkParser).push(text);
      else {
        head += text;
        if (firstRecordComplete(head)) {
          start(head);
          head = '';
        }
      }
      if (stopped) break;
      if (options.afterChunk) await options.afterChunk();
    }
    if (!stopped) {
      const rest = decoder.end();
      if (!parser) start(head + rest);
      else if (rest) (parser as CsvChunkParser).push(rest);
      (parser as unknown as CsvChunkParser).end();
    }
  } finally {
    stream.destroy();
  }
}
