/**
 * Where the run's result columns go: beside the data on a plain range (reusing our block from an
 * earlier run, inserting columns only when the sheet is used to the right), or as table columns.
 * Pure given the resolved workbook state; the run checks and writes.
 */
import type { Plan } from '../report/index.js';
import { TailmarkError } from './api.js';
import { MAX_COLUMNS } from './a1.js';
import type { Resolved } from './resolve.js';
import { isOurHeader, type BlockColumn } from './state.js';

/** Where each plan column goes, and what happens to the old ones. */
export interface Placement {
  /** Sheet column per plan column. */
  readonly columns: number[];
  readonly block: BlockColumn[];
  /** Range path: first column of the block. */
  readonly blockColumn: number;
  /** Range path: insert this many entire columns at `insertAt` (0 = none). */
  readonly insertCount: number;
  readonly insertAt: number;
  /** Range path: old extra columns to take away (right to left). */
  readonly dropColumns: { column: number; info: BlockColumn }[];
  /** Table path: names of our table columns to delete / add. */
  readonly dropNames: string[];
  readonly addNames: string[];
  /** Plan columns that are new this run (for widths). */
  readonly fresh: boolean[];
  /** Fresh columns written into empty sheet columns whose widths we must remember (plan index). */
  readonly pristine: number[];
  /** Old status / note columns (sheet column) to read marks from. */
  readonly oldStatus: number | null;
  readonly oldNote: number | null;
  /** Sheet columns of our columns as they are before this run (left to right). */
  readonly oldColumns: number[];
  /** Whether anything of ours existed before this run. */
  readonly rerun: boolean;
  /** Last sheet column (exclusive) covered by the highlight rules. */
  readonly endColumn: number;
  readonly startColumn: number;
}

function columnLimit(k: number): TailmarkError {
  return new TailmarkError(
    'column-limit',
    `There is no room for Tailmark's ${k} result columns right of the data: they would pass the sheet's last column (XFD). Move the table further left or delete unused columns on the right, then run again. Nothing was changed.`,
  );
}

export function place(res: Resolved, plan: Plan): Placement {
  const headers = plan.columns.map((c) => c.header);
  const k = headers.length;
  const statusHeader = plan.columns.find((c) => c.kind === 'status')!.header;
  const noteHeader = plan.columns.find((c) => c.kind === 'note')!.header;
  if (res.table && res.tableColumns) {
    const names = [...res.tableColumns];
    const oursNow = names.filter(isOurHeader);
    const dropNames = oursNow.filter((n) => !headers.includes(n));
    const addNames = headers.filter((h) => !names.includes(h));
    const tableEnd = res.tableColumn + names.length;
    if (addNames.length > 0 && (tableEnd + addNames.length > MAX_COLUMNS || Math.max(res.usedEnd, tableEnd) + addNames.length > MAX_COLUMNS)) {
      throw columnLimit(k);
    }
    const finalNames = [...names.filter((n) => !dropNames.includes(n)), ...addNames];
    const columns = headers.map((h) => res.tableColumn + finalNames.indexOf(h));
    return {
      columns,
      block: headers.map((header) => ({ header, inserted: false, width: null })),
      blockColumn: Math.min(...columns),
      insertCount: 0,
      insertAt: 0,
      dropColumns: [],
      dropNames,
      addNames,
      fresh: headers.map((h) => addNames.includes(h)),
      pristine: [],
      oldStatus: res.ours.get(statusHeader) ?? null,
      oldNote: res.ours.get(noteHeader) ?? null,
      oldColumns: [...res.ours.values()].sort((a, b) => a - b),
      rerun: oursNow.length > 0,
      startColumn: res.tableColumn,
      endColumn: res.tableColumn + finalNames.length,
    };
  }
  const spanEnd = res.spanStart + res.spanCols;
  const old: string[] = [];
  for (let i = res.spanCols; i < res.headerCells.length; i++) {
    const h = res.headerCells[i];
    if (!isOurHeader(h)) break;
    old.push(h);
  }
  const w = old.length;
  const st = res.state && res.state.sheet === res.sheetName && res.state.blockColumn === spanEnd ? res.state : null;
  const oldInfo = old.map((header): BlockColumn => st?.columns.find((c) => c.header === header) ?? { header, inserted: false, width: null });
  const block: BlockColumn[] = [];
  const fresh: boolean[] = [];
  const pristine: number[] = [];
  let insertCount = 0;
  const insertAt = spanEnd + w;
  if (k > w) {
    const need = k - w;
    const empty = res.usedEnd <= spanEnd + w;
    if (empty) {
      if (spanEnd + k > MAX_COLUMNS) throw columnLimit(k);
    } else {
      if (res.usedEnd + need > MAX_COLUMNS || spanEnd + k > MAX_COLUMNS) throw columnLimit(k);
      insertCount = need;
    }
    for (let i = 0; i < k; i++) {
      if (i < w) {
        block.push({ ...oldInfo[i], header: headers[i] });
        fresh.push(false);
      } else {
        block.push({ header: headers[i], inserted: !empty, width: null });
        fresh.push(true);
        if (empty) pristine.push(i);
      }
    }
  } else {
    for (let i = 0; i < k; i++) {
      block.push({ ...oldInfo[i], header: headers[i] });
      fresh.push(false);
    }
  }
  const dropColumns: { column: number; info: BlockColumn }[] = [];
  for (let i = w - 1; i >= k; i--) dropColumns.push({ column: spanEnd + i, info: oldInfo[i] });
  const oldIdx = (h: string) => {
    const i = old.indexOf(h);
    return i >= 0 ? spanEnd + i : null;
  };
  return {
    columns: headers.map((_, i) => spanEnd + i),
    block,
    blockColumn: spanEnd,
    insertCount,
    insertAt,
    dropColumns,
    dropNames: [],
    addNames: [],
    fresh,
    pristine,
    oldStatus: oldIdx(statusHeader),
    oldNote: oldIdx(noteHeader),
    oldColumns: old.map((_, i) => spanEnd + i),
    rerun: w > 0,
    startColumn: res.spanStart,
    endColumn: spanEnd + k,
  };
}
