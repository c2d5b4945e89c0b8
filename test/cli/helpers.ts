import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import * as XLSX from 'xlsx';
import { main } from '../../src/cli/main.js';

export interface Run {
  code: number;
  out: string;
  err: string;
}

/** Run the CLI in-process, capturing stdout and stderr. */
export async function run(...argv: string[]): Promise<Run> {
  let out = '';
  let err = '';
  const code = await main(argv, { out: (s) => void (out += s), err: (s) => void (err += s), progress: false });
  return { code, out, err };
}

export function sha256(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex');
}

/** A sheet read by SheetJS as cells by A1 address (SheetJS types a sheet's entries as `any`); a missing cell reads as undefined. */
export type SheetCells = Record<string, XLSX.CellObject>;
export function cellsOf(ws: XLSX.WorkSheet): SheetCells {
  return ws;
}

/** The part of SheetJS's bundled CFB (zip) reader used here; SheetJS types `XLSX.CFB` as `any`. */
interface CfbReader {
  read(data: Buffer, options: { type: 'buffer' }): unknown;
  find(container: unknown, path: string): { content: Uint8Array } | null;
}
const CFB = XLSX.CFB as CfbReader;

/** Read a workbook with SheetJS (independent of ExcelJS, which Tailmark writes with). */
export function readBook(path: string): XLSX.WorkBook {
  return XLSX.read(readFileSync(path), { type: 'buffer', cellNF: true, cellStyles: true, cellFormula: true, cellDates: false });
}

/** The raw XML of a part of an .xlsx (zip read by SheetJS's bundled CFB reader). */
export function zipPart(path: string, part: string): string {
  const cfb = CFB.read(readFileSync(path), { type: 'buffer' });
  const entry = CFB.find(cfb, part);
  if (!entry) throw new Error(`${part} not found in ${path}`);
  return Buffer.from(entry.content).toString('utf8');
}

/** Map sheet name -> part path, from workbook.xml and its relationships. */
export function sheetPart(path: string, sheet: string): string {
  const wbXml = zipPart(path, '/xl/workbook.xml');
  const rels = zipPart(path, '/xl/_rels/workbook.xml.rels');
  const esc = sheet.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const m = new RegExp(`<sheet [^>]*name="${esc}"[^>]*r:id="([^"]+)"`).exec(wbXml);
  if (!m) throw new Error(`sheet ${sheet} not in workbook.xml`);
  const t = new RegExp(`<Relationship [^>]*Id="${m[1]}"[^>]*Target="([^"]+)"`).exec(rels) ?? new RegExp(`<Relationship [^>]*Target="([^"]+)"[^>]*Id="${m[1]}"`).exec(rels);
  if (!t) throw new Error(`relationship ${m[1]} missing`);
  const target = t[1].replace(/^\/?xl\//, '');
  return `/xl/${target}`;
}

export function decodeXml(s: string): string {
  return s.replace(/&quot;/g, '"').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&apos;/g, "'").replace(/&amp;/g, '&');
}

/** Parse an amount the way a reviewer reads it, written here independently of the engine. */
export function amountOf(v: unknown): number | null {
  if (typeof v === 'number') return v;
  if (typeof v !== 'string') return null;
  const s = v.trim();
  const m = /^\((\d[\d,]*(?:\.\d+)?)\)$/.exec(s);
  if (m) return -Number(m[1].replace(/,/g, ''));
  if (/^-?\d[\d,]*(\.\d+)?$/.test(s)) return Number(s.replace(/,/g, ''));
  return null;
}

/** Median of a copy (textbook definition: mean of the two middle values for even n). */
export function medianOf(xs: readonly number[]): number {
  const a = [...xs].sort((p, q) => p - q);
  const h = Math.floor(a.length / 2);
  return a.length % 2 ? a[h] : (a[h - 1] + a[h]) / 2;
}
