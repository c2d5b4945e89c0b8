/**
 * The log sheet's format, shared by every sink (the add-in and the batch command): an append-only
 * record that defends the selection. One line per run, per cutoff change (with the reviewer's
 * reason and whether a review budget set it) and per status or note the reviewer saves (who and
 * when). Sinks only ever add lines below the last one; nothing in the log is rewritten by a later
 * run. Its title in A1 (LOG_TITLE, src/report/notesSheet.ts) says it is ours and its format; a sheet
 * of that name without it is the user's.
 */
import { logFormatOf } from './notesSheet.js';
import type { PlanCell, RunLogEntry } from './types.js';

export const LOG_SHEET_NAME = 'Tailmark log';
/** The log's columns: the first six are a run's (the log's first format); the rest came with the audit trail. */
export const LOG_HEADER: readonly string[] = [
  'When (UTC)', 'Source', 'Method', 'Cutoff', 'Rows scored', 'Flagged',
  'Event', 'Who', 'Claim', 'Status', 'Note', 'Previous cutoff', 'Reason given', 'From a review budget',
];

/** Written as "who" when the reviewer has not typed a name: Office gives add-ins no user identity. */
export const NO_NAME = '(name not given)';

/** True when A1 of a log sheet says it is ours (any host, any format version; src/report/notesSheet.ts). */
export function isLogMarker(v: unknown): boolean {
  return logFormatOf(v) !== null;
}

function line(values: Readonly<Record<string, PlanCell>>): PlanCell[] {
  const out: PlanCell[] = LOG_HEADER.map(() => null);
  for (const [k, v] of Object.entries(values)) {
    const i = LOG_HEADER.indexOf(k);
    if (i < 0) throw new RangeError(`log line: no column "${k}"`);
    out[i] = v;
  }
  return out;
}

/** A run's line. */
export function runLine(e: RunLogEntry, who: string | null): PlanCell[] {
  return line({
    'When (UTC)': e.when,
    Source: e.source,
    Method: e.method,
    Cutoff: e.cutoff,
    'Rows scored': e.rowsScored,
    Flagged: e.flagged,
    Event: 'Run',
    Who: who ?? NO_NAME,
  });
}

/** Why the cutoff differs from the last run's (or from the method's default on a first run). */
export interface CutoffChange {
  readonly before: number;
  /** The reviewer's reason; empty = none given. */
  readonly reason: string;
  /** The review budget (claims) that set the cutoff; null = set by hand. */
  readonly budget: number | null;
}

/** A cutoff change, logged with the run that used it. */
export function cutoffLine(when: string, who: string | null, method: string, after: number, change: CutoffChange): PlanCell[] {
  return line({
    'When (UTC)': when,
    Method: method,
    Cutoff: after,
    Event: 'Cutoff changed',
    Who: who ?? NO_NAME,
    'Previous cutoff': change.before,
    'Reason given': change.reason.trim() === '' ? '(none given)' : change.reason.trim(),
    'From a review budget': change.budget === null ? 'no' : `yes: at most ${change.budget} claims`,
  });
}

/** A status or note the reviewer saved for one claim. `note` null = the note did not change. */
export function markLine(when: string, who: string | null, claim: string, before: string, after: string, note: string | null): PlanCell[] {
  return line({
    'When (UTC)': when,
    Event: before === after ? 'Note set' : 'Status set',
    Who: who ?? NO_NAME,
    Claim: claim,
    Status: `${before === '' ? '(none)' : before} → ${after === '' ? '(none)' : after}`,
    Note: note,
  });
}

/**
 * The log lines a run adds: the run, and a cutoff change when its cutoff differs from the previous
 * run's with the same method (`previous`: that cutoff, or null when there was none: then the
 * method's default is the "before").
 */
export function runLogLines(e: RunLogEntry, who: string | null, previous: number | null, record: Partial<CutoffChange> = {}): PlanCell[][] {
  const lines = [runLine(e, who)];
  const before = previous ?? e.defaultCutoff;
  if (e.cutoff !== before) {
    lines.push(cutoffLine(e.when, who, e.method, e.cutoff, { before, reason: record.reason ?? '', budget: record.budget ?? null }));
  }
  return lines;
}

/** The cutoff of the last "Run" line with this method among log lines (rows of LOG_HEADER cells); null if none. */
export function lastRunCutoff(lines: readonly (readonly PlanCell[])[], method: string): number | null {
  const ev = LOG_HEADER.indexOf('Event');
  const me = LOG_HEADER.indexOf('Method');
  const cu = LOG_HEADER.indexOf('Cutoff');
  for (let i = lines.length - 1; i >= 0; i--) {
    const l = lines[i];
    // Lines of the log's first format (six columns) are runs too.
    const isRun = l[ev] === 'Run' || ((l[ev] === null || l[ev] === undefined || l[ev] === '') && typeof l[cu] === 'number' && l[0] !== null);
    if (isRun && l[me] === method && typeof l[cu] === 'number') return l[cu];
  }
  return null;
}
