/** Header names and the reader's errors (pure). */

import { TailmarkError } from '../pipeline/errors.js';
import { columnLetters } from '../report/columns.js';

/** A problem with an input table, worded for the person who runs the command or opens the file. */
export function tableReadError(message: string, line?: number): TailmarkError {
  return new TailmarkError('input-file', message, line);
}

/** 0-based column index -> letters (src/report/columns.ts). */
export const columnName = columnLetters;

/** Make header names usable as keys: empty ones get the column letter, repeats get " (2)", " (3)"... */
export function uniqueHeaders(raw: readonly string[], firstColumn: number): string[] {
  const seen = new Map<string, number>();
  return raw.map((h, i) => {
    let name = h.trim() === '' ? `Column ${columnName(firstColumn + i)}` : h.trim();
    const count = (seen.get(name.toLowerCase()) ?? 0) + 1;
    seen.set(name.toLowerCase(), count);
    if (count > 1) name = `${name} (${count})`;
    return name;
  });
}
