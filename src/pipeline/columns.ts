/**
 * Resolve the chosen column headers against a table's headers: exact match first, then ignoring
 * case and surrounding spaces. The one place a header name becomes a column index.
 */
import { TailmarkError } from './errors.js';
import type { Settings } from './settings.js';

export interface ResolvedColumns {
  /** Indices into the table's headers, in the order of the settings. */
  readonly value: readonly number[];
  readonly group: readonly number[];
  readonly id: number | null;
}

const ROLE_WORDS = { value: 'value', group: 'group', id: 'id' } as const;

/**
 * `headers[i]` null marks a column that cannot be chosen (one of our own result columns).
 * Throws TailmarkError('bad-settings') naming the column, where it was looked for and what is there.
 */
export function findColumn(headers: readonly (string | null)[], name: string, role: keyof typeof ROLE_WORDS, where: string): number {
  let i = headers.indexOf(name);
  if (i < 0) {
    const want = name.trim().toLowerCase();
    i = headers.findIndex((h) => h !== null && h.trim().toLowerCase() === want);
  }
  if (i < 0) {
    const there = headers.filter((h): h is string => h !== null).map((h) => `"${h}"`).join(', ');
    throw new TailmarkError('bad-settings', `${ROLE_WORDS[role]} column "${name}" not found in ${where}; headers are: ${there}`);
  }
  return i;
}

export function resolveColumns(headers: readonly (string | null)[], s: Settings, where: string): ResolvedColumns {
  const value = s.valueColumns.map((v) => findColumn(headers, v, 'value', where));
  const group = s.groupColumns.map((g) => findColumn(headers, g, 'group', where));
  const id = s.idColumn !== null ? findColumn(headers, s.idColumn, 'id', where) : null;
  for (const v of value) {
    if (group.includes(v)) throw new TailmarkError('bad-settings', `"${headers[v]}" is chosen both as a value column and as a group column`);
  }
  if (new Set(value).size !== value.length) throw new TailmarkError('bad-settings', 'the same value column is chosen twice');
  return { value, group, id };
}

/** The columns a run reads (value, group, then id), for readers that keep only what is needed. */
export function columnsToRead(c: ResolvedColumns): number[] {
  return [...c.value, ...c.group, ...(c.id !== null ? [c.id] : [])];
}
