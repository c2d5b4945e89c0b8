/**
 * The batch command's --json output, written as it is produced: a chunk of rows at a time goes to
 * `write`, which may wait for the output to drain, so a full-height sheet never holds its whole JSON
 * text (or one object per row) in memory. The document is the same as JSON.stringify of
 * { method, cutoff, decimal, rows: [...], groups: [...] } (rows one per line). Cost O(rows).
 */
import { POPULATIONS, type RawCell, type ScoreResult } from '../scoring/types.js';

const CHUNK_CHARS = 1 << 20;

function n(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function rawText(v: RawCell): string | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return v.toISOString();
  if (typeof v === 'object') return v.code;
  return String(v);
}

export async function writeResultJson(
  result: ScoreResult,
  idCells: readonly RawCell[] | null,
  write: (chunk: string) => void | Promise<void>,
): Promise<void> {
  const multi = result.columns.length > 1;
  const decimal = Object.fromEntries(result.columns.map((c) => [c.column, { separator: c.decimal.separator, how: c.decimal.how }]));
  let buf = `{\n  "method": ${JSON.stringify(result.options.method)},\n  "cutoff": ${JSON.stringify(result.options.cutoff)},\n  "decimal": ${JSON.stringify(decimal)},\n  "rows": [`;
  let first = true;
  const flush = async (force: boolean) => {
    if (force || buf.length >= CHUNK_CHARS) {
      await write(buf);
      buf = '';
    }
  };
  for (const col of result.columns) {
    for (let r = 0; r < result.rowCount; r++) {
      const g = col.groups[col.groupOf[r]];
      const entry: Record<string, unknown> = {
        row: r + 1,
        group: g ? g.label : null,
        value: n(col.values[r]),
        score: n(col.scores[r]),
        flagged: col.flagged[r] === 1,
      };
      if (idCells !== null) entry.id = rawText(idCells[r]);
      if (multi) entry.column = col.column;
      entry.comparedWith = POPULATIONS[col.population[r]];
      buf += `${first ? '\n' : ',\n'}    ${JSON.stringify(entry)}`;
      first = false;
      if (buf.length >= CHUNK_CHARS) await flush(true);
    }
  }
  buf += `${first ? '' : '\n  '}],\n  "groups": [`;
  first = true;
  for (const col of result.columns) {
    for (const g of col.groups) {
      const entry: Record<string, unknown> = { key: g.label, n: g.n, center: g.center, scale: g.scale, lower: g.lower, upper: g.upper, flagged: g.flagged };
      if (multi) entry.column = col.column;
      buf += `${first ? '\n' : ',\n'}    ${JSON.stringify(entry)}`;
      first = false;
      await flush(false);
    }
  }
  buf += `${first ? '' : '\n  '}]\n}\n`;
  await flush(true);
}
