/**
 * Chunked reading of a block of rows inside one Excel.run, sized so that every response stays
 * under the payload budget. The number of syncs depends on the number of cells only.
 *
 * Sizing: the first sync reads `firstRows` rows (from a hint measured by detect, or a conservative
 * guess); after every sync the bytes per row actually received are measured (JSON length of what
 * was loaded) and the next sync asks for floor(target / bytesPerRow) rows, split into sub-ranges of
 * at most SUB_ROWS rows ("several chunks per sync"). If Excel still refuses a response as too large,
 * the rows of that sync are halved and the sync is retried.
 */
import { TailmarkError } from './api.js';
import type { Syncer } from './sync.js';
import { isPayloadError, jsonBytes } from './sync.js';

/** Rows per range object inside one sync. */
export const SUB_ROWS = 8_192;
/** Conservative first guess of response bytes per cell, per property loaded (value, type, format). */
const GUESS_BYTES_PER_CELL_PER_PROP = 48;

/** 'typed': values, value types and number formats; 'values'; 'cells': formulas and number formats (to write back). */
export type ReadProps = 'typed' | 'values' | 'cells';

/** A rectangle of columns to read over the same rows. */
export interface ReadSpan {
  /** 0-based sheet column. */
  readonly column: number;
  readonly columnCount: number;
  readonly props: ReadProps;
}

export interface ChunkData {
  /** Values ('typed', 'values') or formulas ('cells', where a constant reads as its value). */
  readonly values: unknown[][];
  readonly valueTypes: string[][] | null;
  readonly numberFormat: string[][] | null;
}

export interface ReadOptions {
  /** Bytes per row measured earlier for the same spans (e.g. by detect). */
  readonly bytesPerRowHint?: number;
  /** Queue extra loads in the first sync (they are synced together with the first chunk). */
  readonly withFirstSync?: () => void;
  /**
   * Queue extra loads about the rows of each sync (row offset and count, relative to firstRow);
   * the function returned is called once that sync has succeeded (e.g. merged areas, merged.ts).
   */
  readonly withEachSync?: (rowOffset: number, rows: number) => () => void;
  readonly onProgress?: (rowsDone: number, rowsTotal: number) => void;
  readonly signal?: AbortSignal;
}

export interface ReadOutcome {
  /** Measured response bytes per row (for the next read of the same spans). */
  readonly bytesPerRow: number;
  readonly syncs: number;
}

function propCount(p: ReadProps): number {
  return p === 'typed' ? 3 : p === 'cells' ? 2 : 1;
}

export function guessBytesPerRow(spans: readonly ReadSpan[]): number {
  let b = 0;
  for (const s of spans) b += s.columnCount * propCount(s.props) * GUESS_BYTES_PER_CELL_PER_PROP;
  return Math.max(b, 16);
}


/**
 * Read rows [firstRow, firstRow + rowCount) of the given spans; `consume(span, rowOffset, data)`
 * receives every chunk in row order (rowOffset is relative to firstRow).
 */
export async function readRows(
  sync: Syncer,
  sheet: Excel.Worksheet,
  firstRow: number,
  rowCount: number,
  spans: readonly ReadSpan[],
  consume: (spanIndex: number, rowOffset: number, data: ChunkData) => void,
  options: ReadOptions = {},
): Promise<ReadOutcome> {
  const target = sync.budget.target;
  let bytesPerRow = options.bytesPerRowHint && options.bytesPerRowHint > 0 ? options.bytesPerRowHint : guessBytesPerRow(spans);
  if (bytesPerRow > target) {
    throw new TailmarkError(
      'too-large',
      `One row of the selected columns holds more than ${Math.round(target / 1e6)} MB of text; Excel cannot send it in one piece. Choose fewer or shorter columns.`,
    );
  }
  let done = 0;
  let syncs = 0;
  let extra = options.withFirstSync;
  if (rowCount === 0 && extra) {
    extra();
    await sync.sync();
    return { bytesPerRow, syncs: 1 };
  }
  while (done < rowCount) {
    if (options.signal?.aborted) throw new TailmarkError('cancelled', 'Cancelled. Nothing was written.');
    let rows = Math.max(1, Math.min(rowCount - done, Math.floor(target / bytesPerRow)));
    for (;;) {
      const loaded: { span: number; offset: number; range: Excel.Range; props: ReadProps }[] = [];
      if (extra) extra();
      const collect = options.withEachSync?.(done, rows);
      for (let sub = 0; sub < rows; sub += SUB_ROWS) {
        const n = Math.min(SUB_ROWS, rows - sub);
        spans.forEach((s, si) => {
          const range = sheet.getRangeByIndexes(firstRow + done + sub, s.column, n, s.columnCount);
          range.load(s.props === 'typed' ? ['values', 'valueTypes', 'numberFormat'] : s.props === 'cells' ? ['formulas', 'numberFormat'] : ['values']);
          loaded.push({ span: si, offset: done + sub, range, props: s.props });
        });
      }
      try {
        await sync.sync();
      } catch (e) {
        if (isPayloadError(e) && rows > 1) {
          rows = Math.max(1, Math.floor(rows / 2));
          bytesPerRow = Math.max(bytesPerRow * 2, target / rows);
          continue;
        }
        throw e;
      }
      extra = undefined;
      syncs++;
      collect?.();
      let bytes = 0;
      for (const l of loaded) {
        const values = (l.props === 'cells' ? l.range.formulas : l.range.values) as unknown[][];
        const valueTypes = l.props === 'typed' ? (l.range.valueTypes as string[][]) : null;
        const numberFormat = l.props !== 'values' ? l.range.numberFormat : null;
        bytes += jsonBytes(values) + (valueTypes ? jsonBytes(valueTypes) : 0) + (numberFormat ? jsonBytes(numberFormat) : 0);
        consume(l.span, l.offset, { values, valueTypes, numberFormat });
      }
      sync.noteResponse(bytes);
      bytesPerRow = Math.max(1, bytes / rows);
      done += rows;
      options.onProgress?.(done, rowCount);
      break;
    }
  }
  return { bytesPerRow, syncs };
}
