/**
 * Review marks across runs, the same for every host: a reviewer's status and note stay with their
 * claim when a workbook is scored again, and the notes sheet lists the marks of this run (so a
 * later run can say which belonged to claims that are gone). Pure.
 *
 * The rule: a row's mark is what its status/note cells hold (they move with the row when the sheet
 * is sorted or rows are inserted). When our columns are not in the data (a fresh export pasted in),
 * a claim's mark is taken from the previous run's list by claim ID (or by row without an ID column).
 * Marks listed last time whose claim is no longer in the data are reported in the notes.
 */
import { NOTE_HEADER, STATUS_HEADER, statusLabel } from './style.js';
import type { NotesSection, Plan, PlanCell } from './types.js';

export const MARKS_TITLE = 'Review marks at this run';
export const GONE_TITLE = 'Marks of claims no longer in the data';
const MARKS_HEADER = ['Claim', 'Status', 'Note'];

const OPEN_LABEL = statusLabel('open');

/** A status/note pair that a reviewer made (not just our default "open" for a flagged row). */
export function isMark(status: string, note: string): boolean {
  return (status !== '' && status !== OPEN_LABEL) || note !== '';
}

/** One mark as listed in the notes: the claim (its ID, or "row N" without an ID column), status, note. */
export interface MarkRecord {
  readonly claim: string;
  readonly status: string;
  readonly note: string;
}

/** The marks the data holds before this run: per data row, the text of our old status/note cells. */
export interface PriorMarks {
  readonly status: readonly string[];
  readonly note: readonly string[];
}

export interface MarksOutcome {
  readonly plan: Plan;
  /** Rows whose mark came from their own cells. */
  readonly kept: number;
  /** Rows whose mark came from the previous run's list (our columns were not in the data). */
  readonly restored: number;
  readonly gone: readonly MarkRecord[];
}

function text(v: unknown): string {
  if (v === null || v === undefined) return '';
  return typeof v === 'string' ? v : String(v);
}

/** Our status and note columns among a table's headers, as prior marks; null when absent. */
export function priorMarksOf(headers: readonly (string | null)[], columns: readonly (ArrayLike<unknown> | undefined)[], rows: number): PriorMarks | null {
  const si = headers.indexOf(STATUS_HEADER);
  const ni = headers.indexOf(NOTE_HEADER);
  if (si < 0 && ni < 0) return null;
  const read = (i: number) => Array.from({ length: rows }, (_, r) => (i >= 0 ? text(columns[i]?.[r]).trim() : ''));
  return { status: read(si), note: read(ni) };
}

/** The previous run's mark list, read back from the cells of a notes sheet (rows of values). */
export function readMarkRecords(grid: readonly (readonly unknown[])[]): MarkRecord[] {
  const start = grid.findIndex((row) => text(row[0]) === MARKS_TITLE);
  if (start < 0 || text(grid[start + 1]?.[0]) !== MARKS_HEADER[0]) return [];
  const out: MarkRecord[] = [];
  for (let r = start + 2; r < grid.length; r++) {
    const row = grid[r];
    const claim = text(row[0]);
    if (claim === '') break;
    out.push({ claim, status: text(row[1]), note: text(row[2]) });
  }
  return out;
}

/**
 * Put the marks into a plan: each row keeps its own mark (prior cells), or gets its claim's mark
 * from `previous` when the data has no status/note columns; the notes gain the list of marks and
 * the list of marks whose claims are gone. `ids[r]` is row r's claim ID ('' = none), or null for no ID column.
 */
export function mergeMarks(plan: Plan, prior: PriorMarks | null, ids: readonly string[] | null, previous: readonly MarkRecord[]): MarksOutcome {
  const si = plan.columns.findIndex((c) => c.kind === 'status');
  const ni = plan.columns.findIndex((c) => c.kind === 'note');
  const status: PlanCell[] = plan.columns[si].values.slice();
  const note: PlanCell[] = plan.columns[ni].values.slice();
  const rows = status.length;
  const claimOf = (r: number) => (ids ? ids[r] : `row ${r + 1}`);
  const before = new Map<string, MarkRecord>();
  for (const m of previous) if (!before.has(m.claim)) before.set(m.claim, m);
  let kept = 0;
  let restored = 0;
  const present = new Set<string>();
  const records: MarkRecord[] = [];
  for (let r = 0; r < rows; r++) {
    const claim = claimOf(r);
    // Which claims are present matters only for the previous list's gone claims.
    if (claim !== '' && before.size > 0) present.add(claim);
    let s = '';
    let n = '';
    if (prior && isMark(prior.status[r], prior.note[r])) {
      s = prior.status[r];
      n = prior.note[r];
      kept++;
    } else if (!prior && claim !== '' && before.has(claim)) {
      const m = before.get(claim)!;
      s = m.status;
      n = m.note;
      restored++;
    } else continue;
    status[r] = s === '' ? null : s;
    note[r] = n === '' ? null : n;
    if (claim !== '') records.push({ claim, status: s, note: n });
  }
  const gone = previous.filter((m) => !present.has(m.claim) && isMark(m.status, m.note));
  const sections: NotesSection[] = [
    {
      title: MARKS_TITLE,
      table: true,
      rows: [MARKS_HEADER, ...records.map((m) => [m.claim, m.status, m.note])],
    },
    {
      title: GONE_TITLE,
      table: gone.length > 0,
      rows: gone.length
        ? [MARKS_HEADER, ...gone.map((m) => [m.claim, m.status, m.note])]
        : [[previous.length ? 'None: every claim marked at the previous run is still in the data.' : 'None (no marks were listed by a previous run).']],
    },
  ];
  // Before the caution, which stays last.
  const secs = [...plan.notes.sections];
  const at = secs.findIndex((s) => s.title === 'Caution');
  secs.splice(at < 0 ? secs.length : at, 0, ...sections);
  const columns = plan.columns.map((c, i) => (i === si ? { ...c, values: status } : i === ni ? { ...c, values: note } : c));
  return { plan: { ...plan, columns, notes: { ...plan.notes, sections: secs } }, kept, restored, gone };
}
