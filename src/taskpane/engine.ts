/**
 * The pane's in-memory preview: scores the raw cells from `layer.readForPreview` with the same
 * pipeline the run uses (src/pipeline), without writing anything. All scoring imports of the pane
 * go through this file.
 */
import type { ColumnScores, GroupStats, MethodId, ScoreResult } from '../scoring/types.js';
import type { PreviewData, RunSettings } from '../workbook/api.js';
import { defaultCutoff, describeCutoff, oneInN } from '../scoring/index.js';
import { scoreColumns } from '../pipeline/run.js';
import { cutoffForReviewBudget, type BudgetAnswer } from '../pipeline/budget.js';

export function methodDefaultCutoff(method: MethodId): number {
  return defaultCutoff(method);
}

/**
 * Score the preview's columns with the pipeline (src/pipeline), the same validation and engine
 * options the run uses. `override` changes settings for a what-if (the chart's other method).
 */
export function scorePreview(data: PreviewData, s: RunSettings, override?: Partial<RunSettings>): ScoreResult {
  return scoreColumns(data.valueColumns, data.groupColumns, { ...s, ...override });
}

/**
 * The preview's scoring, or the reason it failed: the pane shows the message instead of an empty
 * preview (issue 7: failures used to vanish into "nothing to preview").
 */
export function previewOf(data: PreviewData, s: RunSettings): { readonly result: ScoreResult | null; readonly error: string | null } {
  try {
    return { result: scorePreview(data, s), error: null };
  } catch (e) {
    return { result: null, error: e instanceof Error ? e.message : String(e) };
  }
}

export interface GroupCount {
  readonly label: string;
  readonly n: number;
  readonly flagged: number;
  readonly unreachable: boolean;
  readonly fallbacks: readonly string[];
  /** "about 1 in N" flagged by chance at this group's size (engine's chanceRate); '' when not scored. */
  readonly chance: string;
}

export interface ColumnPreview {
  readonly column: string;
  readonly scored: number;
  readonly flagged: number;
  readonly groups: readonly GroupCount[];
}

export interface PreviewSummary {
  readonly columns: readonly ColumnPreview[];
  /** Rows flagged in at least one value column. */
  readonly flaggedRows: number;
  readonly meaning: string;
}

function groupCounts(col: ColumnScores): GroupCount[] {
  return col.groups.map((g) => ({
    label: g.label,
    n: g.n,
    flagged: g.flagged,
    unreachable: g.fallbacks.includes('cutoff-unreachable'),
    fallbacks: g.fallbacks,
    chance: g.chanceRate === null ? '' : `${g.chanceRateAtMost ? 'at most ' : ''}${oneInN(g.chanceRate)} by chance`,
  }));
}

export function summarisePreview(result: ScoreResult, s: RunSettings): PreviewSummary {
  const columns = result.columns.map((c) => ({
    column: c.column,
    scored: c.scoredRows,
    flagged: c.flaggedRows,
    groups: groupCounts(c),
  }));
  let flaggedRows = 0;
  for (let r = 0; r < result.rowCount; r++) {
    if (result.columns.some((c) => c.flagged[r] === 1)) flaggedRows++;
  }
  return { columns, flaggedRows, meaning: describeCutoff(s.method, s.cutoff, s.direction, s.logScale) };
}

/** The cutoff for a review budget (see src/pipeline/budget.ts). */
export function budgetCutoff(result: ScoreResult, budget: number): BudgetAnswer {
  return cutoffForReviewBudget(result, budget);
}

export interface ChartLine {
  readonly method: MethodId;
  readonly cutoff: number;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly flagged: number;
}

export interface ChartData {
  readonly column: string;
  readonly group: string;
  readonly n: number;
  readonly values: readonly number[];
  readonly logScale: boolean;
  /** Compared with the whole column rather than the group (small group pooled). */
  readonly pooled: boolean;
  readonly robust: ChartLine;
  readonly classic: ChartLine;
}

function lineOf(g: GroupStats, flagged: number, method: MethodId, cutoff: number): ChartLine {
  return { method, cutoff, lower: g.lower, upper: g.upper, flagged };
}

/**
 * Distribution of one group with the robust and the classic bounds, each at the reviewer's cutoff
 * when that method is chosen, else at its default: shows whether a few large claims mask each other.
 * A group scored on its own is re-scored alone (cheap); a small group compared with the whole
 * column is scored with the whole column.
 */
export function chartFor(data: PreviewData, s: RunSettings, column: string, group: string): ChartData | null {
  const robustCut = s.method === 'robust' ? s.cutoff : defaultCutoff('robust');
  const classicCut = s.method === 'classic' ? s.cutoff : defaultCutoff('classic');
  const col = data.valueColumns.find((v) => v.name === column);
  if (!col) return null;
  const base = scorePreview({ valueColumns: [col], groupColumns: data.groupColumns }, s, { method: 'robust', cutoff: robustCut }).columns[0];
  const gi = base.groups.findIndex((g) => g.label === group);
  if (gi < 0) return null;
  const g = base.groups[gi];
  const rows: number[] = [];
  for (let r = 0; r < base.groupOf.length; r++) if (base.groupOf[r] === gi) rows.push(r);
  const values: number[] = [];
  for (const r of rows) if (!Number.isNaN(base.values[r])) values.push(base.values[r]);
  const pooled = g.population === 'column';
  let robust: ChartLine;
  let classic: ChartLine;
  if (pooled) {
    const c = scorePreview({ valueColumns: [col], groupColumns: data.groupColumns }, s, { method: 'classic', cutoff: classicCut }).columns[0];
    robust = lineOf(base.pooled, g.flagged, 'robust', robustCut);
    classic = lineOf(c.pooled, c.groups[gi]?.flagged ?? 0, 'classic', classicCut);
  } else if (g.population === 'none') {
    robust = { method: 'robust', cutoff: robustCut, lower: null, upper: null, flagged: 0 };
    classic = { method: 'classic', cutoff: classicCut, lower: null, upper: null, flagged: 0 };
  } else {
    const subset = { valueColumns: [{ name: column, cells: rows.map((r) => col.cells[r]) }], groupColumns: [] };
    const alone = { minGroupSize: 2, smallGroups: 'skip' as const };
    const rc = scorePreview(subset, s, { ...alone, method: 'robust', cutoff: robustCut }).columns[0];
    const cc = scorePreview(subset, s, { ...alone, method: 'classic', cutoff: classicCut }).columns[0];
    robust = lineOf(rc.groups[0] ?? rc.pooled, rc.flaggedRows, 'robust', robustCut);
    classic = lineOf(cc.groups[0] ?? cc.pooled, cc.flaggedRows, 'classic', classicCut);
  }
  return { column, group, n: values.length, values, logScale: s.logScale, pooled, robust, classic };
}
