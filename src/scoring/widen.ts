/**
 * Wider peer groups for small groups (engine internal). With several key columns (e.g. cost centre
 * x category), a group with fewer usable amounts than the minimum is compared with a wider peer
 * group before the whole column: the rows that share its values of the key columns kept, across
 * every value of the columns let go. The order (`WidenOrder`) says which key columns are let go
 * first: 'drop-first' lets go of the first key column first (cost centre x category -> the same
 * category across every cost centre -> the whole column), 'drop-last' of the last ('the same cost
 * centre across every category'), 'column' goes straight to the whole column. The first wider
 * group with at least the minimum number of usable amounts is the one used.
 *
 * Cost: for each level actually needed, one grouping of the rows by the kept key columns (O(rows x
 * kept columns), shared by every value column), and per value column one row pass per level to
 * gather the values of the wider groups used, then one fit each.
 */
import { groupRows, type Grouping } from './groups.js';
import type { Fit, ScoringMethod } from './methods/method.js';
import { summarizeFor } from './summarizeFor.js';
import type { Summary } from './summary.js';
import type { RawCell, ScoreOptions, WidenOrder } from './types.js';

/** One way of widening: the key columns kept, the rows grouped by them, and each group's wider group. */
export interface WidenLevel {
  /** Indices of the key columns kept. */
  readonly keep: readonly number[];
  /** Names of the key columns let go (for the label). */
  readonly dropped: readonly string[];
  readonly grouping: Grouping;
  /** Wider group (index into `grouping`) of each group of the full grouping. */
  readonly of: Int32Array;
}

/** The key columns kept at each level, in the order they are tried (the whole column comes after). */
export function widenLevels(keyColumns: number, order: WidenOrder): number[][] {
  if (order === 'column' || keyColumns < 2) return [];
  const out: number[][] = [];
  for (let kept = keyColumns - 1; kept >= 1; kept--) {
    const from = order === 'drop-first' ? keyColumns - kept : 0;
    out.push(Array.from({ length: kept }, (_, i) => from + i));
  }
  return out;
}

/**
 * The levels of widening for a table, built on first use (shared by the value columns). `null`
 * when no level applies (one key column, 'column', or 'skip').
 */
export function tableWidening(
  groupColumns: readonly { readonly name: string; readonly cells: ArrayLike<RawCell> }[], grouping: Grouping, rowCount: number, opts: Required<ScoreOptions>,
): (() => readonly WidenLevel[]) | null {
  const keeps = opts.smallGroups === 'pool' ? widenLevels(groupColumns.length, opts.widen) : [];
  if (keeps.length === 0) return null;
  let levels: WidenLevel[] | null = null;
  return () => {
    if (levels !== null) return levels;
    const nGroups = grouping.keys.length;
    levels = keeps.map((keep) => {
      const g2 = groupRows(keep.map((k) => groupColumns[k]), rowCount);
      const of = new Int32Array(nGroups).fill(-1);
      for (let r = 0; r < rowCount; r++) {
        const g = grouping.groupOf[r];
        if (of[g] < 0) of[g] = g2.groupOf[r];
      }
      const dropped = groupColumns.map((c) => c.name).filter((_, i) => !keep.includes(i));
      return { keep, dropped, grouping: g2, of };
    });
    return levels;
  };
}

/** A wider group used by at least one small group of a column. */
export interface WiderPopulation {
  readonly level: WidenLevel;
  /** Index into `level.grouping`. */
  readonly w: number;
  readonly label: string;
  readonly keyParts: readonly string[];
  /** Rows of the wider group, and its usable values in this column. */
  readonly rows: number;
  readonly n: number;
  readonly s: Summary;
  readonly fit: Fit;
}

/** Label of a wider group: its kept key values, and which key columns it spans in full. */
export function widerLabel(level: WidenLevel, w: number): string {
  return `${level.grouping.labels[w]} (every ${level.dropped.join(' / ')})`;
}

/**
 * For one value column: which wider group each small group is compared with. `count[g]` = usable
 * values of group g; `y` the scoring values (usable where `exclusion` is 0). Returns the wider
 * groups used and, per group, the index into them (-1: not widened: scored alone, or on to the
 * whole column when no wider group has the minimum size).
 */
export function widenSmallGroups(
  levels: readonly WidenLevel[], count: Int32Array, groupOf: Int32Array, exclusion: Uint8Array, y: Float64Array,
  method: ScoringMethod, opts: Required<ScoreOptions>, columnSummary: () => Summary,
): { readonly populations: readonly WiderPopulation[]; readonly widerOf: Int32Array } {
  const nGroups = count.length;
  const widerOf = new Int32Array(nGroups).fill(-1);
  const populations: WiderPopulation[] = [];
  // Usable values per wider group of each level (sum over the groups it holds).
  const sizes = levels.map((L) => {
    const n = new Int32Array(L.grouping.keys.length);
    for (let g = 0; g < nGroups; g++) n[L.of[g]] += count[g];
    return n;
  });
  // Choose, per small group, the first level whose wider group is big enough.
  const chosen: { li: number; w: number }[] = [];
  const index = levels.map(() => new Map<number, number>());
  for (let g = 0; g < nGroups; g++) {
    if (count[g] === 0 || count[g] >= opts.minGroupSize) continue;
    for (let li = 0; li < levels.length; li++) {
      const w = levels[li].of[g];
      if (sizes[li][w] < opts.minGroupSize) continue;
      let p = index[li].get(w);
      if (p === undefined) {
        p = chosen.length;
        chosen.push({ li, w });
        index[li].set(w, p);
      }
      widerOf[g] = p;
      break;
    }
  }
  if (chosen.length === 0) return { populations, widerOf };
  // Gather each chosen wider group's values, one row pass per level that has any.
  const buffers = chosen.map(({ li, w }) => new Float64Array(sizes[li][w]));
  const fill = new Int32Array(chosen.length);
  levels.forEach((L, li) => {
    if (index[li].size === 0) return;
    const pos = new Int32Array(L.grouping.keys.length).fill(-1);
    for (const [w, p] of index[li]) pos[w] = p;
    for (let r = 0; r < y.length; r++) {
      if (exclusion[r] !== 0) continue;
      const p = pos[L.of[groupOf[r]]];
      if (p >= 0) buffers[p][fill[p]++] = y[r];
    }
  });
  chosen.forEach(({ li, w }, p) => {
    const L = levels[li];
    const buf = buffers[p];
    const s = summarizeFor(method.id, buf, 0, buf.length, buf);
    populations.push({
      level: L, w, label: widerLabel(L, w), keyParts: L.grouping.keyParts[w], rows: L.grouping.start[w + 1] - L.grouping.start[w], n: buf.length,
      s, fit: method.fit(s, opts.cutoff, opts.direction, columnSummary),
    });
  });
  return { populations, widerOf };
}
