/**
 * Seeded generator of invented, skewed expense claims for the skew tests (no real data): groups of
 * 30 to 2,000 claims (log-uniform sizes) drawn from four families, ten groups each:
 * - lognormal, sigma 0.5 to 1.2 (meals, hotels);
 * - gamma, shape 0.8 to 2 (Marsaglia & Tsang 2000 sampler; shape < 1 by the a + 1 boost);
 * - Pareto, alpha 2.5 to 4 (heavy upper tail, by inversion);
 * - normal, coefficient of variation 0.1 to 0.2 (fixed-price items);
 * amounts rounded to cents. In every group 1 to 3 claims are replaced by planted anomalies "far in
 * the upper tail": 3 to 6 times the family's 99.9th percentile (lognormal, Pareto and normal exact;
 * gamma by the Wilson & Hilferty 1931 approximation, well within the factor 3 to 6).
 */
import { mulberry32 } from '../../src/demo/random.js';

export type Family = 'lognormal' | 'gamma' | 'pareto' | 'normal';
export interface SkewedGroup {
  readonly key: string;
  readonly family: Family;
  /** e.g. "lognormal sigma 0.83". */
  readonly description: string;
  readonly values: readonly number[];
  /** true where the claim is a planted anomaly. */
  readonly planted: readonly boolean[];
}

const Z999 = 3.090232306167813; // Phi^-1(0.999)

export function skewedClaims(seed = 20261202): SkewedGroup[] {
  const u = mulberry32(seed);
  const normal = (): number => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  const gamma = (a: number): number => {
    if (a < 1) return gamma(a + 1) * Math.pow(1 - u(), 1 / a);
    const d = a - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number;
      let v: number;
      do {
        x = normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      if (Math.log(1 - u()) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
    }
  };
  const groups: SkewedGroup[] = [];
  const families: Family[] = ['lognormal', 'gamma', 'pareto', 'normal'];
  for (const family of families) {
    for (let k = 0; k < 10; k++) {
      const n = Math.round(Math.exp(Math.log(30) + u() * (Math.log(2000) - Math.log(30))));
      let draw: () => number;
      let q999: number;
      let description: string;
      if (family === 'lognormal') {
        const s = 0.5 + 0.7 * u();
        const mu = 3 + 3 * u();
        draw = () => Math.exp(mu + s * normal());
        q999 = Math.exp(mu + s * Z999);
        description = `lognormal sigma ${s.toFixed(2)}`;
      } else if (family === 'gamma') {
        const a = 0.8 + 1.2 * u();
        const scale = 20 + 200 * u();
        draw = () => scale * gamma(a);
        q999 = scale * a * (1 - 1 / (9 * a) + Z999 * Math.sqrt(1 / (9 * a))) ** 3;
        description = `gamma shape ${a.toFixed(2)}`;
      } else if (family === 'pareto') {
        const alpha = 2.5 + 1.5 * u();
        const xm = 20 + 100 * u();
        draw = () => xm / Math.pow(1 - u(), 1 / alpha);
        q999 = xm / Math.pow(0.001, 1 / alpha);
        description = `Pareto alpha ${alpha.toFixed(2)}`;
      } else {
        const m = 200 + 600 * u();
        const sd = m * (0.1 + 0.1 * u());
        draw = () => m + sd * normal();
        q999 = m + sd * Z999;
        description = `normal cv ${(sd / m).toFixed(2)}`;
      }
      const values: number[] = [];
      const planted: boolean[] = [];
      for (let i = 0; i < n; i++) {
        values.push(Math.round(draw() * 100) / 100);
        planted.push(false);
      }
      const plants = 1 + Math.floor(u() * 3);
      for (let i = 0; i < plants; i++) {
        const at = Math.floor(u() * n);
        values[at] = Math.round(q999 * (3 + 3 * u()) * 100) / 100;
        planted[at] = true;
      }
      groups.push({ key: `${family.slice(0, 3).toUpperCase()}-${String(k + 1).padStart(2, '0')}`, family, description, values, planted });
    }
  }
  return groups;
}
