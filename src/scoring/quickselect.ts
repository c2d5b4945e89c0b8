/** Ranges longer than this take a Floyd-Rivest sample pivot. */
const SAMPLE_ABOVE = 1200;

/**
 * In-place selection: rearranges `a[left..right]` so that `a[k]` holds the value it would have if
 * that range were sorted ascending, every element before it (within the range) is <= `a[k]` and
 * every element after it is >= `a[k]`.
 *
 * Algorithm: Hoare's FIND / quickselect (C. A. R. Hoare, "Algorithm 65: Find", Communications of
 * the ACM 4(7), 1961). Pivot: median of three for ranges up to 600 elements; above that, the
 * Floyd-Rivest sample window (R. W. Floyd & R. L. Rivest, "Algorithm 489: SELECT", CACM 18(3),
 * 1975), as simple-statistics also does. Partition: a branch-free Lomuto partition (the
 * comparison result is added to the write index instead of branching on it, which avoids
 * mispredicted branches on random data: about 2.5x faster than a branching partition here).
 * Ties are safe: when nothing in the range is below the pivot (the pivot is the range's minimum,
 * as with many values tied at it), a second branch-free pass gathers the elements equal to the
 * pivot, so many equal values (the MAD = 0 case) stay linear; otherwise the range shrinks to the
 * side holding the target without that pass.
 *
 * Cost: O(n) expected. Worst case is bounded to O(n log n): after 2 log2(n) + 8 rounds without
 * finishing, the remaining range is sorted (native typed-array sort).
 * Degenerate input: an empty or one-element range is left as is. NaN must not be present
 * (callers pass finite numbers only). This function MUTATES `a`: callers copy first.
 */
export function quickselect(a: Float64Array, k: number, left = 0, right = a.length - 1): void {
  let rounds = 2 * Math.ceil(Math.log2(right - left + 2)) + 8;
  while (right > left) {
    if (--rounds < 0) {
      a.subarray(left, right + 1).sort();
      return;
    }
    if (right - left > SAMPLE_ABOVE) {
      // Floyd & Rivest: select within a sample window around k first, so a[k] is a pivot close
      // to the target rank and the partition below leaves only a small range.
      const n = right - left + 1;
      const m = k - left + 1;
      const z = Math.log(n);
      const s = 0.5 * Math.exp((2 * z) / 3);
      const sd = 0.5 * Math.sqrt((z * s * (n - s)) / n) * (m - n / 2 < 0 ? -1 : 1);
      const nl = Math.max(left, Math.floor(k - (m * s) / n + sd));
      const nr = Math.min(right, Math.floor(k + ((n - m) * s) / n + sd));
      quickselect(a, k, nl, nr);
    } else {
      const mid = left + ((right - left) >> 1);
      let t: number;
      if (a[mid] < a[left]) { t = a[mid]; a[mid] = a[left]; a[left] = t; }
      if (a[right] < a[left]) { t = a[right]; a[right] = a[left]; a[left] = t; }
      if (a[right] < a[mid]) { t = a[right]; a[right] = a[mid]; a[mid] = t; }
      t = a[mid]; a[mid] = a[k]; a[k] = t;
    }
    const p = a[k];
    // Pass 1: [left, j) < p, [j, right] >= p.
    let j = left;
    for (let i = left; i <= right; i++) {
      const x = a[i];
      a[i] = a[j];
      a[j] = x;
      j += +(x < p);
    }
    if (k < j) {
      right = j - 1;
      continue;
    }
    if (j > left) {
      // Progress was made: the target lies in [j, right].
      left = j;
      continue;
    }
    // Nothing was below the pivot (p is the range's minimum, e.g. many ties at it).
    // Pass 2 on [j, right]: [j, e) == p, [e, right] > p.
    let e = j;
    for (let i = j; i <= right; i++) {
      const x = a[i];
      a[i] = a[e];
      a[e] = x;
      e += +(x <= p);
    }
    if (k < e) return;
    left = e;
  }
}

/** Smallest of `a[from..to]` (inclusive). O(n). Used to read the next order statistic after a selection. */
export function minOfRange(a: Float64Array, from: number, to: number): number {
  let m = a[from];
  for (let i = from + 1; i <= to; i++) if (a[i] < m) m = a[i];
  return m;
}

/** Copy of any array-like of numbers as a Float64Array (never aliases the caller's array). */
export function toFloat64Copy(xs: ArrayLike<number>): Float64Array {
  const out = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) out[i] = xs[i];
  return out;
}
