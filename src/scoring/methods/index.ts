import type { MethodId } from '../types.js';
import { adjustedMethod, skewMethod } from './adjusted.js';
import { classicMethod } from './classic.js';
import { iqrMethod } from './iqr.js';
import type { ScoringMethod } from './method.js';
import { robustMethod } from './robust.js';

export const METHODS: Readonly<Record<MethodId, ScoringMethod>> = {
  robust: robustMethod,
  classic: classicMethod,
  iqr: iqrMethod,
  adjusted: adjustedMethod,
  skew: skewMethod,
};

/** The method object for an id; throws a clear message for an unknown id. */
export function getMethod(id: MethodId): ScoringMethod {
  const m = (METHODS as Record<string, ScoringMethod | undefined>)[id];
  if (m === undefined) throw new Error(`Unknown scoring method "${String(id)}": use robust, classic, iqr, adjusted or skew.`);
  return m;
}

export type { Fit, ScoringMethod } from './method.js';
export { robustMethod, classicMethod, iqrMethod, adjustedMethod, skewMethod };
export { fenceFactors } from './adjusted.js';
