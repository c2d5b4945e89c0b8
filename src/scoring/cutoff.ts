import { inverseNormal } from './inverseNormal.js';
import { getMethod } from './methods/index.js';
import { normalUpperTail } from './normalCdf.js';
import { quickselect } from './quickselect.js';
import { formatCutoff, formatNumber } from './format.js';
import type { ColumnScores, Direction, MethodId, ScoreResult } from './types.js';

/** Default cutoff per method: robust 3.5 (Iglewicz & Hoaglin 1993), classic 3 (three-sigma, common practice), IQR k = 1.5 (Tukey 1977). */
export function defaultCutoff(method: MethodId): number {
  return getMethod(method).defaultCutoff;
}

/**
 * Chance that a standard normal value passes a cutoff z: one-sided P(Z > z) for 'high' and
 * (by symmetry) for 'low'; two-sided P(|Z| > z) = 2 P(Z > z) for 'both'. Uses `normalUpperTail`
 * (full precision far out). z < 0 is taken as |z|. NaN -> NaN.
 */
export function tailProbability(z: number, direction: Direction): number {
  const a = Math.abs(z);
  const one = normalUpperTail(a);
  return direction === 'both' ? Math.min(1, 2 * one) : one;
}

/**
 * "about 1 in N" for a probability p, N = 1/p rounded to 2 significant figures
 * (p = 2.326e-4 -> "about 1 in 4,300"; p = 0.05 -> "about 1 in 20"). p >= 1 -> "about 1 in 1";
 * p = 0 -> "practically never"; NaN / negative -> "n/a".
 */
export function oneInN(p: number): string {
  if (!(p >= 0)) return 'n/a';
  if (p === 0) return 'practically never';
  if (p >= 1) return 'about 1 in 1';
  const n = 1 / p;
  if (!Number.isFinite(n)) return 'practically never';
  const mag = 10 ** (Math.floor(Math.log10(n)) - 1);
  const rounded = Math.round(n / mag) * mag;
  const decimals = rounded < 10 ? 1 : 0;
  return `about 1 in ${formatNumber(rounded, decimals).replace(/\.0$/, '')}`;
}

const sideWords = (d: Direction): string => (d === 'both' ? 'away from' : d === 'high' ? 'above' : 'below');
const sideNote = (d: Direction): string =>
  d === 'both' ? ' Both sides are checked.' : d === 'high' ? ' Only the high side is checked.' : ' Only the low side is checked.';

/**
 * The distance, in SDs from the mean, of the upper IQR fence Q3 + k x IQR for normal data:
 * Q3 = mu + z75 sigma and IQR = 2 z75 sigma with z75 = Phi^-1(0.75) = 0.6745, so the fence sits at
 * z75 (1 + 2k) = 0.6745 + 1.349k SDs (k = 1.5: 2.698 SDs). Derived, via `inverseNormal`.
 */
export function iqrFenceInSds(k: number): number {
  const z75 = inverseNormal(0.75);
  return z75 * (1 + 2 * k);
}

/**
 * Plain-words meaning of a cutoff, with the chance that a value from normally distributed data
 * passes it in a large group (for IQR via the normal-equivalent fence 0.6745 + 1.349k SDs); with
 * `logScale`, "log-normally distributed". The rate at each group's own size is `GroupStats.chanceRate`.
 */
export function describeCutoff(method: MethodId, cutoff: number, direction: Direction, logScale = false): string {
  return wordsFor(logScale, describeCutoffLinear(method, cutoff, direction));
}

/** Under --log the reference distribution is the log-normal: the same figures hold for ln(amount). */
function wordsFor(logScale: boolean, text: string): string {
  return logScale ? text.replace(/normally distributed amounts/g, 'log-normally distributed amounts') : text;
}

function describeCutoffLinear(method: MethodId, cutoff: number, direction: Direction): string {
  const c = formatCutoff(cutoff);
  if (method === 'skew') {
    const p = tailProbability(iqrFenceInSds(cutoff), direction);
    return (
      `Skew-aware fences with k = ${c}: each group's skew is measured by its medcouple MC (robust, > 0 when the ` +
      `high tail is longer). On the long side the fence is the adjusted boxplot's (Hubert & Vandervieren 2008), ` +
      `Q3 + k e^(3 MC) IQR for a right-skewed group, so ordinary large claims of a skewed category are not flagged ` +
      `for the skew alone; on the short side it is Tukey's, Q1 - k IQR. k = 3 is Tukey's "far out" step. Quartiles ` +
      `are Tukey's hinges. For normally distributed amounts (MC = 0) the fences sit ${formatNumber(iqrFenceInSds(cutoff), 2)} ` +
      `SDs from the mean, and ${oneInN(p)} values would pass them by chance in a large group.`
    );
  }
  if (method === 'adjusted') {
    const p = tailProbability(iqrFenceInSds(cutoff), direction);
    const fences = direction === 'both'
      ? 'below Q1 - k e^(-4 MC) IQR or above Q3 + k e^(3 MC) IQR'
      : direction === 'high' ? 'above Q3 + k e^(3 MC) IQR' : 'below Q1 - k e^(-4 MC) IQR';
    return (
      `Adjusted boxplot fences with k = ${c}: a value is flagged when it lies ${fences} of its group, where MC is the ` +
      `group's medcouple (a robust measure of skew, > 0 when the high tail is longer; for MC < 0 the exponents are ` +
      `mirrored: e^(-3 MC) below, e^(4 MC) above). A right-skewed group so gets a longer upper fence, and ordinary ` +
      `large claims in a skewed category are not flagged for the skew alone. Quartiles are Tukey's hinges. For ` +
      `normally distributed amounts (MC = 0) the fences are Tukey's, ${formatNumber(iqrFenceInSds(cutoff), 2)} SDs from ` +
      `the mean, and ${oneInN(p)} values would pass them by chance in a large group.`
    );
  }
  if (method === 'iqr') {
    const sds = iqrFenceInSds(cutoff);
    const p = tailProbability(sds, direction);
    const fences = direction === 'both' ? 'below Q1 - k x IQR or above Q3 + k x IQR' : direction === 'high' ? 'above Q3 + k x IQR' : 'below Q1 - k x IQR';
    return (
      `IQR fences with k = ${c}: a value is flagged when it lies ${fences} of its group ` +
      `(IQR = Q3 - Q1, quartiles as QUARTILE.INC computes them). For normally distributed amounts the fence ` +
      `sits ${formatNumber(sds, 2)} SDs from the mean (0.6745 + 1.349 x ${c}), so ${oneInN(p)} values would pass it by chance.`
    );
  }
  const p = tailProbability(cutoff, direction);
  const what = method === 'robust'
    ? `more than ${c} scaled MADs (1.4826 x median absolute deviation) ${sideWords(direction)} its group's median`
    : `more than ${c} standard deviations ${sideWords(direction)} its group's mean`;
  const tail = `${sideNote(direction).trim()} For normally distributed amounts, ${oneInN(p)} values would pass this by chance.`;
  const extra = method === 'classic'
    ? ' A few large amounts raise the mean and SD together and can hide one another (masking); in a group of n, |z| cannot exceed (n - 1)/sqrt(n).'
    : ' The median and MAD are not pulled by the unusual amounts themselves, so several of them cannot hide one another.';
  return `${method === 'robust' ? 'Robust' : 'Classic'} z cutoff ${c}: a value is flagged when it lies ${what}. ${tail}${extra}`;
}

/**
 * Per row, the largest cutoff at which the row is still flagged in the column's direction
 * (robust / classic: z, -z or |z|; IQR: `fenceMultiple`); NaN for rows that can never be flagged
 * (not scored). Rows of no-spread / SD-zero groups have 0 and so are never flagged at a cutoff >= 0.
 */
function reachOf(col: ColumnScores): Float64Array {
  if (getMethod(col.method).kind === 'fence') {
    if (col.fenceMultiple === undefined) throw new Error('Fence scores lack fenceMultiple: re-run scoreTable with this version of Tailmark.');
    return col.fenceMultiple;
  }
  const out = new Float64Array(col.scores.length);
  const s = col.scores;
  for (let r = 0; r < s.length; r++) {
    const z = s[r];
    out[r] = col.direction === 'high' ? z : col.direction === 'low' ? -z : Math.abs(z);
  }
  return out;
}

/**
 * How many rows (in total and per group index of `col.groups`) would be flagged at another
 * cutoff, without re-scoring: a row counts when its reach (see above) exceeds `cutoff`, which is
 * exactly the engine's flag rule. For robust and classic z the scores do not depend on the cutoff,
 * so this is exact. For IQR it uses `fenceMultiple` (filled by scoreTable), also exact; the IQR
 * scores themselves (IQRs beyond the fence) do depend on k, so to get new scores re-run scoreTable.
 * Cost O(rows).
 */
export function countFlaggedAt(col: ColumnScores, cutoff: number): { total: number; perGroup: Int32Array } {
  const reach = reachOf(col);
  const perGroup = new Int32Array(col.groups.length);
  let total = 0;
  for (let r = 0; r < reach.length; r++) {
    if (reach[r] > cutoff) {
      perGroup[col.groupOf[r]]++;
      total++;
    }
  }
  return { total, perGroup };
}

/**
 * Per row of the table, the largest cutoff at which it is still flagged in at least one value
 * column (the largest of its columns' reaches, see `reachOf`); NaN for rows no column scored. A
 * row flagged by several columns is one claim to review. Cost O(rows x value columns).
 */
export function reachOfRows(result: ScoreResult): Float64Array {
  const out = new Float64Array(result.rowCount).fill(NaN);
  for (const col of result.columns) {
    const reach = reachOf(col);
    for (let r = 0; r < out.length; r++) {
      const t = reach[r];
      if (t > out[r] || (Number.isNaN(out[r]) && !Number.isNaN(t))) out[r] = t;
    }
  }
  return out;
}

/**
 * The smallest cutoff (z for robust / classic, k for IQR; never below 0) at which at most
 * `budget` rows of the column are flagged. With reaches t(1) >= t(2) >= ..., the answer is
 * t(budget + 1) (flagging needs reach > cutoff, so rows tied at that value are not flagged and the
 * budget is never exceeded, even with ties); 0 when fewer than budget + 1 rows can be flagged.
 * Cost O(rows) expected (quickselect). budget < 0 or NaN is treated as 0.
 */
export function cutoffForBudget(col: ColumnScores, budget: number): number {
  const reach = reachOf(col);
  const b = budget >= 0 ? Math.floor(budget) : 0;
  const buf = new Float64Array(reach.length);
  let n = 0;
  for (let r = 0; r < reach.length; r++) {
    const t = reach[r];
    if (t > 0) buf[n++] = t; // rows with reach <= 0 are never flagged at a cutoff >= 0
  }
  if (n <= b) return 0;
  // (b + 1)-th largest = index n - 1 - b in ascending order.
  const k = n - 1 - b;
  quickselect(buf, k, 0, n - 1);
  return buf[k];
}
