/** Short titles and next steps for every error the pane can show. Our own words. */
import type { PaneError } from './state.js';

const TITLES: Record<string, { title: string; next: string }> = {
  'no-selection': { title: 'Select your claims first', next: 'Click a cell inside your claims table (or select the whole table), then press "Use selection".' },
  'multi-area': { title: 'Select one block of cells', next: 'Select a single rectangle that holds the header row and the claims, then press "Use selection".' },
  'no-numbers': { title: 'No amounts found', next: 'Pick a value column that holds amounts, or select the table that does.' },
  protected: { title: 'The sheet or workbook is protected', next: 'Unprotect it (Review > Unprotect Sheet; for the workbook structure, Review > Protect Workbook), then run again.' },
  'read-only': { title: 'The workbook is read-only', next: 'Save a copy you can edit (or ask for edit access), open it, then try again.' },
  'partly-written': { title: 'The run failed part-way', next: 'Some of its changes may remain: use "Remove results", then run again.' },
  'changed-during-run': { title: 'The sheet changed during the run', next: 'Nothing was written. Wait until editing stops, then run again.' },
  'column-limit': { title: 'No room for the result columns', next: 'Move the data left or remove unused columns to the right, then run again.' },
  'name-clash': { title: 'A name Tailmark needs is taken', next: 'Rename your sheet or column with that name, then run again.' },
  'too-large': { title: 'Too much data for one run', next: 'Select fewer rows or fewer value columns, or use the batch command on a saved copy.' },
  cancelled: { title: 'Run cancelled', next: 'The workbook is as it was. Press Run when ready.' },
  'bad-settings': { title: 'Check the settings', next: 'Correct the highlighted choice, then run again.' },
  'no-results': { title: 'Nothing to review yet', next: 'Run a check first; exceptions appear here afterwards.' },
};

export function errorText(e: PaneError): { title: string; message: string; next: string } {
  const known = TITLES[e.code];
  // A message that already says what to click or select needs no second instruction.
  if (known) return { title: known.title, message: e.message, next: /\b(click|select)\b[^.]*\b(then|and)\b/i.test(e.message) ? '' : known.next };
  if (e.code.startsWith('office:')) {
    return { title: 'Excel refused the request', message: e.message, next: 'Close any open cell edit (press Esc), then try again.' };
  }
  return { title: 'Something went wrong', message: e.message, next: 'Try again. If it keeps happening, reload the pane; your workbook is not changed by a failed step.' };
}
