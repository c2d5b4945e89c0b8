import type { Direction, Fallback, MethodId } from '../types.js';
import type { Summary } from '../summary.js';

/**
 * How one population is scored, as decided by a method from its summary. All figures are in the
 * summary's scaled units (see `Summary.unit`); the engine divides each value by `unit` first.
 *
 * - kind 'z' (robust, classic): score = (y - center) / scale; scale 0 means "no spread" and
 *   every score is 0. Flagged when the score passes the cutoff in the chosen direction.
 * - kind 'fence' (IQR, adjusted): with tHigh = (y - q3) / highScale and tLow = (q1 - y) / lowScale,
 *   the score is tHigh - k above the upper fence, -(tLow - k) below the lower fence, else 0
 *   (IQR: lowScale = highScale = scale = IQR; adjusted: the IQR times each side's skew factor).
 * - kind 'none': the population cannot be scored (rows get NaN).
 */
export interface Fit {
  readonly kind: 'z' | 'fence' | 'none';
  readonly unit: number;
  readonly center: number;
  readonly scale: number;
  /** Only for kind 'fence'. */
  readonly q1: number;
  readonly q3: number;
  /** Only for kind 'fence': the unit of distance beyond Q1 (lowScale) and beyond Q3 (highScale). */
  readonly lowScale: number;
  readonly highScale: number;
  /** Bounds on the scoring scale, scaled units; NaN = no bound that side. */
  readonly lower: number;
  readonly upper: number;
  readonly fallbacks: readonly Fallback[];
}

export interface ScoringMethod {
  readonly id: MethodId;
  /** 'z' (robust, classic) or 'fence' (IQR, adjusted, skew): how scores and reach are read. */
  readonly kind: 'z' | 'fence';
  readonly defaultCutoff: number;
  /** Plain-words name of the score, e.g. "robust z". */
  readonly scoreName: string;
  /** Published source of the method. */
  readonly source: string;
  /**
   * Decides centre, scale and bounds of one population.
   * @param s       the population's summary on the scoring scale
   * @param cutoff  cutoff on the method's score (k for IQR)
   * @param column  summary of the whole column (scoring scale); a function so that it is only
   *                computed when a method needs it (no method borrows from it since the money floor)
   * @param floor   the ignore-within amount as a unit on the summary's scale (see `floorUnit`), 0 = none:
   *                the unit of a population without a spread of its own
   */
  fit(s: Summary, cutoff: number, direction: Direction, column: () => Summary, floor?: number): Fit;
}

export const NO_FIT: Fit = { kind: 'none', unit: 1, center: NaN, scale: NaN, q1: NaN, q3: NaN, lowScale: NaN, highScale: NaN, lower: NaN, upper: NaN, fallbacks: [] };

/** Bounds center +- cutoff x scale for the sides the direction looks at. */
export function zFit(s: Summary, center: number, scale: number, cutoff: number, direction: Direction, fallbacks: Fallback[]): Fit {
  const spread = scale > 0;
  return {
    kind: 'z', unit: s.unit, center, scale: spread ? scale : 0, q1: NaN, q3: NaN, lowScale: NaN, highScale: NaN,
    lower: spread && direction !== 'high' ? center - cutoff * scale : NaN,
    upper: spread && direction !== 'low' ? center + cutoff * scale : NaN,
    fallbacks,
  };
}

/**
 * The ignore-within amount (money) as a unit on a fit's scale: `floor / unit`; on log scale the
 * ln distance from the centre to one floor above it, ln(1 + floor / e^centre), over `unit`. 0 when
 * there is no floor.
 */
export function floorUnit(floor: number, center: number, unit: number, logScale: boolean): number {
  if (!(floor > 0)) return 0;
  const f = logScale ? Math.log1p(floor / Math.exp(center * unit)) : floor;
  const u = f / unit;
  return Number.isFinite(u) && u > 0 ? u : 0;
}
