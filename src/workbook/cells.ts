/**
 * Turning what Excel returns for a cell (value, value type, number format) into a RawCell, and
 * recognising date number formats. Pure.
 */
import type { RawCell } from '../scoring/types.js';

const dateFormatCache = new Map<string, boolean>();

/**
 * True when an Excel number format displays a date or time (contains d, m, y, h or s outside
 * quoted text, escapes and [colour]/[$-locale] brackets; [h] [m] [s] elapsed-time brackets count).
 * "General", "0.00", "#,##0;(#,##0)", "@" are not date formats.
 */
export function isDateFormat(format: string): boolean {
  const hit = dateFormatCache.get(format);
  if (hit !== undefined) return hit;
  let s = format;
  s = s.replace(/"[^"]*"/g, '');
  s = s.replace(/\\./g, '');
  s = s.replace(/_./g, '').replace(/\*./g, '');
  s = s.replace(/\[(h+|m+|s+)\]/gi, 'h');
  s = s.replace(/\[[^\]]*\]/g, '');
  const result = /general/i.test(s) ? false : /[dmyhs]/i.test(s.replace(/E[+-]/gi, ''));
  if (dateFormatCache.size < 1000) dateFormatCache.set(format, result);
  return result;
}

const MS_PER_DAY = 86_400_000;
/** Serial 25569 is 1970-01-01 in Excel's 1900 date system. */
const UNIX_EPOCH_SERIAL = 25_569;

/**
 * Excel serial date (1900 system) -> Date at UTC. Serials below 60 are shifted one day because
 * Excel counts the non-existent 1900-02-29 (serial 60), a documented compatibility quirk.
 */
export function serialToDate(serial: number): Date {
  const s = serial < 60 ? serial + 1 : serial;
  return new Date(Math.round((s - UNIX_EPOCH_SERIAL) * MS_PER_DAY));
}

/** Value types Excel reports per cell (Excel.RangeValueType). */
export type ValueTypeName = 'Unknown' | 'Empty' | 'String' | 'Integer' | 'Double' | 'Boolean' | 'Error' | 'RichValue';

/**
 * One cell as a RawCell: errors become CellError, empty cells null, numbers with a date format a
 * Date, everything else as Excel returned it.
 */
export function toRawCell(value: unknown, valueType: string, numberFormat: string): RawCell {
  switch (valueType) {
    case 'Empty':
      return null;
    case 'Error':
      return { kind: 'error', code: typeof value === 'string' && value !== '' ? value : '#VALUE!' };
    case 'Boolean':
      return typeof value === 'boolean' ? value : value === 'TRUE' || value === true;
    case 'Integer':
    case 'Double':
      if (typeof value === 'number') return isDateFormat(numberFormat) ? serialToDate(value) : value;
      return typeof value === 'string' ? value : null;
    default:
      if (value === '' || value === null || value === undefined) return null;
      if (typeof value === 'string' || typeof value === 'number' || typeof value === 'boolean') return value;
      return String(value);
  }
}

/** A cell as text for headers and keys. */
export function cellText(cell: RawCell): string {
  if (cell === null || cell === undefined) return '';
  if (cell instanceof Date) return cell.toISOString().slice(0, 10);
  if (typeof cell === 'object') return cell.code;
  return String(cell).trim();
}
