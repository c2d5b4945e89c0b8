/**
 * Totals rows: a row whose label says total ("Total", "Grand total", "Totals", "Sum", "Subtotal", and
 * the same words in a few languages of our users: "Gesamt", "Summe", "Totaal", "Totale", "Somme",
 * "Suma") or that holds Excel's SUBTOTAL function (what a table's totals row computes) is not a claim.
 * The last data row of a table is left out when it is such a row, with the reason in the notes.
 * Pure; the word list is common practice, no source.
 */
import type { RawCell } from '../scoring/types.js';

const TOTAL_LABEL = /^(?:grand\s+total|sub-?total|totals?|sum|gesamt(?:summe)?|summe|totaal|totale|somme|suma|total\s+g[ée]n[ée]ral)\s*:?\s*(?:[A-Z]{3}|[£$€¥])?$/i;

/** True when the whole text is a totals label ("Total", "Grand total:", "TOTAL EUR"; not "Total travel costs"). */
export function isTotalLabel(text: string): boolean {
  // Cheap first look (this runs on every text cell of a large file): the first non-space letter.
  let i = 0;
  while (i < text.length && text.charCodeAt(i) <= 32) i++;
  const c = text.charCodeAt(i) | 0x20; // lower-case ASCII letter
  if (c !== 116 /* t */ && c !== 115 /* s */ && c !== 103 /* g */) return false;
  const t = text.trim();
  return t.length <= 40 && TOTAL_LABEL.test(t);
}

/** True when a formula (without "=") is one a totals row holds: SUBTOTAL(...) or a table's total formula. */
export function isTotalFormula(formula: string): boolean {
  return /^\s*(?:_xlfn\.)?SUBTOTAL\s*\(/i.test(formula);
}

/** True when any text cell of the row is a totals label. */
export function rowSaysTotal(cells: Iterable<RawCell>): boolean {
  for (const v of cells) if (typeof v === 'string' && isTotalLabel(v)) return true;
  return false;
}
