/**
 * Merged cells in the peer-group (key) columns (issue 12): Excel reports them with
 * Range.getMergedAreasOrNullObject (ExcelApi 1.13, above the manifest's 1.9, so feature-detected).
 * Every row an area covers then takes the area's value (fillMergedKeys in src/pipeline, as the
 * batch command does), and the notes say so; where the host cannot report them, the notes say
 * that merged cells could not be checked.
 *
 * No sync of its own: the queries ride along with the read of the same rows (readRows'
 * `withEachSync`). Each asks about 512 rows of one key column: Excel lists at most 512 merged
 * areas per range, and 512 cells of one column cannot meet more, so no query can be refused.
 * An area is taken whole, as Excel reports it (an area met by two queries counts once).
 */
import { fillMergedKeys, mergedUncheckedNote, type MergedArea } from '../pipeline/index.js';
import type { RawCell } from '../scoring/types.js';

/** The requirement set of Range.getMergedAreasOrNullObject. */
export const MERGED_AREAS_SET = { name: 'ExcelApi', version: '1.13' } as const;

/** Rows per merged-area query (Microsoft documents a limit of 512 areas per range). */
export const MERGED_QUERY_ROWS = 512;

/** A key column of the data read: its index in the columns read and its sheet column. */
export interface KeyColumn {
  readonly index: number;
  readonly column: number;
}

export class MergedKeys {
  private readonly areas = new Map<string, MergedArea>();

  /**
   * `firstDataRow`: sheet row of data row 0; `rows`: data rows read. `supported`: the host has
   * ExcelApi 1.13 (else nothing is asked and the notes say the merged cells were not checked).
   */
  constructor(
    private readonly sheet: Excel.Worksheet,
    private readonly firstDataRow: number,
    private readonly rows: number,
    private readonly keys: readonly KeyColumn[],
    private readonly supported: boolean,
  ) {}

  /** Queue the queries for data rows [offset, offset + count); the returned function collects their answers after the sync. */
  readonly queue = (offset: number, count: number): (() => void) => {
    if (!this.supported || this.keys.length === 0 || this.rows < 2) return () => undefined;
    const asked: { key: KeyColumn; areas: Excel.RangeAreas }[] = [];
    for (let r = offset; r < offset + count; r += MERGED_QUERY_ROWS) {
      const n = Math.min(MERGED_QUERY_ROWS, offset + count - r);
      for (const key of this.keys) {
        const m = this.sheet.getRangeByIndexes(this.firstDataRow + r, key.column, n, 1).getMergedAreasOrNullObject();
        m.areas.load(['items/address', 'items/rowIndex', 'items/rowCount', 'items/columnIndex']);
        asked.push({ key, areas: m });
      }
    }
    return () => {
      for (const { key, areas } of asked) {
        if (areas.isNullObject || areas.areas.isNullObject) continue;
        for (const a of areas.areas.items) {
          // Areas that start in the key column, below the header, over more than one row (as the batch command reads them).
          if (a.columnIndex !== key.column || a.rowIndex < this.firstDataRow || a.rowCount < 2) continue;
          const from = a.rowIndex - this.firstDataRow;
          const ref = a.address.slice(a.address.lastIndexOf('!') + 1);
          this.areas.set(`${key.index}:${ref}`, { col: key.index, from, to: Math.min(from + a.rowCount - 1, this.rows - 1), ref });
        }
      }
    };
  };

  /** Fill the merged areas found into `columns` (in place) and return the notes lines. */
  fill(headers: readonly (string | null)[], columns: RawCell[][]): string[] {
    if (this.keys.length === 0 || this.rows < 2) return [];
    const names = headers.map((h, i) => h ?? `column ${i + 1}`);
    if (!this.supported) {
      return [mergedUncheckedNote(this.keys.map((k) => names[k.index]), 'this version of Excel does not tell add-ins about merged cells; ExcelApi 1.13 does')];
    }
    const found = [...this.areas.values()].sort((a, b) => a.col - b.col || a.from - b.from);
    // Should Excel clip an area to the range asked about, an area crossing a query boundary comes
    // back in two parts, the second starting blank at the boundary: join them again.
    const joined: MergedArea[] = [];
    for (const a of found) {
      const prev = joined[joined.length - 1];
      const blank = columns[a.col][a.from] === null || columns[a.col][a.from] === undefined || columns[a.col][a.from] === '';
      if (prev && prev.col === a.col && prev.to + 1 === a.from && a.from % MERGED_QUERY_ROWS === 0 && blank) {
        joined[joined.length - 1] = { ...prev, to: a.to, ref: `${prev.ref.split(':')[0]}:${a.ref.split(':').pop() ?? a.ref}` };
      } else joined.push(a);
    }
    return fillMergedKeys(names, columns, joined, this.keys.map((k) => k.index));
  }
}
