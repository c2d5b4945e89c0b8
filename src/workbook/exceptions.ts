/**
 * The follow-up list's entries and the claim record, built from cells already read: shared by
 * listExceptions (whole columns), readClaim and followSelection (one row each).
 */
import { parseCell } from '../scoring/index.js';
import type { RawCell } from '../scoring/types.js';
import { FLAG_WORDS, NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../report/index.js';
import type { ClaimRecord, Exception, RunSettings } from './api.js';
import { cellText } from './cells.js';
import type { LayerState } from './state.js';

/** Where our columns and the reviewer's columns sit (sheet column by header). */
export interface HeaderColumns {
  /** Sheet column of each of our headers. */
  readonly columns: ReadonlyMap<string, number>;
  /** Sheet column of each user header. */
  readonly userColumns: ReadonlyMap<string, number>;
}

/** Our columns and the user's from the header cells of a plain range at the remembered place (from state.firstColumn). */
export function headerColumns(state: LayerState, headerCells: readonly unknown[]): HeaderColumns {
  const ourHeaders = new Set(state.columns.map((c) => c.header));
  const columns = new Map<string, number>();
  const userColumns = new Map<string, number>();
  headerCells
    .map((v) => cellText(typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean' ? v : null))
    .forEach((h, i) => {
      const col = state.firstColumn + i;
      if (col >= state.blockColumn && ourHeaders.has(h)) columns.set(h, col);
      else if (col < state.blockColumn && h !== '' && !userColumns.has(h)) userColumns.set(h, col);
    });
  return { columns, userColumns };
}

/** The cells an Exception is made of: key ('status', 'note', 'id', 'value', 'group<i>', 'score:<v>', 'flag:<v>') and sheet column. */
export function exceptionColumns(settings: RunSettings | null, where: HeaderColumns): { key: string; column: number }[] {
  const find = (name: string | null | undefined) => (name ? where.userColumns.get(name) : undefined);
  const wanted: { key: string; column: number }[] = [];
  const add = (key: string, column: number | undefined) => {
    if (column !== undefined) wanted.push({ key, column });
  };
  add('status', where.columns.get(STATUS_HEADER));
  add('note', where.columns.get(NOTE_HEADER));
  add('id', find(settings?.idColumn));
  add('value', find(settings?.valueColumns[0] ?? null));
  settings?.groupColumns.forEach((g, i) => add(`group${i}`, find(g)));
  for (const v of settings?.valueColumns ?? []) {
    const h = resultHeaders(v);
    add(`score:${v}`, where.columns.get(h.score));
    add(`flag:${v}`, where.columns.get(h.flag));
  }
  return wanted;
}

const FLAGS: ReadonlySet<string> = new Set<string>([FLAG_WORDS.high, FLAG_WORDS.low]);

/**
 * Data row `r` as an entry of the follow-up list (flagged, or marked with a status or note), or
 * null when it is neither. `get(key)` answers the cell of exceptionColumns' key.
 */
export function exceptionOf(r: number, get: (key: string) => unknown, hasId: boolean, settings: RunSettings | null): Exception | null {
  const text = (k: string) => {
    const v = get(k);
    return v === undefined || v === null ? '' : String(v).trim();
  };
  let flaggedScore: number | null = null;
  let anyFlag = false;
  let firstScore: number | null = null;
  for (const v of settings?.valueColumns ?? []) {
    const f = text(`flag:${v}`);
    const s = get(`score:${v}`);
    const score = typeof s === 'number' ? s : null;
    if (firstScore === null) firstScore = score;
    if (f !== '' && (FLAGS.has(f) || f.length > 0)) {
      anyFlag = true;
      if (flaggedScore === null) flaggedScore = score;
    }
  }
  const status = text('status');
  const note = text('note');
  if (!anyFlag && status === '' && note === '') return null;
  const rawValue = get('value');
  const parsed = parseCell(rawValue === undefined || rawValue === '' ? null : (rawValue as RawCell), { decimalComma: settings?.decimal === 'comma' });
  const group = (settings?.groupColumns ?? []).map((_, i) => text(`group${i}`) || '(blank)').join(' / ');
  return {
    row: r,
    claimId: hasId ? text('id') || null : null,
    group: group === '' ? '(all rows)' : group,
    value: parsed.ok ? parsed.value : null,
    score: flaggedScore ?? firstScore,
    status,
    note,
  };
}

/** The columns readClaim shows: the user's in sheet order, then our "why" cell of each value column. */
export function claimColumns(settings: RunSettings | null, where: HeaderColumns) {
  const user = [...where.userColumns.entries()].sort((a, b) => a[1] - b[1]);
  const whys = (settings?.valueColumns ?? []).flatMap((v) => {
    const c = where.columns.get(resultHeaders(v).reason);
    return c === undefined ? [] : [{ valueColumn: v, column: c }];
  });
  return { user, whys, cols: [...user.map((u) => u[1]), ...whys.map((w) => w.column)] };
}

/** The claim record of data row `row` from its displayed texts (`at(column)`). */
export function claimFrom(row: number, shown: ReturnType<typeof claimColumns>, at: (column: number) => string): ClaimRecord {
  return {
    row,
    fields: shown.user.map(([header, c]) => ({ header, text: at(c) })),
    reasons: shown.whys.map((w) => ({ valueColumn: w.valueColumn, text: at(w.column) })),
  };
}
