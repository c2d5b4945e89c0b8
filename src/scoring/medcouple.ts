import { quickselect } from './quickselect.js';
import { sortFloat64 } from './sortFloat64.js';

/**
 * Medcouple: a robust measure of skewness, the median of the kernel
 *
 *   h(xi, xj) = ((xj - m) - (m - xi)) / (xj - xi)   over all pairs xi <= m <= xj, xi != xj,
 *
 * where m is the sample median; for pairs of values both equal to m (ties at the median) the
 * kernel is sign(p - 1 - i - j), with i the 0-based index of xj among the p values >= m sorted
 * descending and j that of xi among the q values <= m sorted descending. MC lies in [-1, 1]:
 * 0 for a symmetric sample, > 0 when the upper tail is longer (right skew), < 0 when the lower
 * one is. Even number of kernel values: the mean of the two middle ones.
 *
 * Algorithm: the fast algorithm of Brys, Hubert & Struyf (2004, section 3), written from the
 * published description. With z+ (values >= m, minus m, descending) and z- (values <= m, minus m,
 * descending), the kernel matrix H[i][j] = h(z+[i], z-[j]) decreases along every row and every
 * column. Each round takes the weighted median (weights = candidates left in the row) of the
 * middle candidates of the rows as a trial value, counts with two staircase walks (O(n)) how many
 * entries lie above and at or above it, and discards the side that cannot hold the wanted rank;
 * at least a quarter of the remaining candidates goes each round, so O(log n) rounds; once fewer
 * than 2(p + q) candidates remain they are gathered and the wanted rank selected among them.
 *
 * Cost: O(n log n) time (the sort, then O(n) per round), O(n) memory. `medcoupleSorted` skips
 * the sort for data already sorted.
 * Degenerate input: n = 0 -> NaN; n = 1 or 2 -> 0; all values equal -> 0 (every kernel value is
 * one of the tie signs, which balance). Inputs must be finite numbers.
 *
 * Source: G. Brys, M. Hubert & A. Struyf, "A robust measure of skewness", Journal of
 * Computational and Graphical Statistics 13(4):996-1017, 2004. Checked against R robustbase
 * `mc(x, doReflect = TRUE)` (test/reference/make-r-medcouple.R), which agrees with this definition
 * except for samples of 3 or 4 values all but one tied at the median, where robustbase reports
 * +-1 and the definition gives +-0.5 (both recorded in the fixture).
 */
export function medcouple(xs: ArrayLike<number>): number {
  const n = xs.length;
  const a = new Float64Array(n);
  for (let i = 0; i < n; i++) a[i] = xs[i];
  sortFloat64(a);
  return medcoupleSorted(a, n);
}

/**
 * The medcouple of `sorted[0..n-1]`, which must be sorted ascending (finite numbers); not changed.
 * Cost O(n log n) (no sort: O(n) per round, O(log n) rounds).
 */
export function medcoupleSorted(sorted: Float64Array, n: number): number {
  if (n === 0) return NaN;
  if (n < 3) return 0;
  const mid = n >> 1;
  const m = n % 2 === 1 ? sorted[mid] : sorted[mid - 1] + (sorted[mid] - sorted[mid - 1]) / 2;
  if (sorted[0] === sorted[n - 1]) return 0;
  // Scale by a power of two so that |z| <= 1/2: the kernel is scale free, this keeps a - b from
  // overflowing, and multiplying by a power of two is exact, so every kernel value is the one the
  // unscaled values give.
  const span = Math.max(sorted[n - 1] - m, m - sorted[0]);
  let inv = 1;
  if (Number.isFinite(span) && span > 0) {
    inv = 2 ** -(Math.ceil(Math.log2(span)) + 1);
    if (span * inv > 0.5) inv /= 2;
  }
  // z+ : values >= m, descending; z- : values <= m, descending.
  let firstHigh = 0; // first index with sorted[i] >= m
  while (sorted[firstHigh] < m) firstHigh++;
  let lastLow = n - 1; // last index with sorted[i] <= m
  while (sorted[lastLow] > m) lastLow--;
  const p = n - firstHigh;
  const q = lastLow + 1;
  const ws = workspace(p, q);
  const zp = ws.zp;
  const zm = ws.zm;
  for (let i = 0; i < p; i++) zp[i] = (sorted[n - 1 - i] - m) * inv;
  for (let j = 0; j < q; j++) zm[j] = (sorted[lastLow - j] - m) * inv;
  const total = p * q;
  // Ranks counted from the largest (1-based).
  if (total % 2 === 1) return kthLargest(ws, p, q, (total + 1) / 2);
  const hi = kthLargest(ws, p, q, total / 2);
  // The next entry below usually comes with the selection (ws.next); else one more count.
  const lo = Number.isNaN(ws.next) ? nextBelow(ws, p, q, hi, total / 2 + 1) : ws.next;
  return hi + (lo - hi) / 2;
}

/** Rows whose middle candidates a round's trial value is taken from while rounds go well. */
const SAMPLE_ROWS = 16;

/** How far past the wanted entry's place (as a share of the candidates) a round's trial is aimed; see `kthLargest`. */
const AIM = 0.05;

/**
 * Work arrays, kept between calls (one medcouple per group of a column: allocating a dozen typed
 * arrays per group costs more than the rounds on small groups). Grown as needed, never shrunk.
 */
interface Workspace {
  zp: Float64Array;
  zm: Float64Array;
  left: Int32Array;
  right: Int32Array;
  above: Int32Array;
  atOrAbove: Int32Array;
  rowMid: Float64Array;
  weight: Float64Array;
  rest: Float64Array;
  /** Set by `kthLargest`: the (k+1)-th largest entry when the selection found it, else NaN. */
  next: number;
  /** Set by `countBoth`: the number of entries >= the trial. */
  sumAtOrAbove: number;
}
let shared: Workspace | null = null;

function workspace(p: number, q: number): Workspace {
  const need = Math.max(p, q);
  const restNeed = gatherLimit(p, q) + q;
  if (shared === null || shared.zp.length < need || shared.rest.length < restNeed) {
    const size = Math.max(need, shared === null ? 0 : shared.zp.length);
    shared = {
      zp: new Float64Array(size), zm: new Float64Array(size),
      left: new Int32Array(size), right: new Int32Array(size), above: new Int32Array(size), atOrAbove: new Int32Array(size),
      rowMid: new Float64Array(size), weight: new Float64Array(size),
      rest: new Float64Array(Math.max(restNeed, shared === null ? 0 : shared.rest.length)),
      next: NaN, sumAtOrAbove: 0,
    };
  }
  return shared;
}

/**
 * A round walks the rows with candidates twice (a mispredicted branch per row in the count walk);
 * gathering a candidate and selecting among them costs a few nanoseconds each: on the benchmark's
 * groups (npm run bench, 300-6,600 values) stopping the rounds below 4 (p + q) candidates was
 * measured fastest (2 (p + q): 4 % slower, 8 (p + q): 2 % slower).
 */
function gatherLimit(p: number, q: number): number {
  return Math.max(6 * (p + q), 64);
}

/** Kernel entry H[i][j] (see `medcouple`): z+ descending in rows, z- descending in columns. */
function kernel(zp: Float64Array, zm: Float64Array, p: number, i: number, j: number): number {
  const a = zp[i];
  const b = zm[j];
  if (a === 0 && b === 0) {
    const s = p - 1 - i - j;
    return s > 0 ? 1 : s < 0 ? -1 : 0;
  }
  return (a + b) / (a - b);
}

/**
 * The k-th largest entry when `v` is the (k-1)-th largest: v itself if at least k entries are
 * >= v, else the largest entry below v (the first entry below v in each row: O(p + q)).
 */
function nextBelow(ws: Workspace, p: number, q: number, v: number, k: number): number {
  const { zp, zm, left, right, atOrAbove } = ws;
  left.fill(0, 0, p);
  right.fill(q - 1, 0, p);
  countBoth(ws, p, v);
  if (ws.sumAtOrAbove >= k) return v;
  let best = -Infinity;
  for (let i = 0; i < p; i++) {
    const j = atOrAbove[i];
    if (j < q) {
      const h = kernel(zp, zm, p, i, j);
      if (h > best) best = h;
    }
  }
  return best;
}

/**
 * The k-th largest entry (1-based), by the Brys-Hubert-Struyf rounds: row i keeps the candidate
 * columns left[i] .. right[i]; entries left of left[i] are known to be larger than every
 * candidate, right of right[i] smaller.
 */
function kthLargest(ws: Workspace, p: number, q: number, k: number): number {
  const { zp, zm, left, right, above, atOrAbove, rowMid, weight, rest } = ws;
  left.fill(0, 0, p);
  right.fill(q - 1, 0, p);
  let candidates = p * q;
  let sumLeft = 0; // sum of left[i]: entries known to be larger than every candidate
  let sumEnd = p * q; // sum of right[i] + 1
  const gatherBelow = gatherLimit(p, q);
  let exact = false;
  let active = p; // rows with candidates left (as of the previous round)
  // The bounds a round's counts call for are applied row by row in the next pass over the rows
  // (KEEP_ABOVE: right[i] = above[i] - 1; KEEP_BELOW: left[i] = atOrAbove[i]), so each round
  // walks the rows twice (trial, counts); the number of candidates follows from the sums.
  let pending = KEEP_ALL;
  while (candidates > gatherBelow) {
    // Trial value: the weighted median of the rows' middle candidates (weights = candidates in
    // the row). Speed-up of ours: while rounds keep discarding at least a quarter of the
    // candidates, the weighted median is taken over every s-th row with candidates only (about
    // SAMPLE_ROWS rows); after a round that discards less, the next takes every row, as
    // published, so the O(log n) bound on rounds holds. Any trial gives the exact answer.
    const stride = exact || active <= 2 * SAMPLE_ROWS ? 1 : Math.floor(active / SAMPLE_ROWS);
    let rows = 0;
    let skip = 0;
    active = 0;
    for (let i = 0; i < p; i++) {
      let l = left[i];
      let r = right[i];
      if (pending === KEEP_ABOVE) right[i] = r = above[i] - 1;
      else if (pending === KEEP_BELOW) left[i] = l = atOrAbove[i];
      if (l <= r) {
        active++;
        if (skip > 0) {
          skip--;
          continue;
        }
        skip = stride - 1;
        rowMid[rows] = kernel(zp, zm, p, i, (l + r) >> 1);
        weight[rows] = r - l + 1;
        rows++;
      }
    }
    pending = KEEP_ALL;
    // Which weighted quantile of the middles: the median, as published, unless the wanted entry
    // sits far from the middle of the candidates (after a few rounds it lies near the edge the
    // last trial left); then one AIM nearer to it, still on the side of the bulk. A weighted
    // phi-quantile of the row middles has at least phi/2 of the candidates at or below it and
    // (1 - phi)/2 at or above it, so a round still discards at least 1/2 min(phi, 1 - phi).
    let phi = 0.5;
    if (!exact) {
      const wanted = 1 - (k - sumLeft - 0.5) / candidates; // its place among the candidates, ascending
      phi = wanted < 0.5 ? Math.min(0.5, wanted + AIM) : Math.max(0.5, wanted - AIM);
    }
    const trial = weightedQuantile(rowMid, weight, rows, phi);
    const before = candidates;
    // above[i] = #{j : H[i][j] > trial}, atOrAbove[i] = #{j : H[i][j] >= trial}.
    const sumAbove = countBoth(ws, p, trial);
    const sumAtOrAbove = ws.sumAtOrAbove;
    if (k <= sumAbove) {
      // The answer is above the trial value: keep only entries > trial.
      pending = KEEP_ABOVE;
      sumEnd = sumAbove;
    } else if (k > sumAtOrAbove) {
      // The answer is below the trial value: keep only entries < trial.
      pending = KEEP_BELOW;
      sumLeft = sumAtOrAbove;
    } else {
      // The (k+1)-th largest is the trial too when it has another entry equal to it.
      ws.next = k + 1 <= sumAtOrAbove ? trial : NaN;
      return trial;
    }
    candidates = sumEnd - sumLeft;
    exact = candidates > 0.75 * before;
  }
  // Few candidates left: gather them and select the wanted rank among them.
  let c = 0;
  for (let i = 0; i < p; i++) {
    if (pending === KEEP_ABOVE) right[i] = above[i] - 1;
    else if (pending === KEEP_BELOW) left[i] = atOrAbove[i];
    for (let j = left[i]; j <= right[i]; j++) rest[c++] = kernel(zp, zm, p, i, j);
  }
  const idx = c - (k - sumLeft); // rank from the largest -> index in ascending order
  quickselect(rest, idx, 0, c - 1);
  // The (k+1)-th largest: the largest gathered entry below the selected one, when there is one.
  let next = NaN;
  if (idx > 0) {
    next = rest[0];
    for (let t = 1; t < idx; t++) if (rest[t] > next) next = rest[t];
  }
  ws.next = next;
  return rest[idx];
}

const KEEP_ALL = 0;
const KEEP_ABOVE = 1;
const KEEP_BELOW = 2;

/**
 * The sign of H[i][j] - trial (1, 0 or -1), exactly as comparing the kernel value computed by
 * `kernel` (a division) with the trial, mostly without the division: with x = a + b and
 * y = a - b > 0 (both rounded as in `kernel`), x - trial * y beyond 1e-12 (|x| + |trial * y|)
 * either way decides it, since the rounded quotient x / y then lies more than a few units in the
 * last place from the trial on that side (the rounding errors of the product, the difference and
 * the quotient are each at most 2^-53 relative); only nearer than that is the quotient computed
 * and compared. The margin used, 2e-12 y, is at least that (|x| <= y since a >= 0 >= b, and
 * |trial| <= 1: trials are kernel values), plus 1e-300 so that values near the smallest doubles
 * always take the division. A division costs several multiplications' time, and the count walks
 * are the medcouple's inner loop.
 */
function versus(a: number, b: number, trial: number, p: number, i: number, j: number): number {
  const x = a + b;
  const y = a - b;
  if (y === 0) {
    // a = b = 0: both values tie with the median.
    const s = p - 1 - i - j;
    const h = s > 0 ? 1 : s < 0 ? -1 : 0;
    return h > trial ? 1 : h < trial ? -1 : 0;
  }
  const ty = trial * y;
  const d = x - ty;
  const margin = 2e-12 * y + 1e-300;
  if (d > margin) return 1;
  if (d < -margin) return -1;
  const h = x / y;
  return h > trial ? 1 : h < trial ? -1 : 0;
}

/**
 * For every row, above[i] = number of columns j with H[i][j] > trial and atOrAbove[i] = number
 * with H[i][j] >= trial, in one walk; returns the sum of `above` and leaves that of `atOrAbove`
 * in ws.sumAtOrAbove. Only candidate columns are examined: every column left of left[i] counts,
 * none right of right[i] does (the trial is a candidate). Both counts are non-increasing in i
 * (H decreases down each column), so one column pointer per count serves every row, walking from
 * the last row up and starting each row at max(pointer, left[i]): O(p + q), however many entries
 * tie with the trial. The >= walk starts where the > walk stopped and reuses the comparison that
 * stopped it, so without ties it costs no kernel evaluation of its own. Within each row
 * above[i] and atOrAbove[i] lie in left[i] .. right[i] + 1.
 */
function countBoth(ws: Workspace, p: number, trial: number): number {
  const { zp, zm, left, right, above, atOrAbove } = ws;
  let j = 0; // > pointer
  let j2 = 0; // >= pointer (>= j)
  let sum = 0;
  let sum2 = 0;
  for (let i = p - 1; i >= 0; i--) {
    const a = zp[i];
    if (j < left[i]) j = left[i];
    const end = right[i] + 1;
    let c = 1;
    while (j < end) {
      c = versus(a, zm[j], trial, p, i, j);
      if (c > 0) j++;
      else break;
    }
    above[i] = j;
    sum += j;
    if (j2 <= j) {
      j2 = j;
      // The > walk stopped at column j on an entry below the trial: done.
      if (c < 0) {
        atOrAbove[i] = j;
        sum2 += j;
        continue;
      }
    }
    while (j2 < end && versus(a, zm[j2], trial, p, i, j2) >= 0) j2++;
    atOrAbove[i] = j2;
    sum2 += j2;
  }
  ws.sumAtOrAbove = sum2;
  return sum;
}

/**
 * Weighted median of `v[0..m-1]` with positive weights `w` (both rearranged): the smallest value
 * whose cumulative weight (values sorted ascending) reaches half the total. Expected O(m)
 * (quickselect-style three-way partitioning on a middle pivot).
 */
export function weightedMedian(v: Float64Array, w: Float64Array, m: number): number {
  return weightedQuantile(v, w, m, 0.5);
}

/**
 * Weighted phi-quantile of `v[0..m-1]` with positive weights `w` (both rearranged): the smallest
 * value whose cumulative weight (values sorted ascending) reaches phi times the total.
 */
export function weightedQuantile(v: Float64Array, w: Float64Array, m: number, phi: number): number {
  let total = 0;
  for (let i = 0; i < m; i++) total += w[i];
  let half = total * phi;
  let lo = 0;
  let hi = m - 1;
  // Pivot: median of three pseudo-random picks (a fixed LCG, so results never depend on chance);
  // fixed positions degrade on the monotone runs the rounds produce.
  let seed = 0x2545f491;
  for (;;) {
    if (lo === hi) return v[lo];
    const range = hi - lo + 1;
    const s1 = (Math.imul(seed, 1103515245) + 12345) >>> 0;
    const s2 = (Math.imul(s1, 1103515245) + 12345) >>> 0;
    seed = (Math.imul(s2, 1103515245) + 12345) >>> 0;
    const pivot = medianOfThree(v[lo + (s1 % range)], v[lo + (s2 % range)], v[lo + (seed % range)]);
    // Three-way partition [lo, hi]: [lo, lt) < pivot, [lt, gt] == pivot, (gt, hi] > pivot.
    let lt = lo;
    let gt = hi;
    let i = lo;
    while (i <= gt) {
      const x = v[i];
      if (x < pivot) {
        swap(v, w, i, lt);
        lt++;
        i++;
      } else if (x > pivot) {
        swap(v, w, i, gt);
        gt--;
      } else i++;
    }
    let wLess = 0;
    for (let t = lo; t < lt; t++) wLess += w[t];
    let wEqual = 0;
    for (let t = lt; t <= gt; t++) wEqual += w[t];
    if (wLess >= half) {
      hi = lt - 1;
    } else if (wLess + wEqual >= half) {
      return pivot;
    } else {
      half -= wLess + wEqual;
      lo = gt + 1;
    }
  }
}

function medianOfThree(a: number, b: number, c: number): number {
  return a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
}

function swap(v: Float64Array, w: Float64Array, i: number, j: number): void {
  const tv = v[i];
  v[i] = v[j];
  v[j] = tv;
  const tw = w[i];
  w[i] = w[j];
  w[j] = tw;
}
