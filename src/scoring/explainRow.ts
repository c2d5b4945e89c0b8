import { getMethod } from './methods/index.js';
import { formatCutoff, formatNumber, formatScore } from './format.js';
import { FALLBACK_WORDS } from './fallbacks.js';
import { EXCLUSION_LABELS, EXCLUSION_REASONS, type ColumnScores, type Direction, type GroupStats, type ScoreResult } from './types.js';

const directionWords = (d: Direction): string => (d === 'both' ? 'both directions' : d === 'high' ? 'high side only' : 'low side only');

const q = (label: string): string => `"${label}"`;

/**
 * One row's result in plain words with its numbers, e.g.
 * `Amount 1,840.00 is 6.2 robust z above the median of its group "CC-410 / Travel" (median 212.00,
 * scaled MAD 61.30, n = 24); cutoff 3.5, both directions. Flagged.`
 * Says why an excluded row was not scored, that a pooled row was compared with the whole column
 * (group n < minimum), that a skipped row was left unscored, and which fallback was used.
 * Amounts have 2 decimals with thousands separators; scores 1-2 decimals. `row` is 0-based.
 */
export function explainRow(result: ScoreResult, col: ColumnScores, row: number): string {
  if (!(row >= 0 && row < col.scores.length) || !Number.isInteger(row)) {
    return `Row ${row} is outside the table (data rows 0 to ${col.scores.length - 1}).`;
  }
  const g = col.groups[col.groupOf[row]];
  const groupText = result.groupColumns.length === 0 ? 'the whole column' : `its group ${q(g.label)}`;
  const name = col.column;
  const e = col.exclusion[row];
  if (e !== 0) {
    const reason = EXCLUSION_REASONS[e - 1];
    const where = result.groupColumns.length === 0 ? '' : ` (group ${q(g.label)})`;
    return `${name} not scored: ${EXCLUSION_LABELS[reason]}${where}.`;
  }
  const v = col.values[row];
  const amount = `${name} ${formatNumber(v)}`;
  const pop = col.population[row];
  const min = result.options.minGroupSize;
  if (pop === 0) {
    if (g.fallbacks.includes('small-skipped') || g.fallbacks.includes('small-pooled')) {
      return `${amount} was left unscored: ${groupText} has n = ${g.n} usable values, fewer than the minimum ${min}.`;
    }
    const why = g.fallbacks.includes('iqr-zero')
      ? 'its IQR is 0 and so is the whole column\'s, so there is no unit to measure by'
      : 'there are no usable values to compare with';
    return `${amount} was left unscored: in ${groupText} ${why}.`;
  }
  const stats: GroupStats = pop === 2 ? col.pooled : g;
  const against = pop === 2 ? `the whole column ${q(name)}` : groupText;
  const pooledNote = pop === 2 ? `Compared with the whole column because its group ${q(g.label)} has n = ${g.n} < ${min}. ` : '';
  const z = col.scores[row];
  const flagged = col.flagged[row] === 1;
  const log = col.logScale;
  // The pooled note above already says why a small group was compared with the whole column.
  const fallbacks = stats.fallbacks.filter((f) => f !== 'small-pooled' && f !== 'small-skipped').map((f) => FALLBACK_WORDS[f]);
  const tail = `${pooledNote}${flagged ? 'Flagged.' : 'Not flagged.'}${fallbacks.length > 0 ? ' ' + fallbacks.join(' ') : ''}`;
  const fenceMethod = getMethod(col.method).kind === 'fence';
  const cut = `${fenceMethod ? 'k = ' : 'cutoff '}${formatCutoff(col.cutoff)}, ${directionWords(col.direction)}`;
  const logNote = log ? ' (log scale)' : '';
  const centreText = (c: number | null): string => (c === null ? 'n/a' : log ? `${formatNumber(Math.exp(c))} (ln ${formatNumber(c, 3)})` : formatNumber(c));
  const scaleText = (v: number | null): string => (v === null ? '0' : log ? `${formatNumber(v, 3)} in ln units` : formatNumber(v));

  if (fenceMethod) {
    const adjusted = col.method !== 'iqr';
    const fences = stats.lower !== null && stats.upper !== null
      ? `fences ${formatNumber(stats.lower)} to ${formatNumber(stats.upper)}`
      : stats.upper !== null ? `upper fence ${formatNumber(stats.upper)}` : stats.lower !== null ? `lower fence ${formatNumber(stats.lower)}` : 'no fences';
    const iqrName = stats.fallbacks.includes('iqr-zero') ? "column's IQR" : 'IQR';
    const mc = stats.medcouple;
    const figures = adjusted
      ? `${fences}, ${iqrName}${log ? ' of ln amounts' : ''} ${formatNumber(stats.scale ?? 0, 3)} (between Tukey's hinges), medcouple ${mc === null ? 'n/a' : formatNumber(mc, 2)}, n = ${stats.n}`
      : log
        ? `${fences}, ${iqrName} of ln amounts ${formatNumber(stats.scale ?? 0, 3)}, n = ${stats.n}`
        : `Q1 ${fmtQ(stats, 'low')}, Q3 ${fmtQ(stats, 'high')}, ${iqrName} ${scaleText(stats.scale)}, ${fences}, n = ${stats.n}`;
    const unitWord = adjusted ? 'skew-adjusted IQRs' : 'IQRs';
    const where = z > 0
      ? `is ${formatScore(z)} ${unitWord}${logNote} above the upper fence of ${against}`
      : z < 0
        ? `is ${formatScore(-z)} ${unitWord}${logNote} below the lower fence of ${against}`
        : `lies between the fences${logNote} of ${against}`;
    return `${amount} ${where} (${figures}); ${cut}. ${tail}`;
  }
  const robust = col.method === 'robust';
  const side = z > 0 ? 'above' : z < 0 ? 'below' : 'at';
  const centreName = robust ? 'median' : 'mean';
  const scaleName = robust ? (stats.fallbacks.includes('mad-zero-used-meanad') ? '1.2533 x mean abs. deviation' : 'scaled MAD') : 'SD';
  const scoreWords = `${formatScore(Math.abs(z))} ${robust ? 'robust z' : 'classic z'}${logNote}`;
  const lead = side === 'at' ? `is at the ${centreName}${logNote} of ${against}` : `is ${scoreWords} ${side} the ${centreName} of ${against}`;
  return `${amount} ${lead} (${centreName} ${centreText(stats.center)}, ${scaleName} ${scaleText(stats.scale)}, n = ${stats.n}); ${cut}. ${tail}`;
}

function fmtQ(s: GroupStats, which: 'low' | 'high'): string {
  const v = s.fenceFrom === null ? null : s.fenceFrom[which];
  return v === null ? 'n/a' : formatNumber(v);
}

/**
 * The same result in a few words for a cell (the "why" column), e.g. `6.2 robust z above median
 * 212.00` or `not scored: blank cell`; the full sentence is `explainRow` (the pane shows it). At
 * most about 60 characters for ordinary amounts. O(1) per row.
 */
export function explainRowShort(result: ScoreResult, col: ColumnScores, row: number): string {
  if (!(row >= 0 && row < col.scores.length) || !Number.isInteger(row)) return 'outside the table';
  const g = col.groups[col.groupOf[row]];
  const e = col.exclusion[row];
  if (e !== 0) return `not scored: ${EXCLUSION_LABELS[EXCLUSION_REASONS[e - 1]]}`;
  const pop = col.population[row];
  if (pop === 0) {
    return g.fallbacks.includes('small-skipped') || g.fallbacks.includes('small-pooled')
      ? `not scored: group of ${g.n} (< ${result.options.minGroupSize})`
      : 'not scored: no spread to measure by';
  }
  const stats: GroupStats = pop === 2 ? col.pooled : g;
  const vsColumn = pop === 2 ? ' (whole column)' : '';
  const z = col.scores[row];
  const log = col.logScale;
  const centre = (c: number | null): string => (c === null ? 'n/a' : formatNumber(log ? Math.exp(c) : c));
  if (col.method === 'iqr') {
    if (z > 0) return `${formatScore(z)} IQRs above upper fence ${stats.upper === null ? 'n/a' : formatNumber(stats.upper)}${vsColumn}`;
    if (z < 0) return `${formatScore(-z)} IQRs below lower fence ${stats.lower === null ? 'n/a' : formatNumber(stats.lower)}${vsColumn}`;
    return `within the fences${vsColumn}`;
  }
  const robust = col.method === 'robust';
  const centreName = robust ? 'median' : 'mean';
  if (z === 0) return `at the ${centreName}${vsColumn}`;
  return `${formatScore(Math.abs(z))} ${robust ? 'robust z' : 'z'} ${z > 0 ? 'above' : 'below'} ${centreName} ${centre(stats.center)}${vsColumn}`;
}
