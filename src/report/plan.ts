/**
 * buildPlan: turn a ScoreResult into what a run writes (result columns, highlight rules, notes sheet,
 * log entry). Pure; every sink (Office.js, xlsx, JSON) applies the same plan.
 */
import { defaultCutoff, describeColumn, describeCutoff, describeGroupRule, explainRowShort, maxReach, oneInN, populationOfRow, widenLevels, type Description } from '../scoring/index.js';
import { describeFallback } from '../scoring/fallbacks.js';
import { columnLetters } from './columns.js';
import { describeDecimal } from './decimal.js';
import {
  EXCLUSION_LABELS,
  EXCLUSION_REASONS,
  type ColumnScores,
  type GroupStats,
  type MethodId,
  type Population,
  type ScoreResult,
  type SmallGroupPolicy,
  type SourceTable,
  type WidenOrder,
} from '../scoring/types.js';
import type { NotesSection, Plan, PlanCell, PlanColumn, RunLogEntry } from './types.js';
import { HIGHLIGHT_RULES } from './rules.js';
import {
  CAUTION,
  FLAG_WORDS,
  NOTES_SHEET_NAME,
  NOTE_HEADER,
  REVIEW_STATUSES,
  STATUS_HEADER,
  resultHeaders,
  statusLabel,
  widthToShow,
} from './style.js';

export interface PlanContext {
  /** What a review budget did (src/pipeline/budget.ts), for the notes' settings table. */
  readonly budgetNote?: string;
  /** Where the data came from, e.g. "claims.xlsx, sheet Claims, A1:G601" or "Claims!A1:G601". */
  readonly source: string;
  readonly when: Date;
  readonly table: SourceTable;
  readonly idColumn?: string | null;
  /**
   * (Added, optional.) 'on-demand': the "why" column's values are worded when read, not all at once,
   * so a full-height sheet does not hold a million sentences (about 1 KB each as built strings) before
   * a streaming sink writes them one row at a time. Each read words the row afresh. Default 'eager'.
   */
  readonly reasonText?: 'eager' | 'on-demand';
  /**
   * (Added, optional.) What the reader of the source decided or changed, in words: encoding and
   * delimiter of a text file, the header row when titles were skipped, a totals row left out,
   * merged cells filled. Shown in the notes under "Reading the input".
   */
  readonly inputNotes?: readonly string[];
}

/**
 * A read-only array whose entry r is `at(r)`, computed on each read (no storage beyond the length).
 * Behaves as an array for indexing, length, iteration, slice and map.
 */
function onDemandArray<T>(length: number, at: (r: number) => T): readonly T[] {
  const target = new Array<T>(length);
  return new Proxy(target, {
    get(t, p, receiver) {
      if (typeof p === 'string') {
        const c = p.charCodeAt(0);
        if (c >= 48 && c <= 57) {
          const r = Number(p);
          if (Number.isInteger(r) && r >= 0 && r < length) return at(r);
        }
      }
      return Reflect.get(t, p, receiver) as unknown;
    },
    has(t, p) {
      if (typeof p === 'string' && /^\d+$/.test(p)) return Number(p) < length;
      return Reflect.has(t, p);
    },
    set() {
      return false;
    },
  });
}

const METHOD_WORDS: Record<MethodId, string> = {
  robust:
    'Robust z-score: (amount - group median) / (1.4826 x MAD), where MAD is the median absolute deviation ' +
    'from the median. A few very large claims barely move the median or the MAD, so they cannot hide each other.',
  classic:
    'Classic z-score: (amount - group mean) / group standard deviation. Large claims raise both the mean and the ' +
    'standard deviation, so several of them together can hide each other (masking).',
  iqr:
    'Interquartile fences: an amount is flagged below Q1 - k x IQR or above Q3 + k x IQR, with quartiles computed ' +
    'as QUARTILE.INC does (Hyndman & Fan type 7). The score is the distance beyond the nearer quartile in IQRs.',
  adjusted:
    'Adjusted boxplot (Hubert & Vandervieren 2008): IQR fences widened on the long side of a skewed group and ' +
    'narrowed on the short side by e^(3 MC) and e^(-4 MC), where MC is the group\'s medcouple (robust skewness, ' +
    'Brys, Hubert & Struyf 2004; mirrored when MC < 0). Quartiles are Tukey\'s hinges, as R\'s robustbase computes ' +
    'them. The score is the distance beyond the fence in skew-adjusted IQRs. The medcouple of each group is in the ' +
    'group table.',
  skew:
    'Skew-aware fences: each group\'s skew is measured by its medcouple (Brys, Hubert & Struyf 2004). On the long ' +
    'side (the high side of a right-skewed group) the fence is the adjusted boxplot\'s (Hubert & Vandervieren ' +
    '2008), Q3 + k e^(3 MC) IQR; on the short side it is Tukey\'s, Q1 - k IQR. The group table says for every ' +
    'group how skewed it is and which fences that gave.',
};

/** The method's name as the notes sheet and the batch command's summary give it. */
export const METHOD_NAMES: Record<MethodId, string> = {
  robust: 'robust z (median/MAD)',
  classic: 'classic z (mean/SD)',
  iqr: 'IQR fences',
  adjusted: 'adjusted boxplot (medcouple)',
  skew: 'skew-aware fences (medcouple)',
};

const POPULATION_WORDS: Record<Population, string> = {
  none: 'not scored',
  group: 'its own group',
  column: 'the whole column',
  wider: 'a wider peer group',
};

/** Round for display in the notes table: 2 decimals for ordinary amounts, 4 significant digits for small ones. */
function tidy(x: number | null): number | null {
  if (x === null || !Number.isFinite(x)) return null;
  if (Math.abs(x) >= 1 || x === 0) return Math.round(x * 100) / 100;
  return Number(x.toPrecision(4));
}

function round2(x: number): number | null {
  return Number.isFinite(x) ? Math.round(x * 100) / 100 : null;
}


function tableRange(t: SourceTable): string {
  const last = t.firstColumn + Math.max(t.headers.length, 1) - 1;
  return `${columnLetters(t.firstColumn)}${t.headerRow}:${columnLetters(last)}${t.headerRow + t.rowCount}`;
}

function directionWords(d: ScoreResult['options']['direction']): string {
  return d === 'high' ? 'high side only' : d === 'low' ? 'low side only' : 'both sides';
}

function flagWord(col: ColumnScores, r: number): PlanCell {
  if (!col.flagged[r]) return null;
  const s = col.scores[r];
  if (Number.isFinite(s)) return s < 0 ? FLAG_WORDS.low : FLAG_WORDS.high;
  const g = populationOfRow(col, r);
  const v = col.values[r];
  return g && g.lower !== null && v < g.lower ? FLAG_WORDS.low : FLAG_WORDS.high;
}

function groupRow(g: GroupStats, d: Description, method: MethodId): PlanCell[] {
  return [
    g.label,
    g.rows,
    g.n,
    tidy(d.median),
    tidy(d.mad),
    tidy(d.scaledMad),
    tidy(d.mean),
    tidy(d.sd),
    tidy(d.q1),
    tidy(d.q3),
    tidy(g.lower),
    tidy(g.upper),
    g.flagged,
    g.fallbacks.length ? g.fallbacks.map((f) => describeFallback(f)).join(' ') : '',
    g.population === 'wider' ? `the wider peer group ${g.comparedWith}` : POPULATION_WORDS[g.population],
    d.medcouple === null ? null : Math.round(d.medcouple * 1000) / 1000,
    describeGroupRule(method, g.medcouple ?? d.medcouple),
    g.chanceRate === null ? null : `${g.chanceRateAtMost ? 'fewer than 1 in ' + oneInN(g.chanceRate).replace('about 1 in ', '') : oneInN(g.chanceRate)}`,
    g.withinFloor,
  ];
}

/** The money floor in the notes: the amount and how many claims past the cutoff it kept unflagged. */
function ignoreWithinWords(result: ScoreResult): string {
  const floor = result.options.ignoreWithin;
  if (!(floor > 0)) return 'none (0): every claim past the cutoff is flagged';
  const held = result.columns.reduce((sum, c) => sum + c.groups.reduce((s, g) => s + g.withinFloor, 0), 0);
  return `${floor}: a claim within this amount of its group's centre is never flagged, whatever its score (${held} claim${held === 1 ? '' : 's'} past the cutoff kept unflagged)`;
}

const byLabel = (a: { g: GroupStats }, b: { g: GroupStats }) => (a.g.label < b.g.label ? -1 : a.g.label > b.g.label ? 1 : 0);

const GROUP_TABLE_HEADER: PlanCell[] = [
  'Group', 'Rows', 'n (amounts used)', 'Median', 'MAD', 'Scaled MAD (1.4826 x MAD)', 'Mean', 'SD', 'Q1', 'Q3',
  'Lower bound', 'Upper bound', 'Flagged', 'Fallbacks', 'Compared with', 'Medcouple (skew)', 'Rule applied and why', 'Claims flagged by chance at this size',
  'Past the cutoff but within the ignore-within amount',
];

/** Build the plan of a run. */
export function buildPlan(result: ScoreResult, ctx: PlanContext): Plan {
  const { options } = result;
  // Every descriptive statistic of every group: the notes sheet's group table and --json show them.
  const descriptions = result.columns.map((col) => describeColumn(col));
  const rows = result.rowCount;
  const columns: PlanColumn[] = [];
  const anyFlag = new Uint8Array(rows);
  const anyScore = new Uint8Array(rows);

  result.columns.forEach((col) => {
    const h = resultHeaders(col.column);
    const score: PlanCell[] = new Array<PlanCell>(rows);
    const flag: PlanCell[] = new Array<PlanCell>(rows);
    const lazy = ctx.reasonText === 'on-demand';
    const reason: PlanCell[] = lazy ? [] : new Array<PlanCell>(rows);
    for (let r = 0; r < rows; r++) {
      // Rounded to 2 decimals in the cell; the "why" text shows enough decimals to tell the side of the
      // cutoff (3.504, not 3.5). Writing full precision made a re-run's requests larger and exposed an
      // undo gap (issue 10 note), so it waits for that fix.
      score[r] = round2(col.scores[r]);
      flag[r] = flagWord(col, r);
      if (!lazy) reason[r] = explainRowShort(result, col, r);
      if (col.flagged[r]) anyFlag[r] = 1;
      if (Number.isFinite(col.scores[r])) anyScore[r] = 1;
    }
    columns.push({ header: h.score, kind: 'score', valueColumn: col.column, values: score, numberFormat: '0.00', width: widthToShow(h.score, 12) });
    columns.push({ header: h.flag, kind: 'flag', valueColumn: col.column, values: flag, width: widthToShow(h.flag, 15) });
    const reasonValues: readonly PlanCell[] = lazy ? onDemandArray<PlanCell>(rows, (r) => explainRowShort(result, col, r)) : reason;
    columns.push({ header: h.reason, kind: 'reason', valueColumn: col.column, values: reasonValues, width: widthToShow(h.reason, 42) });
  });
  const open = statusLabel('open');
  const status: PlanCell[] = new Array<PlanCell>(rows);
  const note: PlanCell[] = new Array<PlanCell>(rows);
  let flaggedRows = 0;
  let scoredRows = 0;
  for (let r = 0; r < rows; r++) {
    status[r] = anyFlag[r] ? open : null;
    note[r] = null;
    flaggedRows += anyFlag[r];
    scoredRows += anyScore[r];
  }
  columns.push({ header: STATUS_HEADER, kind: 'status', valueColumn: null, values: status, width: widthToShow(STATUS_HEADER, 16) });
  columns.push({ header: NOTE_HEADER, kind: 'note', valueColumn: null, values: note, width: widthToShow(NOTE_HEADER, 32) });

  const when = ctx.when.toISOString();
  const methodName = METHOD_NAMES[options.method];
  const log: RunLogEntry = {
    when,
    source: ctx.source,
    method: methodName,
    cutoff: options.cutoff,
    rowsScored: scoredRows,
    flagged: flaggedRows,
    defaultCutoff: defaultCutoff(options.method),
  };

  const sections: NotesSection[] = [];
  sections.push({
    title: 'What was done',
    rows: [
      [
        `Each amount in ${result.columns.map((c) => `"${c.column}"`).join(', ')} was compared with the other claims of its peer group ` +
          (result.groupColumns.length ? `(same ${result.groupColumns.join(' and ')})` : '(no group columns: the whole column is one group)') +
          '. Claims far from their group were flagged for review.',
      ],
      [METHOD_WORDS[options.method]],
      [`${scoredRows} of ${rows} rows scored; ${flaggedRows} flagged.`],
    ],
  });
  sections.push(termsSection(result));
  sections.push({
    title: 'How the cutoff was chosen and what it means',
    rows: [
      [describeCutoff(options.method, options.cutoff, options.direction, options.logScale)],
      [cutoffOrigin(result)],
      ['The same settings on next period\'s sheet give comparable flags; change the cutoff only with a reason you can record here.'],
    ],
  });
  sections.push({
    title: 'Parameters',
    table: true,
    rows: [
      ['Parameter', 'Value'],
      ['Method', methodName],
      ['Cutoff', options.cutoff],
      ...(ctx.budgetNote ? [['Review budget', ctx.budgetNote] as PlanCell[]] : []),
      ['Direction', directionWords(options.direction)],
      ['Log scale', options.logScale ? 'yes (scores computed on ln(amount))' : 'no'],
      ['Minimum group size', options.minGroupSize],
      ['Smaller groups', smallGroupWords(options.smallGroups, options.widen, result.groupColumns)],
      ['Ignore within', ignoreWithinWords(result)],
      ...result.columns.map((c): PlanCell[] => ['Decimal separator', describeDecimal(c.column, c.decimal)]),
      ['Value columns', result.columns.map((c) => c.column).join(', ')],
      ['Group columns', result.groupColumns.length ? result.groupColumns.join(', ') : '(none)'],
      ['Claim ID column', ctx.idColumn ?? '(none)'],
    ],
  });
  result.columns.forEach((col, c) => {
    const d = descriptions[c];
    const byGroup = col.groups.map((g, i) => ({ g, d: d.groups[i] })).sort(byLabel);
    sections.push({
      title: `Groups: ${col.column}`,
      table: true,
      rows: [GROUP_TABLE_HEADER, ...byGroup.map((x) => groupRow(x.g, x.d, col.method)), groupRow(col.pooled, d.whole, col.method)],
    });
    if (col.wider.length > 0) sections.push(widerSection(col));
  });
  const excludedRows: PlanCell[][] = [['Column', 'Reason', 'Cells']];
  for (const col of result.columns) {
    for (const reason of EXCLUSION_REASONS) {
      const count = col.excludedCounts[reason];
      if (count > 0) excludedRows.push([col.column, EXCLUSION_LABELS[reason], count]);
    }
  }
  if (excludedRows.length === 1) excludedRows.push(['(all columns)', 'no cells were left out', 0]);
  sections.push({ title: 'Cells left out', table: true, rows: excludedRows });
  if (ctx.inputNotes && ctx.inputNotes.length > 0) {
    sections.push({ title: 'Reading the input', rows: ctx.inputNotes.map((line): PlanCell[] => [line]) });
  }

  const unreachable: PlanCell[][] = [['Column', 'Group', 'n', 'Largest possible score at this size', 'Cutoff']];
  for (const col of result.columns) {
    for (const g of col.groups) {
      if (g.unreachable) {
        const most = maxReach(col.method, g.population === 'column' ? col.pooled.n : g.population === 'wider' ? col.wider[col.widerOf[col.groups.indexOf(g)]].n : g.n);
        unreachable.push([col.column, g.label, g.n, Number.isFinite(most) ? Math.round(most * 1000) / 1000 : null, col.cutoff]);
      }
    }
  }
  sections.push({
    title: 'Groups where the cutoff cannot be reached',
    table: unreachable.length > 1,
    rows:
      unreachable.length > 1
        ? [
            ...unreachable,
            [
              'In a group of n amounts no score of this method can pass the largest possible score shown (classic z: (n-1)/sqrt(n), ' +
                'Shiffler 1988; robust z of 2 amounts: 0.6745; IQR fences of 3 amounts: 1 IQR; see maxReach.ts), so these groups can ' +
                'never flag a claim with this cutoff.',
            ],
          ]
        : [
            [
              'None: in every scored group some amounts could reach the cutoff.',
            ],
          ],
  });
  sections.push({
    title: 'Review statuses',
    table: true,
    rows: [['Status', 'Meaning'], ...REVIEW_STATUSES.map((s) => [s.label, s.meaning])],
  });
  sections.push({
    title: 'Source and time of run',
    table: true,
    rows: [
      ['Item', 'Value'],
      ['Source', ctx.source],
      ['Sheet', ctx.table.sheetName],
      ['Data range (with header)', tableRange(ctx.table)],
      ['Data rows', rows],
      ['Time of run (UTC)', when],
      ['Rows scored', scoredRows],
      ['Rows flagged', flaggedRows],
    ],
  });
  sections.push({ title: 'Caution', rows: [[CAUTION]] });

  return {
    columns,
    statuses: REVIEW_STATUSES,
    rules: HIGHLIGHT_RULES,
    notes: { name: NOTES_SHEET_NAME, sections },
    log,
    caution: CAUTION,
    result,
    descriptions,
    budgetNote: ctx.budgetNote ?? null,
    table: ctx.table,
    idColumn: ctx.idColumn ?? null,
  };
}

/** The wider peer groups small groups of a column were compared with (widen.ts). */
function widerSection(col: ColumnScores): NotesSection {
  const users = col.wider.map(() => [] as string[]);
  col.groups.forEach((g, i) => {
    if (col.widerOf[i] >= 0 && g.population === 'wider') users[col.widerOf[i]].push(g.label);
  });
  return {
    title: `Wider peer groups: ${col.column}`,
    table: true,
    rows: [
      ['Wider peer group', 'n (amounts used)', 'Centre (scoring scale)', 'Scale (scoring scale)', 'Lower bound', 'Upper bound', 'Flagged (rows of the small groups)', 'Small groups compared with it', 'Claims flagged by chance at this size'],
      ...col.wider.map((w, i): PlanCell[] => [
        w.label, w.n, tidy(w.center), tidy(w.scale), tidy(w.lower), tidy(w.upper), w.flagged, users[i].join('; '),
        w.chanceRate === null ? null : oneInN(w.chanceRate),
      ]),
    ],
  };
}

/** What happens to a group smaller than the minimum, in the order tried. */
export function smallGroupWords(policy: SmallGroupPolicy, widen: WidenOrder, groupColumns: readonly string[]): string {
  if (policy === 'skip') return 'left unscored';
  const steps = widenLevels(groupColumns.length, widen).map((keep) => {
    const dropped = groupColumns.filter((_, i) => !keep.includes(i));
    return `the same ${keep.map((k) => groupColumns[k]).join(' / ')} across every ${dropped.join(' / ')}`;
  });
  return `compared with ${[...steps, 'the whole column'].join(', then ')} (the first with enough claims)`;
}

/** Every term the result columns use, in plain words (shown near the top of the notes sheet). */
function termsSection(result: ScoreResult): NotesSection {
  const h = resultHeaders(result.columns[0]?.column ?? 'Amount');
  return {
    title: 'Terms used',
    table: true,
    rows: [
      ['Term', 'Meaning'],
      [
        'Peer group',
        result.groupColumns.length
          ? `Claims with the same ${result.groupColumns.join(' and ')}. Each claim is compared only with its own peer group.`
          : 'No group columns were chosen, so every claim is compared with the whole column.',
      ],
      [
        `Tail score ("${h.score}")`,
        'How far an amount sits from the middle of its peer group, measured in the group\'s usual spread. About 0 is typical; ' +
          'a positive score is above the middle, a negative one below. Robust z uses the median and 1.4826 x MAD, classic z the ' +
          'mean and standard deviation, IQR fences the quartiles and the interquartile range.',
      ],
      ['Cutoff', 'The size of tail score beyond which a claim is flagged. A higher cutoff flags fewer claims.'],
      [`Flag ("${h.flag}")`, `${FLAG_WORDS.high} or ${FLAG_WORDS.low}: the score passed the cutoff. It means "look here", nothing more.`],
      [`Why ("${h.reason}")`, 'The amount, the middle and spread of the group it was compared with, its score and the cutoff, in words.'],
      ['MAD', 'Median absolute deviation: the median distance of the amounts from their median. 1.4826 x MAD matches the standard deviation for normally distributed amounts.'],
      ['IQR', 'Interquartile range: Q3 - Q1, the width of the middle half of the amounts.'],
      [
        'Ignore within',
        'An amount of money set by the reviewer: a claim within it of its group\'s centre is never flagged, whatever its score. ' +
          'When the middle half of a group is one amount (a fixed allowance), the group has no spread of its own and this amount is its unit.',
      ],
      [
        'Scale when MAD = 0',
        'When more than half a group share one amount, its MAD is 0; the scale is then the group\'s own IQR / 1.349 ' +
          '(normal-consistent, R stats::IQR documentation), which unusual claims cannot widen while they are fewer than a quarter of the group. ' +
          'Nothing is borrowed from other groups.',
      ],
      [STATUS_HEADER, 'Where the follow-up stands (see "Review statuses" below). Kept with its claim when the sheet is scored again.'],
      [NOTE_HEADER, 'The reviewer\'s own note on the claim, kept like the status.'],
    ],
  };
}

function cutoffOrigin(result: ScoreResult): string {
  const { method, cutoff } = result.options;
  const origin: Record<MethodId, string> = {
    robust: 'Iglewicz and Hoaglin (1993) recommend 3.5 for modified (robust) z-scores.',
    classic: 'A cutoff of 3 standard deviations is common practice (no single published source).',
    iqr: 'Tukey (1977) drew fences at 1.5 x IQR beyond the quartiles.',
    adjusted: 'Hubert and Vandervieren (2008) keep Tukey\'s k = 1.5 and adjust the fences for skew.',
    skew: 'k = 3 is Tukey\'s (1977) "far out" step; on invented skewed claims it flags 0.1-0.2 % of ordinary claims and every planted far-out one (test/scoring/skewedClaims.test.ts).',
  };
  const def = defaultCutoff(method);
  return cutoff === def
    ? `This is the default cutoff for the method. ${origin[method]}`
    : `The cutoff was set for this run (default for the method: ${def}). ${origin[method]}`;
}
