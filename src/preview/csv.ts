/**
 * The preview page's CSV opening goes through the one tabular reader (src/table): encoding
 * detection from the file's bytes, delimiter sniffing, header row below any titles, a totals row
 * left out. Cells stay text for the parse step.
 */
import { readDelimited, tableRows } from '../table/delimited.js';
import type { TextEncodingName } from '../table/encoding.js';

/** The reader's choices the preview lets the reviewer override (absent: as detected). */
export interface CsvChoices {
  readonly encoding?: TextEncodingName;
  /** 1-based row of the header. */
  readonly headerRow?: number;
}

/** What the reader found (or was told), for the controls that show it. */
export interface CsvFound {
  readonly encoding: TextEncodingName;
  /** How the encoding was decided ("byte-order mark", "valid UTF-8", ...). */
  readonly encodingHow: string;
  /** 1-based row of the header in the file. */
  readonly headerRow: number;
  /** The reader's notes (what it decided or left out), in words. */
  readonly notes: readonly string[];
}

/** Rows for a sheet that starts with the header (titles above it and a totals row are not there). */
export function parseCsv(bytes: Uint8Array, name: string, choices: CsvChoices = {}): { rows: (string | null)[][]; found: CsvFound } {
  const t = readDelimited(bytes, name, choices);
  return { rows: tableRows(t), found: { encoding: t.encoding.encoding, encodingHow: t.encoding.how, headerRow: t.headerRow, notes: t.notes } };
}
