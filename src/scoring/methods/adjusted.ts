import type { Fallback } from '../types.js';
import { type Fit, NO_FIT, type ScoringMethod, spreadForZeroIqr } from './method.js';

/**
 * Adjusted boxplot for skewed data (Hubert & Vandervieren 2008): with the medcouple MC of the
 * group (robust skewness, see `medcouple.ts`), IQR = upper hinge - lower hinge and multiplier k
 * (default 1.5), the fences are
 *
 *   MC >= 0:  [Q1 - k e^(-4 MC) IQR,  Q3 + k e^(3 MC) IQR]
 *   MC <  0:  [Q1 - k e^(-3 MC) IQR,  Q3 + k e^(4 MC) IQR]
 *
 * so a right-skewed group (MC > 0) gets a longer upper whisker and a shorter lower one. For a
 * symmetric group (MC = 0) these are Tukey's fences. Quartiles: Tukey's hinges (R `fivenum`), as
 * in robustbase's `adjboxStats`, the implementation the method's authors published, so that the
 * fences match it exactly; they can differ slightly from QUARTILE.INC (see `tukeyHinges.ts`).
 * The score is how many side-adjusted IQRs beyond the fence a value lies: (x - Q3)/(e^(3MC) IQR) - k
 * above the upper fence (for MC >= 0), minus that below the lower fence, 0 between. The cutoff of
 * this method is k.
 *
 * Cost: O(n log n) per group (one sort: hinges and the medcouple by the Brys-Hubert-Struyf
 * algorithm). Degenerate input: IQR = 0 -> as the IQR method ('iqr-zero'). Empty: not scored.
 *
 * Source: M. Hubert & E. Vandervieren, "An adjusted boxplot for skewed distributions",
 * Computational Statistics & Data Analysis 52(12):5186-5201, 2008; medcouple: G. Brys, M. Hubert &
 * A. Struyf, Journal of Computational and Graphical Statistics 13(4), 2004. Checked against R
 * robustbase `adjboxStats` (test/reference/make-r-medcouple.R).
 */
export const adjustedMethod: ScoringMethod = {
  id: 'adjusted',
  defaultCutoff: 1.5,
  scoreName: 'adjusted IQRs beyond the fence',
  source: 'Hubert & Vandervieren (2008) adjusted boxplot; medcouple of Brys, Hubert & Struyf (2004)',
  fit(s, k, direction, columnSummary) {
    if (s.n === 0) return NO_FIT;
    const fallbacks: Fallback[] = [];
    const q1 = s.hingeLow;
    const q3 = s.hingeHigh;
    const mc = s.medcouple;
    let iqr = q3 - q1;
    if (!(iqr > 0)) {
      fallbacks.push('iqr-zero');
      iqr = spreadForZeroIqr(s, columnSummary);
      if (!(iqr > 0)) return { ...NO_FIT, unit: s.unit, center: s.median, q1, q3, fallbacks };
    }
    const lowFactor = mc >= 0 ? Math.exp(-4 * mc) : Math.exp(-3 * mc);
    const highFactor = mc >= 0 ? Math.exp(3 * mc) : Math.exp(4 * mc);
    const fit: Fit = {
      kind: 'fence', unit: s.unit, center: s.median, scale: iqr, q1, q3,
      lowScale: lowFactor * iqr, highScale: highFactor * iqr,
      lower: direction !== 'high' ? q1 - k * lowFactor * iqr : NaN,
      upper: direction !== 'low' ? q3 + k * highFactor * iqr : NaN,
      fallbacks,
    };
    return fit;
  },
};
