/**
 * The preview page's CSV opening goes through the one tabular reader (src/table): delimiter
 * sniffing, header row below any titles, a totals row left out. Cells stay text for the parse step.
 */
import { readDelimited, tableRows } from '../table/delimited.js';

export function parseCsv(text: string): (string | null)[][] {
  return tableRows(readDelimited(new TextEncoder().encode(text), 'file'));
}
