import { maxAttainableZ } from './methods/classic.js';
import type { MethodId } from './types.js';

/**
 * The largest score a value can reach in a group of n, whatever the amounts: a cutoff at or above
 * it can never flag anything there ("unreachable"). Infinity where scores are unbounded.
 *
 * - classic z: (n - 1) / sqrt(n) (Shiffler 1988);
 * - robust z: n = 1: 0; n = 2: both values sit one MAD from the median, so |z| = 1/1.4826 = 0.6745;
 *   n >= 3 unbounded (one value far out, MAD set by the others);
 * - IQR fences (type-7 quartiles): n = 1: 0; n = 2: 0.5; n = 3: 1; n = 4: 3 (x1 = x2 = x3 < x4:
 *   Q3 = x3 + (x4 - x3)/4); n >= 5 unbounded (Q3 no longer involves the largest value);
 * - skew-aware fences (Tukey's hinges, Tukey's unit on the short side): n <= 2: 0 (the hinges are
 *   the two values); n = 3: 0.5 (r e^(1.5 - 3r) for MC = r - 1/2 >= 0, r below); n = 4: 1 (the
 *   distance beyond the upper hinge is at most the IQR); n >= 5 unbounded;
 * - adjusted boxplot: n <= 2: 0; n = 3: e/4 = 0.68 (with r = (x3 - x2)/(x3 - x1) the medcouple of
 *   three values is r - 1/2, and r e^(2 - 4r) peaks at r = 1/4, where MC < 0 narrows the upper
 *   fence by e^(4 MC)); n = 4: at most e^4 = 54.6 (a bound, not tight);
 *   n >= 5 unbounded.
 * Derived here from the definitions (documented derivations, no published source for the fence
 * methods); checked against the engine on random samples in test/scoring/maxReach.test.ts.
 */
export function maxReach(method: MethodId, n: number): number {
  if (n <= 1) return 0;
  switch (method) {
    case 'classic':
      return maxAttainableZ(n);
    case 'robust':
      return n === 2 ? 1 / 1.4826 : Infinity;
    case 'iqr':
      return n === 2 ? 0.5 : n === 3 ? 1 : n === 4 ? 3 : Infinity;
    case 'skew':
      return n === 2 ? 0 : n === 3 ? 0.5 : n === 4 ? 1 : Infinity;
    case 'adjusted':
      return n === 2 ? 0 : n === 3 ? Math.E / 4 : n === 4 ? Math.exp(4) : Infinity;
  }
}
