/**
 * Highlight rules: one conditional-format rule per review state. Every sink writes the formula that
 * `ruleFormula` returns, so the add-in and the batch command produce identical rules.
 *
 * Formula shape (open state, one value column, flag in H, status in N, data from row 2):
 *
 *   =AND(ISTEXT("tailmark:open"),$H2<>"",OR($N2="",$N2="To look at"))
 *
 * `ISTEXT("tailmark:<state>")` is always TRUE, so it changes nothing; it is the marker by which we
 * recognise our own rules (and remove only those). Columns are absolute, rows relative to the first
 * data row, so one rule covers the whole data range.
 */
import type { HighlightRule } from './types.js';
import { PALETTE, REVIEW_STATUSES, type ReviewState } from './style.js';

export const RULE_MARKER_PREFIX = 'tailmark:';

function marker(state: ReviewState): string {
  return `${RULE_MARKER_PREFIX}${state}`;
}

/** The four rules, highest priority first (1 = evaluated first). */
export const HIGHLIGHT_RULES: readonly HighlightRule[] = (['escalated', 'asked', 'cleared', 'open'] as const).map(
  (state, i): HighlightRule => ({
    id: marker(state),
    state,
    swatch: PALETTE[state],
    statusLabels: [REVIEW_STATUSES.find((s) => s.id === state)!.label],
    priority: i + 1,
  }),
);

export interface RuleRefs {
  /** 1-based sheet row of the first data row. */
  readonly firstDataRow: number;
  /** Column letters of the flag columns (one per value column). */
  readonly flagColumns: readonly string[];
  /** Column letter of the status column. */
  readonly statusColumn: string;
}

function quote(text: string): string {
  return `"${text.replace(/"/g, '""')}"`;
}

const LETTERS = /^[A-Z]{1,3}$/;

/** The A1 formula of a rule, relative to the first data row (absolute columns, relative rows). */
export function ruleFormula(rule: HighlightRule, refs: RuleRefs): string {
  if (!Number.isInteger(refs.firstDataRow) || refs.firstDataRow < 1) {
    throw new RangeError(`ruleFormula: firstDataRow must be a sheet row number >= 1, got ${refs.firstDataRow}`);
  }
  for (const c of [...refs.flagColumns, refs.statusColumn]) {
    if (!LETTERS.test(c)) throw new RangeError(`ruleFormula: "${c}" is not a column letter`);
  }
  const r = refs.firstDataRow;
  const status = `$${refs.statusColumn}${r}`;
  const labelTests = rule.statusLabels.map((l) => `${status}=${quote(l)}`);
  const parts = [`ISTEXT(${quote(rule.id)})`];
  if (rule.state === 'open') {
    const flags = refs.flagColumns.map((c) => `$${c}${r}<>""`);
    parts.push(flags.length === 0 ? 'FALSE' : flags.length === 1 ? flags[0] : `OR(${flags.join(',')})`);
    parts.push(`OR(${[`${status}=""`, ...labelTests].join(',')})`);
  } else {
    parts.push(labelTests.length === 1 ? labelTests[0] : `OR(${labelTests.join(',')})`);
  }
  return `=AND(${parts.join(',')})`;
}

/** True when a conditional-format formula is one of ours (it carries our marker). */
export function isTailmarkFormula(formula: string): boolean {
  return /ISTEXT\("tailmark:[a-z]+"\)/i.test(formula);
}
