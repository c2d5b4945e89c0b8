/**
 * The one error type that carries a message for the person running Tailmark. Every layer throws
 * it with a code; hosts decide what the code means to them (the pane picks a title and a next step,
 * the batch command picks an exit code). Anything that is not a TailmarkError is a bug.
 */

/** Every kind of user-facing problem. Add a code here; the compiler then points at the pane's titles. */
export const ERROR_CODES = [
  // The workbook and the pane.
  'no-selection',
  'multi-area',
  'no-numbers',
  'protected',
  'read-only',
  'changed-during-run',
  'partly-written',
  'column-limit',
  'name-clash',
  'too-large',
  'cancelled',
  'bad-settings',
  'no-results',
  // The batch command: options it was given, the file it reads, the file it writes.
  'usage',
  'input-file',
  'output-file',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export class TailmarkError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    /** 1-based line of a text input the problem is on, when there is one (CSV). */
    readonly line?: number,
  ) {
    super(message);
    this.name = 'TailmarkError';
  }
}

/** True for our user-facing error (optionally of one of `codes`). */
export function isTailmarkError(e: unknown, ...codes: ErrorCode[]): e is TailmarkError {
  return e instanceof TailmarkError && (codes.length === 0 || codes.includes(e.code));
}
