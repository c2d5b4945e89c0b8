import { TailmarkError } from '../pipeline/errors.js';
/**
 * A CSV reader following RFC 4180 (fields separated by a delimiter, records by CRLF; fields may be
 * quoted with `"`, a quote inside a quoted field is written `""`, and quoted fields may hold the
 * delimiter and line breaks). Also accepted, as real files need: LF or lone CR line ends, a UTF-8
 * byte-order mark, `;` or tab as the delimiter (detected from the first record), and a missing final
 * line end. Cost O(n) in the length of the text.
 *
 * Lenient where files are commonly sloppy: a `"` inside an unquoted field is kept as a character,
 * text after a closing quote is appended to the field. Strict where guessing would lose data: a quoted
 * field that never closes throws, naming the line where it opened.
 */

export type CsvDelimiter = ',' | ';' | '\t';

export interface CsvOptions {
  /** Field delimiter; detected from the first record when omitted. */
  readonly delimiter?: CsvDelimiter;
}

/** Strip a leading UTF-8 byte-order mark (U+FEFF). */
export function stripBom(text: string): string {
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/** Pick the delimiter that occurs most often outside quotes in the first record (ties: comma). */
export function detectDelimiter(text: string): CsvDelimiter {
  const counts: Record<CsvDelimiter, number> = { ',': 0, ';': 0, '\t': 0 };
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (ch === '\n' || ch === '\r')) break;
    else if (!inQuotes && (ch === ',' || ch === ';' || ch === '\t')) counts[ch]++;
  }
  let best: CsvDelimiter = ',';
  for (const d of [';', '\t'] as const) if (counts[d] > counts[best]) best = d;
  return best;
}

/** Parse CSV text into records of string fields. Empty input gives no records. */
export function parseCsv(input: string, options: CsvOptions = {}): string[][] {
  const text = stripBom(input);
  const delim = options.delimiter ?? detectDelimiter(text);
  const records: string[][] = [];
  let record: string[] = [];
  let field = '';
  let i = 0;
  let line = 1;
  let quoted = false; // the current field was quoted (so `""` at the very end still counts)
  const n = text.length;
  if (n === 0) return records;

  while (i < n) {
    const ch = text[i];
    if (ch === '"' && field === '') {
      // Quoted field (a quote that opens a field; quotes elsewhere are plain characters).
      const openedAt = line;
      i++;
      let closed = false;
      while (i < n) {
        const c = text[i];
        if (c === '"') {
          if (text[i + 1] === '"') {
            field += '"';
            i += 2;
          } else {
            i++;
            closed = true;
            break;
          }
        } else {
          if (c === '\n' || (c === '\r' && text[i + 1] !== '\n')) line++;
          field += c;
          i++;
        }
      }
      quoted = true;
      if (!closed) {
        throw new TailmarkError('input-file', `CSV line ${openedAt}: a quoted field is never closed (missing ")`, openedAt);
      }
      // Anything up to the next delimiter / line end is appended (lenient).
      while (i < n && text[i] !== delim && text[i] !== '\n' && text[i] !== '\r') field += text[i++];
      continue;
    }
    if (ch === delim) {
      record.push(field);
      field = '';
      quoted = false;
      i++;
      continue;
    }
    if (ch === '\r' || ch === '\n') {
      record.push(field);
      records.push(record);
      record = [];
      field = '';
      quoted = false;
      i += ch === '\r' && text[i + 1] === '\n' ? 2 : 1;
      line++;
      continue;
    }
    let j = i + 1;
    while (j < n && text[j] !== delim && text[j] !== '\n' && text[j] !== '\r') j++;
    field += text.slice(i, j);
    i = j;
  }
  // Final record without a line end (a file ending in a line break adds no empty record).
  if (field !== '' || quoted || record.length > 0) {
    record.push(field);
    records.push(record);
  }
  return records;
}
