/**
 * Delimited text files read record by record (Node): the file streams through a TextDecoder and the
 * shared tokenizer (src/table/csv.ts), so a full-height file is never held as one string or one
 * array of records. The encoding comes from a byte-order mark or the zero bytes of UTF-16, or is
 * given; otherwise the file is decoded as UTF-8 and, at the first byte that is not valid UTF-8,
 * the read stops and says so (`notUtf8`), so the caller can start again as Windows-1252
 * (`forEachCsvRecordDetected` below does). The delimiter is sniffed from the first lines. Cost O(n) in the file.
 */
import { createReadStream } from 'node:fs';
import { CsvChunkParser, sniffDelimiter, type CsvDelimiter } from '../table/csv.js';
import { encodingFromStart, textDecoder, type DetectedEncoding, type TextEncodingName } from '../table/encoding.js';


export interface CsvStreamOptions {
  readonly delimiter?: CsvDelimiter;
  /** Decode as this encoding (a byte-order mark for it is still skipped). */
  readonly encoding?: TextEncodingName;
  /** Read size in bytes (default 1 MiB). */
  readonly chunkBytes?: number;
  /** Awaited after each chunk's records are handled (lets a writer wait for its output to drain). */
  readonly afterChunk?: () => Promise<void> | void;
}

/** What the read found out: how the text was decoded and split. */
export interface CsvStreamInfo {
  readonly encoding: DetectedEncoding;
  readonly delimiter: CsvDelimiter;
  /** The read stopped at the first byte that is not valid UTF-8 (no encoding given or marked). */
  readonly notUtf8?: boolean;
}

/** Text for the delimiter sniffer: up to 50 lines or 64 KiB. */
const SNIFF_CHARS = 1 << 16;

/**
 * Read a delimited text file record by record. `onRecord(record, index)` (0-based index) may return
 * `false` to stop reading early. Stops with `notUtf8` as said above.
 */
export async function forEachCsvRecord(
  path: string,
  onRecord: (record: string[], index: number) => void | boolean,
  options: CsvStreamOptions = {},
): Promise<CsvStreamInfo> {
  const stream = createReadStream(path, { highWaterMark: options.chunkBytes ?? 1 << 20 });
  let decoder: ReturnType<typeof textDecoder> | null = null;
  let encoding: DetectedEncoding | null = null;
  let parser: CsvChunkParser | null = null;
  let delimiter: CsvDelimiter = options.delimiter ?? ',';
  let head = '';
  let lines = 0;
  let index = 0;
  let stopped = false;
  const emit = (rec: string[]) => {
    if (stopped) return;
    if (onRecord(rec, index++) === false) stopped = true;
  };
  const start = (text: string) => {
    delimiter = options.delimiter ?? sniffDelimiter(text);
    parser = new CsvChunkParser(delimiter, emit);
    parser.push(text);
  };
  let notUtf8 = false;
  const decode = (bytes: Uint8Array, final: boolean): string | null => {
    try {
      return decoder!.decode(bytes, { stream: !final });
    } catch {
      notUtf8 = true;
      return null;
    }
  };
  try {
    for await (const chunk of stream) {
      let bytes = chunk as Buffer;
      if (!decoder) {
        const marked = encodingFromStart(bytes);
        if (options.encoding !== undefined) {
          encoding = { encoding: options.encoding, bomBytes: marked?.encoding === options.encoding ? marked.bomBytes : 0, how: 'given' };
        } else encoding = marked ?? { encoding: 'utf-8', bomBytes: 0, how: 'valid UTF-8' };
        decoder = textDecoder(encoding.encoding, encoding.encoding === 'utf-8' && encoding.how !== 'given');
        bytes = bytes.subarray(encoding.bomBytes);
      }
      let text = decode(bytes, false);
      if (text === null) break;
      if (!parser && text.charCodeAt(0) === 0xfeff && head === '') text = text.slice(1);
      if (parser) (parser as CsvChunkParser).push(text);
      else {
        head += text;
        for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) lines++;
        if (lines >= 50 || head.length >= SNIFF_CHARS) {
          start(head);
          head = '';
        }
      }
      if (stopped) break;
      if (options.afterChunk) await options.afterChunk();
    }
    if (!stopped && !notUtf8) {
      const rest = decoder ? decode(new Uint8Array(0), true) : '';
      if (rest === null) return { encoding: encoding!, delimiter, notUtf8 };
      if (!parser) start(head + rest);
      else if (rest) (parser as CsvChunkParser).push(rest);
      (parser as unknown as CsvChunkParser).end();
    }
  } finally {
    stream.destroy();
  }
  return { encoding: encoding ?? { encoding: 'utf-8', bomBytes: 0, how: 'valid UTF-8' }, delimiter, ...(notUtf8 ? { notUtf8 } : {}) };
}

/**
 * As `forEachCsvRecord`, starting again as Windows-1252 when the file turns out not to be UTF-8:
 * `restart()` is called first so the caller can drop what it kept from the first try.
 */
export async function forEachCsvRecordDetected(
  path: string,
  onRecord: (record: string[], index: number) => void | boolean,
  restart: () => void,
  options: CsvStreamOptions = {},
): Promise<CsvStreamInfo> {
  const first = await forEachCsvRecord(path, onRecord, options);
  if (!first.notUtf8) return first;
  restart();
  const info = await forEachCsvRecord(path, onRecord, { ...options, encoding: 'windows-1252' });
  return { ...info, encoding: { ...info.encoding, how: 'not valid UTF-8' } };
}
