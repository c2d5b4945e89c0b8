/**
 * The tabular reader for delimited text held in memory (pure): bytes -> text (encoding detected or
 * given) -> records (delimiter sniffed or given) -> header row (found or given) -> columns of raw
 * text cells, with a last row labelled total left out. Used by the preview page, the tests and the
 * batch command's in-memory path; the batch command's row-by-row path (src/files) uses the same
 * pieces on a stream. Cells stay text: the parse step turns them into numbers, deciding the decimal
 * separator per column.
 */
import type { RawCell } from '../scoring/types.js';
import { DELIMITER_WORDS, parseCsv, sniffDelimiter, type CsvDelimiter } from './csv.js';
import { isTailmarkError } from '../pipeline/errors.js';
import { decodeText, describeEncoding, type DetectedEncoding, type TextEncodingName } from './encoding.js';
import { findHeaderRow } from './header.js';
import { rowSaysTotal } from './totals.js';
import { tableReadError, uniqueHeaders } from './names.js';

export interface DelimitedOptions {
  readonly encoding?: TextEncodingName;
  readonly delimiter?: CsvDelimiter;
  /** 1-based row of the header (overrides detection). */
  readonly headerRow?: number;
}

export interface ReadResult {
  readonly headers: readonly string[];
  /** Cells by column (text or null). */
  readonly columns: readonly (readonly RawCell[])[];
  readonly rowCount: number;
  /** 1-based row of the header; data row r is row headerRow + 1 + r. */
  readonly headerRow: number;
  /** 0-based first column. */
  readonly firstColumn: number;
  readonly encoding: DetectedEncoding;
  readonly delimiter: CsvDelimiter;
  /** Every record as read (for writers that lay the file out on a sheet). */
  readonly records: readonly (readonly string[])[];
  /** What the reader decided or left out, in words for the notes. */
  readonly notes: readonly string[];
}

/** Read delimited text from its bytes. Throws TailmarkError ('input-file') with a one-line message. */
export function readDelimited(bytes: Uint8Array, name: string, options: DelimitedOptions = {}): ReadResult {
  const { text, encoding } = decodeText(bytes, options.encoding);
  const delimiter = options.delimiter ?? sniffDelimiter(text);
  let records: string[][];
  try {
    records = parseCsv(text, { delimiter });
  } catch (e) {
    if (isTailmarkError(e) && e.line !== undefined) throw tableReadError(`${name}: ${e.message}`, e.line);
    throw e;
  }
  const notes: string[] = [`${name}: ${describeEncoding(encoding)}, ${DELIMITER_WORDS[delimiter]}-separated`];
  const h = headerIndex(records, name, options.headerRow, notes);
  const hrec = records[h];
  const first = hrec.findIndex((f) => f.trim() !== '');
  let last = hrec.length - 1;
  while (last > first && hrec[last].trim() === '') last--;
  const width = last - first + 1;
  const headers = uniqueHeaders(hrec.slice(first, last + 1), first);
  const inTable = (rec: readonly string[]) => rec.slice(first, last + 1).some((f) => f.trim() !== '');
  let end = records.length - 1;
  while (end > h && !inTable(records[end])) end--;
  if (end > h && rowSaysTotal(records[end].slice(first, last + 1))) {
    notes.push(`Row ${end + 1} was left out: its label says it is a total, not a claim`);
    end--;
    while (end > h && !inTable(records[end])) end--;
  }
  const rowCount = end - h;
  const columns: RawCell[][] = headers.map(() => new Array<RawCell>(rowCount));
  for (let r = 0; r < rowCount; r++) {
    const rec = records[h + 1 + r];
    for (let c = 0; c < width; c++) {
      const f = rec[first + c];
      columns[c][r] = f === undefined || f.trim() === '' ? null : f;
    }
  }
  return { headers, columns, rowCount, headerRow: h + 1, firstColumn: first, encoding, delimiter, records, notes };
}

function headerIndex(records: readonly (readonly string[])[], name: string, given: number | undefined, notes: string[]): number {
  if (given !== undefined) {
    const rec = records[given - 1];
    if (!rec || rec.every((f) => f.trim() === '')) {
      throw tableReadError(`--header-row ${given}: row ${given} of ${name} is ${rec ? 'empty' : `past the end (the file has ${records.length} rows)`}`);
    }
    return given - 1;
  }
  const h = findHeaderRow(records.slice(0, 50).map((r) => r.map((f) => (f.trim() === '' ? null : f))));
  if (h < 0) throw tableReadError(`${name} is empty (no header row found)`);
  if (records.slice(0, h).some((r) => r.some((f) => f.trim() !== ''))) {
    notes.push(`Header row ${h + 1}: the rows above it look like titles and were skipped (give --header-row to choose another)`);
  }
  return h;
}

/**
 * The table as rows for a sheet that starts with it (the preview page's sandbox): the header row,
 * then the data rows, cells as text or null (title rows, blank lines and a totals row are not there).
 */
export function tableRows(t: Pick<ReadResult, 'headers' | 'columns' | 'rowCount'>): (string | null)[][] {
  const rows: (string | null)[][] = [[...t.headers]];
  for (let r = 0; r < t.rowCount; r++) rows.push(t.columns.map((col) => (typeof col[r] === 'string' ? (col[r] as string) : null)));
  return rows;
}
