/**
 * What the layer remembers in workbook.settings: the reviewer's RunSettings (offered again next
 * period) and where our additions sit (so a re-run updates them in place and remove() deletes only
 * them). Values are stored as JSON text and validated on the way back in.
 */
import { settingsFromSaved } from '../pipeline/settings.js';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../report/index.js';
import type { RunSettings } from './api.js';

export const SETTINGS_KEY = 'tailmark.settings';
export const STATE_KEY = 'tailmark.state';

/** One of our result columns on a plain range. */
export interface BlockColumn {
  readonly header: string;
  /** True when we inserted this sheet column (removal deletes it); false when we wrote into an empty column. */
  readonly inserted: boolean;
  /** Width (points) the empty column had before we wrote into it, restored on removal; null when inserted. */
  readonly width: number | null;
}

export interface LayerState {
  readonly v: 1;
  readonly sheet: string;
  /** Excel table name when the results are table columns. */
  readonly table: string | null;
  /** 0-based sheet row of the header row. */
  readonly headerRow: number;
  /** 0-based sheet column of the first data column. */
  readonly firstColumn: number;
  /** Data rows at the last run. */
  readonly rowCount: number;
  /** 0-based sheet column of our first result column (plain ranges). */
  readonly blockColumn: number;
  /** Our result columns in sheet order. */
  readonly columns: readonly BlockColumn[];
  readonly notesSheet: string;
}

function parseJson(value: unknown): unknown {
  if (typeof value !== 'string') return value;
  try {
    return JSON.parse(value) as unknown;
  } catch {
    return null;
  }
}

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/** RunSettings from a stored setting value, or null when absent or malformed (the pipeline's one validation). */
export function parseSettings(value: unknown): RunSettings | null {
  return settingsFromSaved(value);
}

export function parseState(value: unknown): LayerState | null {
  const o = parseJson(value);
  if (!isRecord(o) || o.v !== 1) return null;
  const { sheet, table, headerRow, firstColumn, rowCount, blockColumn, columns, notesSheet } = o;
  if (typeof sheet !== 'string' || !(table === null || typeof table === 'string') || typeof notesSheet !== 'string') return null;
  for (const n of [headerRow, firstColumn, rowCount, blockColumn]) {
    if (typeof n !== 'number' || !Number.isInteger(n) || n < 0) return null;
  }
  if (!Array.isArray(columns)) return null;
  const cols: BlockColumn[] = [];
  for (const c of columns) {
    if (!isRecord(c) || typeof c.header !== 'string' || typeof c.inserted !== 'boolean') return null;
    if (!(c.width === null || typeof c.width === 'number')) return null;
    cols.push({ header: c.header, inserted: c.inserted, width: c.width });
  }
  return {
    v: 1,
    sheet,
    table,
    headerRow: headerRow as number,
    firstColumn: firstColumn as number,
    rowCount: rowCount as number,
    blockColumn: blockColumn as number,
    columns: cols,
    notesSheet,
  };
}

const SUFFIXES = (() => {
  const h = resultHeaders('');
  return [h.score, h.flag, h.reason];
})();

/** True for a header text we write (result, status and note columns; see resultHeaders in src/report). */
export function isOurHeader(text: string): boolean {
  return text === STATUS_HEADER || text === NOTE_HEADER || SUFFIXES.some((s) => text.length > s.length && text.endsWith(s));
}
