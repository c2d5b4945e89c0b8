/** Cell input shape checks and displayed text, shared by the range and table-column proxies. */
import { type Rect, formatRect } from './address.js';
import { isDateFormat, serialToIso } from './model.js';
import { generalText } from './formula.js';
import { err } from './proxy-base.js';

type Grid = unknown[][];

function isGrid(x: unknown): x is Grid {
  return Array.isArray(x) && x.every((row) => Array.isArray(row));
}

/** Shape check: a 2-D array must match the range exactly; a non-array scalar is broadcast to every cell (Excel accepts that at run time, though @types/office-js types it as any[][]). */
export function cellInput(input: unknown, r: Rect, where: string): (i: number, j: number) => unknown {
  if (Array.isArray(input)) {
    if (!isGrid(input)) throw err('InvalidArgument', `${where}: expected a 2-D array (array of rows).`, where);
    if (input.length !== r.rows || input.some((row) => row.length !== r.cols)) {
      const got = `${input.length} x ${input[0]?.length ?? 0}`;
      throw err('InvalidArgument', `${where}: the array is ${got} but the range ${formatRect(r)} is ${r.rows} x ${r.cols}. The number of rows or columns in the input array doesn't match the size or dimensions of the range.`, where);
    }
    return (i, j) => input[i][j];
  }
  return () => input;
}

export function formatText(v: unknown, nf: string | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') {
    if (!nf || nf === 'General') return generalText(v);
    if (nf === '@') return generalText(v);
    if (isDateFormat(nf)) return serialToIso(v);
    const pct = nf.endsWith('%');
    const core = pct ? nf.slice(0, -1) : nf;
    const dec = (core.split('.')[1] ?? '').replace(/[^0#]/g, '').length;
    const x = pct ? v * 100 : v;
    let s = Math.abs(x).toFixed(dec);
    if (core.includes(',')) {
      const [ip, fp] = s.split('.');
      s = ip.replace(/\B(?=(\d{3})+(?!\d))/g, ',') + (fp !== undefined ? '.' + fp : '');
    }
    return (x < 0 ? '-' : '') + s + (pct ? '%' : '');
  }
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  return String(v);
}
