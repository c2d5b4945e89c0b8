import { MAD_NORMAL_CONSTANT } from './mad.js';
import { medcoupleSorted } from './medcouple.js';
import { EMPTY_SUMMARY, real, summarize, type Summary } from './summary.js';
import type { ExclusionReason, Fallback, GroupStats, MethodId, Population } from './types.js';

/**
 * Descriptive statistics computed on first read (engine internal).
 *
 * Scoring needs only a few statistics per group (robust: median and MAD; classic: mean and SD;
 * IQR: the quartiles); the other descriptive fields of `GroupStats` (median, mad, scaledMad,
 * meanAbsDev, mean, sd, q1, q3) are computed when first read, from a group-ordered copy of the
 * column's usable values (original units) that the column keeps, then cached. They are own,
 * enumerable accessor properties, so `JSON.stringify`, object spread, `Object.keys/values/entries`
 * and `in` see them as ordinary fields; the values are exactly those `summarize` gives (the fields
 * the method computed while scoring are returned as computed, and equal `summarize` to the last
 * bit for order statistics, within rounding for sums).
 *
 * Cost of the first read of a group's field: O(n) expected for that group (one copy and the
 * quickselects and passes of `summarize`); later reads O(1). Reading every field of every group
 * costs what computing them all eagerly did.
 */

/** Fields of `Summary` a descriptive field is read from. */
type SummaryField = 'median' | 'mad' | 'meanAbsDev' | 'mean' | 'sd' | 'q1' | 'q3' | 'medcouple';
/** Descriptive fields of `GroupStats`, in declaration order. */
export const DESCRIPTIVE_FIELDS = ['median', 'mad', 'scaledMad', 'meanAbsDev', 'mean', 'sd', 'q1', 'q3', 'medcouple'] as const;
type DescriptiveField = (typeof DESCRIPTIVE_FIELDS)[number];

const BIT: Record<SummaryField, number> = { median: 1, mad: 2, meanAbsDev: 4, mean: 8, sd: 16, q1: 32, q3: 64, medcouple: 128 };
/** Which fields each method's scoring summary (`summarizeFor`) holds, as bits of `BIT`. */
export const SCORING_FIELDS: Readonly<Record<MethodId, number>> = {
  robust: BIT.median | BIT.mad | BIT.meanAbsDev,
  classic: BIT.mean | BIT.sd,
  iqr: BIT.median | BIT.q1 | BIT.q3,
  adjusted: BIT.median | BIT.medcouple,
  skew: BIT.median | BIT.medcouple,
};

/**
 * The retained values of one column: group g's usable values (original units) at
 * `ordered[start[g] .. start[g] + count[g] - 1]`, in any order within the group (the slices may
 * have been permuted by the selections of scoring). `source` is either that buffer or a function
 * building it, called on the first read that needs it (so a method whose scoring needs no
 * group-ordered copy never pays for one). Summaries are computed on a scratch copy, so `ordered`
 * is never changed.
 */
export class DescriptiveStore {
  private readonly cache: (Summary | undefined)[];
  private wholeCache: Summary | undefined;
  private readonly mcCache = new Map<number, number>();
  private scratch: Float64Array | null = null;
  private dev: Float64Array | null = null;
  private source: Float64Array | (() => Float64Array);

  constructor(
    source: Float64Array | (() => Float64Array),
    private readonly start: Int32Array,
    private readonly count: Int32Array,
    /** Usable values in the whole column (sum of count). */
    readonly total: number,
  ) {
    this.source = source;
    this.cache = new Array<Summary | undefined>(count.length);
  }

  /** The group-ordered values (built on first use when given as a function). */
  private get ordered(): Float64Array {
    if (typeof this.source === 'function') this.source = this.source();
    return this.source;
  }

  /** Full summary of group g (cached). */
  group(g: number): Summary {
    const cached = this.cache[g];
    if (cached !== undefined) return cached;
    const n = this.count[g];
    let s = EMPTY_SUMMARY;
    if (n > 0) {
      if (this.scratch === null || this.dev === null) {
        let max = 0;
        for (let i = 0; i < this.count.length; i++) if (this.count[i] > max) max = this.count[i];
        this.scratch = new Float64Array(max);
        this.dev = new Float64Array(max);
      }
      const from = this.start[g];
      const ordered = this.ordered;
      this.scratch.set(ordered.subarray(from, from + n));
      s = summarize(this.scratch, n, this.dev);
    }
    this.cache[g] = s;
    return s;
  }

  /**
   * Medcouple of group g (-1: the whole column), of ln(x) when `log` (cached; O(n log n): a sorted
   * copy). Not part of `summarize`, which stays O(n).
   */
  medcouple(g: number, log: boolean): number {
    const key = g + 1;
    const cached = this.mcCache.get(key);
    if (cached !== undefined) return cached;
    let a: Float64Array;
    if (g < 0) a = log ? this.gather(Math.log) : this.gather();
    else {
      const from = this.start[g];
      const n = this.count[g];
      a = this.ordered.slice(from, from + n);
      if (log) for (let i = 0; i < n; i++) a[i] = Math.log(a[i]);
    }
    a.sort();
    const mc = medcoupleSorted(a, a.length);
    this.mcCache.set(key, mc);
    return mc;
  }

  /** Full summary of the whole column (cached; uses two temporary arrays of `total` values). */
  whole(): Summary {
    if (this.wholeCache !== undefined) return this.wholeCache;
    const n = this.total;
    this.wholeCache = n === 0 ? EMPTY_SUMMARY : summarize(this.gather(), n, new Float64Array(n));
    return this.wholeCache;
  }

  /** A fresh array of every usable value of the column, group by group (optionally mapped, e.g. Math.log). */
  gather(map?: (x: number) => number): Float64Array {
    const out = new Float64Array(this.total);
    const ordered = this.ordered;
    let k = 0;
    for (let g = 0; g < this.count.length; g++) {
      const from = this.start[g];
      const n = this.count[g];
      if (map === undefined) out.set(ordered.subarray(from, from + n), k);
      else for (let i = 0; i < n; i++) out[k + i] = map(ordered[from + i]);
      k += n;
    }
    return out;
  }
}

/** Where a GroupStats object's descriptive fields come from. */
interface LazyRef {
  readonly store: DescriptiveStore;
  /** Group index, or -1 for the whole column. */
  readonly g: number;
  readonly n: number;
  /** The summary computed while scoring, in original units (null on log scale or when not computed). */
  readonly scoring: Summary | null;
  /** Which of its fields hold values (bits of `BIT`). */
  readonly scoringBits: number;
  /** Scores are on ln(x): the medcouple is of ln(x) too. */
  readonly log: boolean;
}

function fieldValue(ref: LazyRef, f: DescriptiveField): number | null {
  const n = ref.n;
  if (n === 0 || (f === 'sd' && n < 2)) return null;
  if (f === 'medcouple') {
    // Scale free: no unit. The scoring summary holds it only on the linear scale (or log: see LazyRef).
    const mc = ref.scoring !== null && (ref.scoringBits & BIT.medcouple) !== 0 ? ref.scoring.medcouple : ref.store.medcouple(ref.g, ref.log);
    return Number.isFinite(mc) ? mc : null;
  }
  const sf: SummaryField = f === 'scaledMad' ? 'mad' : f;
  const s = ref.scoring !== null && (ref.scoringBits & BIT[sf]) !== 0 ? ref.scoring : ref.g < 0 ? ref.store.whole() : ref.store.group(ref.g);
  const v = real(s[sf], s.unit);
  if (f !== 'scaledMad' || v === null) return v;
  const scaled = MAD_NORMAL_CONSTANT * v;
  return Number.isFinite(scaled) ? scaled : null;
}

export interface StatsHead {
  readonly key: string;
  readonly label: string;
  readonly keyParts: readonly string[];
  readonly rows: number;
  readonly n: number;
  readonly excluded: Readonly<Record<ExclusionReason, number>>;
}

export interface StatsTail {
  readonly center: number | null;
  readonly scale: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly flagged: number;
  readonly fallbacks: readonly Fallback[];
  readonly population: Population;
  readonly maxAttainableZ: number | null;
  readonly chanceRate: number | null;
  readonly chanceRateAtMost: boolean;
  readonly unreachable: boolean;
  readonly withinFloor: number;
}

/**
 * A GroupStats whose descriptive fields are lazy (see the top of this file), fields in the
 * declaration order of `GroupStats`. `g` = group index in `store`, -1 = the whole column.
 * One object literal with getters (own, enumerable, configurable accessors closing over the
 * group's source): much cheaper to create than `Object.defineProperties` per object.
 */
export function lazyGroupStats(
  head: StatsHead, store: DescriptiveStore, g: number, scoring: Summary | null, scoringBits: number, tail: StatsTail, log = false,
): GroupStats {
  const ref: LazyRef = { store, g, n: head.n, scoring, scoringBits, log };
  return {
    key: head.key, label: head.label, keyParts: head.keyParts, rows: head.rows, n: head.n, excluded: head.excluded,
    get median() { return fieldValue(ref, 'median'); },
    get mad() { return fieldValue(ref, 'mad'); },
    get scaledMad() { return fieldValue(ref, 'scaledMad'); },
    get meanAbsDev() { return fieldValue(ref, 'meanAbsDev'); },
    get mean() { return fieldValue(ref, 'mean'); },
    get sd() { return fieldValue(ref, 'sd'); },
    get q1() { return fieldValue(ref, 'q1'); },
    get q3() { return fieldValue(ref, 'q3'); },
    get medcouple() { return fieldValue(ref, 'medcouple'); },
    center: tail.center,
    scale: tail.scale,
    lower: tail.lower,
    upper: tail.upper,
    flagged: tail.flagged,
    fallbacks: tail.fallbacks,
    population: tail.population,
    maxAttainableZ: tail.maxAttainableZ,
    chanceRate: tail.chanceRate,
    chanceRateAtMost: tail.chanceRateAtMost,
    unreachable: tail.unreachable,
    withinFloor: tail.withinFloor,
  };
}
