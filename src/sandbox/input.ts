/**
 * What writing a value to a cell does, following Excel's interpretation of typed input, and the
 * colour and date conversions it needs.
 *
 * Pure TypeScript with no Node or DOM imports (it runs in the browser too).
 */
import { CellError, ERROR_LITERALS } from './formula.js';
import { SandboxError } from './errors.js';
import type { StoredValue } from './sheet-model.js';

/** Named HTML colours Excel accepts (subset), mapped to #RRGGBB. */
const NAMED_COLOURS: Record<string, string> = {
  black: '#000000', white: '#FFFFFF', red: '#FF0000', green: '#008000', blue: '#0000FF', yellow: '#FFFF00',
  orange: '#FFA500', purple: '#800080', gray: '#808080', grey: '#808080', silver: '#C0C0C0', navy: '#000080',
  teal: '#008080', maroon: '#800000', olive: '#808000', lime: '#00FF00', aqua: '#00FFFF', fuchsia: '#FF00FF',
};

export function normaliseColour(c: unknown, where: string): string {
  if (typeof c !== 'string') throw new SandboxError('InvalidArgument', `${where}: colour must be a string such as "#1A2B3C".`, where);
  const s = c.trim();
  if (/^#[0-9a-fA-F]{6}$/.test(s)) return s.toUpperCase();
  if (/^#[0-9a-fA-F]{3}$/.test(s)) return ('#' + s.slice(1).split('').map((x) => x + x).join('')).toUpperCase();
  const named = NAMED_COLOURS[s.toLowerCase()];
  if (named) return named;
  throw new SandboxError('InvalidArgument', `${where}: "${s}" is not a colour (use #RRGGBB or an HTML colour name).`, where);
}

/** Excel serial date (1900 system) for a UTC calendar date. */
export function dateToSerial(y: number, m: number, d: number): number {
  return Math.round((Date.UTC(y, m - 1, d) - Date.UTC(1899, 11, 30)) / 86_400_000);
}

export function serialToIso(serial: number): string {
  const ms = Date.UTC(1899, 11, 30) + Math.round(serial * 86_400_000);
  return new Date(ms).toISOString().slice(0, 10);
}

export function isDateFormat(nf: string | undefined): boolean {
  if (!nf || nf === 'General' || nf === '@') return false;
  const stripped = nf.replace(/"[^"]*"/g, '').replace(/\[[^\]]*\]/g, '');
  return /[dmy]/i.test(stripped) && !/^[#0.,%]+$/.test(stripped);
}

/** What writing one input value to a cell does, following Excel's interpretation of typed input. */
export interface CellWrite {
  v: StoredValue;
  f: string | undefined;
  qp: boolean | undefined;
  /** Number format Excel applies as a side effect (dates, percentages), only when the cell is General. */
  nf?: string;
  skip?: boolean;
}

const NUM_RE = /^[+-]?(\d+|\d{1,3}(,\d{3})+)?(\.\d+)?([eE][+-]?\d+)?$/;

/**
 * Interpret `input` as Excel does when it is written to Range.values / Range.formulas (en-US):
 * - null/undefined: cell left unchanged (Excel ignores null entries in an input array).
 * - number: stored (NaN/Infinity rejected with InvalidArgument); boolean: stored.
 * - "" clears the value.
 * - with number format "@" (Text) any string stays text, even "=x" or "123".
 * - "'text": quote prefix; stores "text" as text (Range.values returns "text").
 * - "=..." becomes a formula; "+x" / "-x" that are not numbers become formulas "=+x" / "=-x".
 * - "123", "1,234.5", "(120)", "12%", "TRUE", "#N/A", "2024-01-31" become number / boolean / error /
 *   date serial, as typed input does in Excel.
 * Anything else (objects, Date instances) is rejected with InvalidArgument: Office.js would serialise
 * it as JSON; the sandbox refuses so the bug is visible.
 */
/** Longest text a cell holds (Excel specifications and limits: 32,767 characters). */
export const MAX_CELL_TEXT = 32767;

export function interpretInput(input: unknown, currentNf: string | undefined, where: string): CellWrite {
  if (input === null || input === undefined) return { v: undefined, f: undefined, qp: undefined, skip: true };
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) throw new SandboxError('InvalidArgument', `${where}: ${input} is not a finite number.`, where);
    return { v: input, f: undefined, qp: undefined };
  }
  if (typeof input === 'boolean') return { v: input, f: undefined, qp: undefined };
  if (typeof input !== 'string') {
    throw new SandboxError('InvalidArgument', `${where}: a cell value must be a string, number or boolean (got ${input instanceof Date ? 'a Date' : typeof input}).`, where);
  }
  if (input === '') return { v: undefined, f: undefined, qp: undefined };
  if (input.length > MAX_CELL_TEXT) {
    throw new SandboxError('InvalidArgument', `${where}: the text is ${input.length} characters long; a cell holds at most ${MAX_CELL_TEXT} (Excel's specifications and limits).`, where);
  }
  if (currentNf === '@') return { v: input, f: undefined, qp: undefined };
  if (input.startsWith("'")) return { v: input.slice(1) === '' ? undefined : input.slice(1), f: undefined, qp: true };
  if (input.startsWith('=') && input.length > 1) return { v: undefined, f: input, qp: undefined };
  const s = input.trim();
  const general = currentNf === undefined || currentNf === 'General';
  if (s !== '' && NUM_RE.test(s) && /\d/.test(s)) return { v: Number(s.replace(/,/g, '')), f: undefined, qp: undefined };
  const paren = /^\((\d+|\d{1,3}(,\d{3})+)?(\.\d+)?\)$/.exec(s);
  if (paren && /\d/.test(s)) return { v: -Number(s.slice(1, -1).replace(/,/g, '')), f: undefined, qp: undefined };
  const pct = /^([+-]?(\d+|\d{1,3}(,\d{3})+)?(\.\d+)?)%$/.exec(s);
  if (pct && /\d/.test(pct[1])) {
    const dec = (pct[1].split('.')[1] ?? '').length;
    return { v: Number(pct[1].replace(/,/g, '')) / 100, f: undefined, qp: undefined, ...(general ? { nf: dec ? `0.${'0'.repeat(dec)}%` : '0%' } : {}) };
  }
  const iso = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (iso) {
    const y = Number(iso[1]); const m = Number(iso[2]); const d = Number(iso[3]);
    const dt = new Date(Date.UTC(y, m - 1, d));
    if (y >= 1900 && dt.getUTCMonth() === m - 1 && dt.getUTCDate() === d) {
      return { v: dateToSerial(y, m, d), f: undefined, qp: undefined, ...(general ? { nf: 'yyyy-mm-dd' } : {}) };
    }
  }
  const up = s.toUpperCase();
  if (up === 'TRUE' || up === 'FALSE') return { v: up === 'TRUE', f: undefined, qp: undefined };
  if (ERROR_LITERALS.includes(up)) return { v: new CellError(up), f: undefined, qp: undefined };
  if ((input.startsWith('+') || input.startsWith('-')) && input.length > 1) return { v: undefined, f: '=' + input, qp: undefined };
  return { v: input, f: undefined, qp: undefined };
}
