/**
 * runPipeline: settings -> resolve columns -> parse -> group -> score -> plan, the one run every
 * host calls (the workbook layer, the batch command, the pane's live preview, the preview page).
 * Pure: hosts read their source into a `SourceTable` and hand the plan to their sink.
 */
import { scoreTable } from '../scoring/scoreTable.js';
import { EXCLUSION_LABELS, EXCLUSION_REASONS, type RawCell, type ScoreResult, type SourceTable } from '../scoring/types.js';
import { buildPlan } from '../report/plan.js';
import type { Plan } from '../report/types.js';
import { mergeMarks, priorMarksOf, type MarkRecord } from '../report/marks.js';
import { resolveColumns, type ResolvedColumns } from './columns.js';
import { TailmarkError } from './errors.js';
import { cutoffForReviewBudget, describeBudget, type BudgetAnswer } from './budget.js';
import { engineOptions, validateSettings, type SettingWords, type Settings, type SettingsInput } from './settings.js';

export interface PipelineContext {
  /** Time of the run (the notes and the run log say it). */
  readonly when: Date;
  /** How the host names settings in messages (e.g. the batch command's option names). */
  readonly words?: SettingWords;
  /** 'on-demand' words each row's explanation when a streaming sink reads it (see PlanContext). */
  readonly reasonText?: 'eager' | 'on-demand';
  /** Called after scoring, before the plan is built (progress). */
  readonly onScored?: () => void;
  /** What the source's reader decided or changed, for the notes (see PlanContext.inputNotes). */
  readonly inputNotes?: readonly string[];
  /**
   * Review marks (src/report/marks.ts). 'from-table' (default): our status/note columns, when the
   * table has them, are the marks before this run, and `previousMarks` is the list the last run's
   * notes sheet holds. 'host': the host reads the marks from elsewhere and calls `mergeMarks` itself
   * (the add-in, whose result columns sit outside the data it reads).
   */
  readonly marks?: 'from-table' | 'host';
  readonly previousMarks?: readonly MarkRecord[];
  /**
   * "I can review N claims": score, take the cutoff that flags at most N distinct rows
   * (`cutoffForReviewBudget`), and run with it instead of the settings' cutoff; the notes say so.
   */
  readonly reviewBudget?: number;
}

export interface PipelineRun {
  readonly settings: Settings;
  readonly columns: ResolvedColumns;
  readonly result: ScoreResult;
  readonly plan: Plan;
  /** Rows whose mark was kept from their own cells / restored from the previous list; marks of claims gone. */
  readonly marks: { readonly kept: number; readonly restored: number; readonly gone: readonly MarkRecord[] } | null;
  /** What the review budget did, when one was given (`PipelineContext.reviewBudget`). */
  readonly budget?: BudgetAnswer;
}

/** A named column of raw cells, as the engine takes it. */
export interface NamedCells {
  readonly name: string;
  readonly cells: ArrayLike<RawCell>;
}

/**
 * Score already-chosen columns with validated settings, no plan (the pane's live preview and its
 * chart). Throws TailmarkError when the settings are wrong.
 */
export function scoreColumns(valueColumns: readonly NamedCells[], groupColumns: readonly NamedCells[], input: SettingsInput): ScoreResult {
  const settings = validateSettings(input);
  return scoreTable({ valueColumns, groupColumns }, engineOptions(settings));
}

/** A value column without a single number cannot be scored: say what its cells are instead. */
function checkNumbers(result: ScoreResult, where: string): void {
  for (const col of result.columns) {
    if (col.scoredRows === 0 && col.values.every((x) => !Number.isFinite(x))) {
      const why = EXCLUSION_REASONS.filter((r) => col.excludedCounts[r] > 0)
        .map((r) => `${col.excludedCounts[r]} ${EXCLUSION_LABELS[r]}`)
        .join('; ');
      throw new TailmarkError('no-numbers', `value column "${col.column}" has no numbers in ${where}${why ? ` (${why})` : ''}`);
    }
  }
}

/** A source's table as the pipeline takes it: `headers[i]` null marks a column that cannot be chosen (ours). */
export type PipelineTable = Omit<SourceTable, 'headers'> & { readonly headers: readonly (string | null)[] };

/** The run: validate, resolve, score, plan. */
export function runPipeline(table: PipelineTable, input: SettingsInput, ctx: PipelineContext): PipelineRun {
  let settings = validateSettings(input, ctx.words);
  if (table.rowCount < 1) throw new TailmarkError('no-numbers', `${table.source} has a header row but no data rows`);
  const columns = resolveColumns(table.headers, settings, table.source);
  const named = (i: number): NamedCells => ({ name: table.headers[i] ?? '', cells: table.columns[i] });
  const scoreInput = { valueColumns: columns.value.map(named), groupColumns: columns.group.map(named) };
  let result = scoreTable(scoreInput, engineOptions(settings));
  checkNumbers(result, table.source);
  let budget: BudgetAnswer | undefined;
  if (ctx.reviewBudget !== undefined) {
    if (!Number.isInteger(ctx.reviewBudget) || ctx.reviewBudget < 1) {
      throw new TailmarkError('bad-settings', `the review budget must be a whole number of claims of at least 1; got ${ctx.reviewBudget}`);
    }
    // Scores (and fence reaches) do not depend on the cutoff, so one scoring finds it; the second
    // flags with it.
    budget = cutoffForReviewBudget(result, ctx.reviewBudget);
    if (budget.kind === 'cutoff') {
      settings = { ...settings, cutoff: budget.cutoff };
      result = scoreTable(scoreInput, engineOptions(settings));
    }
  }
  ctx.onScored?.();
  const built = buildPlan(result, {
    source: table.source,
    when: ctx.when,
    table: { ...table, headers: table.headers.map((h) => h ?? '') },
    idColumn: columns.id !== null ? table.headers[columns.id] : null,
    ...(ctx.reasonText ? { reasonText: ctx.reasonText } : {}),
    ...(ctx.inputNotes ? { inputNotes: ctx.inputNotes } : {}),
    ...(budget ? { budgetNote: describeBudget(budget) } : {}),
  });
  if (ctx.marks === 'host') return { settings, columns, result, plan: built, marks: null, ...(budget ? { budget } : {}) };
  const ids = columns.id !== null ? claimIds(table.columns[columns.id], table.rowCount) : null;
  const prior = priorMarksOf(table.headers, table.columns, table.rowCount);
  const merged = mergeMarks(built, prior, ids, ctx.previousMarks ?? []);
  return { settings, columns, result, plan: merged.plan, marks: { kept: merged.kept, restored: merged.restored, gone: merged.gone }, ...(budget ? { budget } : {}) };
}

/** Claim IDs as text (trimmed; '' for a blank cell), the key review marks follow. */
export function claimIds(cells: ArrayLike<RawCell> | undefined, rows: number): string[] {
  const out = new Array<string>(rows);
  for (let r = 0; r < rows; r++) {
    const v = cells?.[r];
    out[r] = v === null || v === undefined ? '' : v instanceof Date ? v.toISOString() : typeof v === 'object' ? v.code : String(v).trim();
  }
  return out;
}
