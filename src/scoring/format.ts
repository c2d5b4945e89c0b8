/**
 * Locale-independent number formatting for explanations and notes: thousands separated by ",",
 * "." as decimal point, "-" for negatives, a fixed number of decimals (default 2, for amounts).
 * Non-finite input -> "n/a". Magnitudes of 1e21 and above use exponent notation.
 * Examples: formatNumber(1840) = "1,840.00"; formatNumber(-1234567.891, 1) = "-1,234,567.9".
 */
export function formatNumber(x: number, decimals = 2): string {
  if (!Number.isFinite(x)) return 'n/a';
  const d = Math.max(0, Math.min(20, Math.floor(decimals)));
  if (Math.abs(x) >= 1e21) return x.toExponential(Math.max(2, d));
  let s = Math.abs(x).toFixed(d);
  const neg = x < 0 && /[1-9]/.test(s);
  const dot = s.indexOf('.');
  let int = dot < 0 ? s : s.slice(0, dot);
  const frac = dot < 0 ? '' : s.slice(dot);
  let grouped = '';
  while (int.length > 3) {
    grouped = ',' + int.slice(-3) + grouped;
    int = int.slice(0, -3);
  }
  s = int + grouped + frac;
  return neg ? '-' + s : s;
}

/** A score for reading: 2 decimals below 1 in size (0.45), 1 decimal otherwise (6.2, 12.5). */
export function formatScore(z: number): string {
  if (!Number.isFinite(z)) return 'n/a';
  return formatNumber(z, Math.abs(z) < 1 ? 2 : 1);
}

/**
 * A score shown beside the cutoff it is compared with: as `formatScore`, with more decimals (up to
 * 15) when that rounding would put the shown number on the other side of the cutoff or on it, so
 * that a flagged 3.504 at cutoff 3.5 reads "3.504", never "3.5". The flag is decided on the full
 * value (the one written to the sheet, formatted to 2 decimals there); this keeps the words honest.
 */
export function formatScoreAgainst(z: number, cutoff: number): string {
  if (!Number.isFinite(z)) return 'n/a';
  const side = (v: number): number => (v > cutoff ? 1 : v < cutoff ? -1 : 0);
  let d = Math.abs(z) < 1 ? 2 : 1;
  let s = formatNumber(z, d);
  while (d < 15 && side(Number(s.replace(/,/g, ''))) !== side(z)) s = formatNumber(z, ++d);
  return s;
}

/** A cutoff as typed: up to 4 decimals, trailing zeros dropped (3.5, 3, 1.5, 2.25). */
export function formatCutoff(c: number): string {
  if (!Number.isFinite(c)) return 'n/a';
  return formatNumber(c, 4).replace(/\.?0+$/, '');
}
