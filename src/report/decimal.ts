import type { DecimalReading } from '../scoring/types.js';

const n = (k: number, one: string, many: string): string => `${k} ${k === 1 ? one : many}`;

/**
 * One line that says how a column's text amounts were read, e.g.
 * `Amount: read with decimal comma (inferred from 12 cells such as "12,5"; none read with a decimal point)`.
 * Used by the notes sheet, the batch command's summary and the pane.
 */
export function describeDecimal(column: string, d: DecimalReading): string {
  const name = d.separator === 'comma' ? 'decimal comma' : 'decimal point';
  const other = d.separator === 'comma' ? 'decimal point' : 'decimal comma';
  const parts: string[] = [];
  if (d.how === 'given') parts.push('as set');
  else if (d.how === 'inferred') {
    const support = d.separator === 'comma' ? d.commaCells : d.pointCells;
    const against = d.separator === 'comma' ? d.pointCells : d.commaCells;
    parts.push(`inferred from ${n(support, 'cell', 'cells')} such as "${d.example ?? ''}"`);
    if (against > 0) parts.push(`${n(against, 'cell', 'cells')} written with a ${other} (such as "${d.otherExample ?? ''}") left out as text`);
  } else parts.push('no text cell showed which separator is used');
  if (d.ambiguousCells > 0) {
    const ex = d.ambiguousExample ?? '';
    parts.push(`${n(d.ambiguousCells, 'cell', 'cells')} such as "${ex}" could be read either way and were read with the ${name}`);
  }
  return `${column}: read with ${name} (${parts.join('; ')})`;
}
