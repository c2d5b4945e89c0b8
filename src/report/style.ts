/**
 * Tailmark's own words and colours for review: the four review statuses, the palette, the column
 * headers and the caution. Shared by every sink so the add-in and the batch command look the same.
 */
import type { ReviewStatus, Swatch } from './types.js';

/** The review statuses, in dropdown order. Labels contain no commas (they form an Excel list). */
export const REVIEW_STATUSES: readonly ReviewStatus[] = [
  { id: 'open', label: 'To look at', meaning: 'Flagged by the run and not yet reviewed.' },
  { id: 'asked', label: 'Asked claimant', meaning: 'A question has gone to the claimant or approver; waiting for an answer.' },
  { id: 'cleared', label: 'Cleared', meaning: 'Reviewed and explained; no further action.' },
  { id: 'escalated', label: 'Sent up', meaning: 'Passed to the next level (manager, audit or finance) under your policy.' },
];

export type ReviewState = ReviewStatus['id'];

export function statusLabel(id: ReviewState): string {
  return REVIEW_STATUSES.find((s) => s.id === id)!.label;
}

/**
 * Our palette (hex RGB, no '#'): soft fills with dark text, so a highlighted row stays readable in
 * light and dark Office themes and when printed in grey. Chosen for Tailmark; not Excel's presets.
 */
export const PALETTE: Readonly<Record<ReviewState | 'header' | 'title', Swatch>> = {
  /** Apricot: flagged, waiting for review. */
  open: { fill: 'FBE3C8', font: '5A2E00' },
  /** Pale sky: a question is out. */
  asked: { fill: 'DCE8F7', font: '143A66' },
  /** Sage: explained. */
  cleared: { fill: 'E3EEDD', font: '22431F' },
  /** Lavender: passed on. */
  escalated: { fill: 'EADDF2', font: '48205F' },
  /** Our result-column headers. */
  header: { fill: 'E7E3D9', font: '2B2925' },
  /** Section titles on the notes sheet. */
  title: { fill: 'D9E4E2', font: '1E3532' },
};

/** Flag words written in the flag column. */
export const FLAG_WORDS = { high: '▲ above peers', low: '▼ below peers' } as const;

export const STATUS_HEADER = 'Tailmark status';
export const NOTE_HEADER = 'Tailmark note';
export const NOTES_SHEET_NAME = 'Tailmark notes';

/** Widest column we give a result column, in characters (a longer header wraps or is cut). */
export const MAX_COLUMN_CHARS = 60;

/**
 * Width (in characters of the sheet's default font, the unit of Excel's and xlsx column widths)
 * that shows `text` in bold plus a margin: 1.15 characters per character + 2 (common practice,
 * no source: bold proportional text runs up to about 15 % wider than the digit a width counts),
 * at least `least`, at most MAX_COLUMN_CHARS.
 */
export function widthToShow(text: string, least: number): number {
  return Math.min(MAX_COLUMN_CHARS, Math.max(least, Math.ceil([...text].length * 1.15) + 2));
}

/** Headers of the three result columns of one value column. */
export function resultHeaders(valueColumn: string): { score: string; flag: string; reason: string } {
  return {
    score: `${valueColumn} · tail score`,
    flag: `${valueColumn} · tail flag`,
    reason: `${valueColumn} · why`,
  };
}

/** One line for places with little room (beside a live count); the full CAUTION is a click or a scroll away. */
export const CAUTION_SHORT = 'A flag means "look here", not misconduct: a flagged claim is only unusual for its peer group.';

/** Shown wherever results are shown. */
export const CAUTION =
  'A flag means "look here", not misconduct. A flagged claim is only unusual for its peer group; ' +
  'check it against its receipts and context before drawing any conclusion, and follow your ' +
  "organisation's policy and local law. Claim data is personal data: keep this workbook to the " +
  'people entitled to see it.';
