/**
 * The money floor ("ignore within", setting `ignoreWithin`, --ignore-within): a claim within that
 * amount of the centre of the population it was scored against (its group, or the whole column for
 * a pooled small group) is never flagged, whatever its score. The centre is the method's own
 * (median for robust z, IQR, adjusted and skew-aware fences; mean for classic z), in the amounts'
 * units (e^centre on log scale). "Within" is |amount - centre| <= floor, compared with a tolerance
 * of 1e-9 of the larger of the two magnitudes (and of 1), so that binary rounding of amounts in
 * cents does not decide it (45.01 is within 0.01 of 45.00).
 *
 * Why: a statistical score measures distance in units of the group's spread; when the spread is
 * tiny (a fixed allowance claimed the same way by nearly everyone) a difference of a cent is many
 * spreads and scores high, yet is not worth a reviewer's time. The floor is a rule of the review,
 * in money, set by the reviewer (common practice, no source).
 */

/** True when `amount` lies within `floor` of `centre` (see the tolerance above). */
export function isWithinFloor(amount: number, centre: number, floor: number): boolean {
  if (!(floor > 0)) return false;
  const d = Math.abs(amount - centre);
  return d - floor <= 1e-9 * Math.max(1, Math.abs(amount), Math.abs(centre));
}

/** The money centre of a fit: centre x unit, and e^ that on log scale; NaN when not scored. */
export function moneyCentre(center: number, unit: number, logScale: boolean): number {
  const c = center * unit;
  return logScale ? Math.exp(c) : c;
}

/**
 * Applies the floor to a column's scored rows: marks every scored row within the floor of its
 * population's centre in the returned array, and unflags the flagged ones among them (updating
 * `flaggedPerGroup`, counting them in `withinPerGroup`). `centreOf[g]` is the money centre of the
 * population group g's rows were scored against. Scores are left as they are. O(rows).
 */
export function applyMoneyFloor(
  floor: number, values: Float64Array, population: Uint8Array, groupOf: Int32Array, centreOf: Float64Array,
  flagged: Uint8Array, flaggedPerGroup: Int32Array, withinPerGroup: Int32Array,
): Uint8Array {
  const n = values.length;
  const within = new Uint8Array(n);
  for (let r = 0; r < n; r++) {
    if (population[r] === 0) continue;
    const g = groupOf[r];
    if (!isWithinFloor(values[r], centreOf[g], floor)) continue;
    within[r] = 1;
    if (flagged[r] === 1) {
      flagged[r] = 0;
      flaggedPerGroup[g]--;
      withinPerGroup[g]++;
    }
  }
  return within;
}
