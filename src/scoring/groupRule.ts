import { fenceFactors } from './methods/adjusted.js';
import { formatNumber } from './format.js';
import type { MethodId } from './types.js';

/** |medcouple| up to this is called "about symmetric" in the words below (a wording threshold only; no rule depends on it). */
export const SYMMETRIC_MC = 0.1;

/**
 * Which rule a group was scored with and why, in plain words, from the method and the group's
 * medcouple, e.g. "right-skewed (medcouple 0.42): upper fence at Q3 + k x 3.53 IQR (e^(3 MC)),
 * lower fence at Q1 - k x 1 IQR (Tukey's)". For robust, classic and IQR the rule does not depend
 * on skew and the words say so. null medcouple (empty group): "no values".
 */
export function describeGroupRule(method: MethodId, medcouple: number | null): string {
  if (method === 'robust') return 'robust z (median and scaled MAD); skew not taken into account';
  if (method === 'classic') return 'classic z (mean and SD); skew not taken into account';
  if (method === 'iqr') return "Tukey's fences (Q1 - k IQR, Q3 + k IQR); skew not taken into account";
  if (medcouple === null) return 'no values';
  const { low, high } = fenceFactors(medcouple, method === 'skew');
  const shape = Math.abs(medcouple) <= SYMMETRIC_MC ? 'about symmetric' : medcouple > 0 ? 'right-skewed (long high tail)' : 'left-skewed (long low tail)';
  const word = (f: number, exp: string): string => (f === 1 ? "1 IQR (Tukey's)" : `${formatNumber(f, 2)} IQR (${exp})`);
  const mcPos = medcouple >= 0;
  const up = word(high, mcPos ? 'e^(3 MC)' : 'e^(4 MC)');
  const down = word(low, mcPos ? 'e^(-4 MC)' : 'e^(-3 MC)');
  return `${shape}, medcouple ${formatNumber(medcouple, 2)}: upper fence at Q3 + k x ${up}, lower fence at Q1 - k x ${down}`;
}
