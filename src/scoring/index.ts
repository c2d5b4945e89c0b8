/** Public API of the scoring engine. Other layers import from '../scoring/index.js' only. */
export * from './types.js';
export { parseCell, EXCEL_ERROR_LITERALS } from './parseCell.js';
export { groupRows, keyPart, BLANK_KEY_LABEL, ALL_ROWS_LABEL, KEY_SEPARATOR, LABEL_SEPARATOR, type Grouping } from './groups.js';
export { scoreTable, resolveOptions, WHOLE_COLUMN_LABEL } from './scoreTable.js';
export { explainRow } from './explainRow.js';
export { formatNumber, formatScore, formatCutoff } from './format.js';
export { defaultCutoff, tailProbability, oneInN, describeCutoff, cutoffForBudget, countFlaggedAt, iqrFenceInSds } from './cutoff.js';
export { METHODS, getMethod, robustMethod, classicMethod, iqrMethod, type ScoringMethod, type Fit } from './methods/index.js';
export { maxAttainableZ } from './methods/classic.js';
export { median } from './median.js';
export { quantile } from './quantile.js';
export { mad, MAD_NORMAL_CONSTANT } from './mad.js';
export { meanAbsoluteDeviation, MEANAD_NORMAL_CONSTANT } from './meanAbsoluteDeviation.js';
export { mean } from './mean.js';
export { sampleStandardDeviation } from './sampleStandardDeviation.js';
export { erfc, normalCdf, normalUpperTail } from './normalCdf.js';
export { inverseNormal } from './inverseNormal.js';
export { quickselect } from './quickselect.js';
