/**
 * What the layer remembers in workbook.settings: the reviewer's RunSettings (offered again next
 * period) and where our additions sit (so a re-run updates them in place and remove() deletes only
 * them). Values are stored as JSON text and validated on the way back in.
 */
import { DIRECTIONS, METHOD_IDS, SMALL_GROUP_POLICIES, type Direction, type MethodId, type SmallGroupPolicy } from '../scoring/types.js';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../report/index.js';
import type { ReviewPrefs, RunSettings } from './api.js';

export const SETTINGS_KEY = 'tailmark.settings';
export const STATE_KEY = 'tailmark.state';
/** The reviewer's name or initials and the follow-up view's columns (ReviewPrefs). */
export const REVIEW_KEY = 'tailmark.review';

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

const METHODS: readonly MethodId[] = METHOD_IDS;
const POLICIES: readonly SmallGroupPolicy[] = SMALL_GROUP_POLICIES;

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

const strings = (x: unknown): x is string[] => Array.isArray(x) && x.every((s) => typeof s === 'string');

/** RunSettings from a stored setting value, or null when absent or malformed. */
export function parseSettings(value: unknown): RunSettings | null {
  const o = parseJson(value);
  if (!isRecord(o)) return null;
  const { valueColumns, groupColumns, idColumn, method, cutoff, direction, logScale, minGroupSize, smallGroups, decimalComma } = o;
  if (!strings(valueColumns) || valueColumns.length === 0 || !strings(groupColumns)) return null;
  if (!(idColumn === null || typeof idColumn === 'string')) return null;
  if (typeof method !== 'string' || !METHODS.includes(method as MethodId)) return null;
  if (typeof cutoff !== 'number' || !Number.isFinite(cutoff) || cutoff <= 0) return null;
  if (typeof direction !== 'string' || !DIRECTIONS.includes(direction as Direction)) return null;
  if (typeof smallGroups !== 'string' || !POLICIES.includes(smallGroups as SmallGroupPolicy)) return null;
  if (typeof logScale !== 'boolean' || typeof decimalComma !== 'boolean') return null;
  if (typeof minGroupSize !== 'number' || !Number.isInteger(minGroupSize) || minGroupSize < 1) return null;
  return {
    valueColumns,
    groupColumns,
    idColumn,
    method: method as MethodId,
    cutoff,
    direction: direction as Direction,
    logScale,
    minGroupSize,
    smallGroups: smallGroups as SmallGroupPolicy,
    decimalComma,
  };
}

/** ReviewPrefs from a stored setting value; absent or malformed parts read as "not chosen yet". */
export function parseReviewPrefs(value: unknown): ReviewPrefs {
  const o = parseJson(value);
  if (!isRecord(o)) return { reviewer: null, detailColumns: null };
  const reviewer = typeof o.reviewer === 'string' && o.reviewer.trim() !== '' ? o.reviewer.trim() : null;
  const detailColumns = strings(o.detailColumns) ? o.detailColumns : null;
  return { reviewer, detailColumns };
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
