/**
 * The command line: argument parsing, exit codes and messages only. The work is done by files
 * (read/write), scoring and report, exactly as in the add-in.
 *
 * Exit codes: 0 success (flags found or not), 2 bad input or options (one line on stderr), 1 anything
 * unexpected.
 */
import { mkdir, stat } from 'node:fs/promises';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { scoreTable } from '../scoring/index.js';
import { EXCLUSION_LABELS, EXCLUSION_REASONS, POPULATIONS, type RawCell, type ScoreResult } from '../scoring/types.js';
import { buildPlan } from '../report/plan.js';
import { CAUTION } from '../report/style.js';
import { describeDecimal } from '../report/decimal.js';
import { demoClaims, DEMO_SHEET } from '../demo/claims.js';
import { fileKind, InputFileError, readTable, type ReadTable } from '../files/read.js';
import { readTableStreaming } from '../files/stream-read.js';
import { writeScoredWorkbookStreaming } from '../files/stream-write.js';
import { OutputFileError, writeScoredWorkbook } from '../files/write.js';
import { checkOutPath } from '../files/layout.js';
import { writeDemoWorkbook } from '../files/demo.js';
import { HELP, parseDemoArgs, parseScoreArgs, UsageError, type ScoreArgs } from './args.js';

const LARGE_ROWS = 50_000;
/** Sheets with more data rows than this are written row by row (large-file mode). */
export const DEFAULT_STREAM_ROWS = 50_000;

/** The large-file threshold: TAILMARK_STREAM_ROWS when set (a whole number >= 0), else the default. */
export function streamThreshold(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.TAILMARK_STREAM_ROWS;
  if (raw === undefined || raw.trim() === '') return DEFAULT_STREAM_ROWS;
  if (!/^\d+$/.test(raw.trim())) throw new UsageError(`TAILMARK_STREAM_ROWS must be a whole number of rows; got "${raw}"`);
  return Number(raw.trim());
}

interface Io {
  out: (s: string) => void;
  err: (s: string) => void;
  progress: boolean;
}

const defaultIo = (): Io => ({
  out: (s) => void process.stdout.write(s),
  err: (s) => void process.stderr.write(s),
  progress: Boolean(process.stderr.isTTY),
});

/** Find a header by exact name, then ignoring case and surrounding spaces. */
function findHeader(headers: readonly string[], where: string, name: string, what: string): number {
  let i = headers.indexOf(name);
  if (i < 0) {
    const want = name.trim().toLowerCase();
    i = headers.findIndex((h) => h.trim().toLowerCase() === want);
  }
  if (i < 0) {
    throw new UsageError(`${what} column "${name}" not found in ${where}; headers are: ${headers.map((h) => `"${h}"`).join(', ')}`);
  }
  return i;
}

interface Columns {
  valueIdx: number[];
  groupIdx: number[];
  idIndex: number | null;
}

/** Resolve the --value / --group / --id headers to column indices, with the checks on them. */
function resolveColumns(args: ScoreArgs, headers: readonly string[], where: string): Columns {
  const valueIdx = args.values.map((v) => findHeader(headers, where, v, 'value'));
  const groupIdx = args.groups.map((g) => findHeader(headers, where, g, 'group'));
  const idIndex = args.id !== null ? findHeader(headers, where, args.id, 'id') : null;
  for (const v of valueIdx) {
    if (groupIdx.includes(v)) throw new UsageError(`"${headers[v]}" is given both as --value and as --group`);
  }
  if (new Set(valueIdx).size !== valueIdx.length) throw new UsageError('the same --value column is given twice');
  return { valueIdx, groupIdx, idIndex };
}

function defaultOut(input: string): string {
  const dir = dirname(input);
  return join(dir, `${basename(input, extname(input))}-tailmark.xlsx`);
}

function n(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function toJson(result: ScoreResult, table: ReadTable, idIndex: number | null) {
  const multi = result.columns.length > 1;
  const rows: Record<string, unknown>[] = [];
  const groups: Record<string, unknown>[] = [];
  for (const col of result.columns) {
    for (let r = 0; r < result.rowCount; r++) {
      const g = col.groups[col.groupOf[r]];
      const entry: Record<string, unknown> = {
        row: r + 1,
        group: g ? g.label : null,
        value: n(col.values[r]),
        score: n(col.scores[r]),
        flagged: col.flagged[r] === 1,
      };
      if (idIndex !== null) entry.id = rawText(table.columns[idIndex][r]);
      if (multi) entry.column = col.column;
      entry.comparedWith = POPULATIONS[col.population[r]];
      rows.push(entry);
    }
    for (const g of col.groups) {
      const entry: Record<string, unknown> = {
        key: g.label,
        n: g.n,
        center: g.center,
        scale: g.scale,
        lower: g.lower,
        upper: g.upper,
        flagged: g.flagged,
      };
      if (multi) entry.column = col.column;
      groups.push(entry);
    }
  }
  const decimal = Object.fromEntries(result.columns.map((c) => [c.column, { separator: c.decimal.separator, how: c.decimal.how }]));
  return { method: result.options.method, cutoff: result.options.cutoff, decimal, rows, groups };
}

function rawText(v: RawCell): string | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return v.toISOString();
  if (typeof v === 'object') return v.code;
  return String(v);
}

async function runScore(args: ScoreArgs, io: Io, outDefault?: string): Promise<{ outPath: string | null; result: ScoreResult }> {
  const progress = (msg: string) => {
    if (io.progress) io.err(`\r${msg}\x1b[K`);
  };
  let big = false;
  let found = false;
  try {
    big = (await stat(args.input)).size > 5_000_000;
    found = true;
  } catch {
    /* the reader reports a missing file */
  }
  const threshold = streamThreshold();
  const wantWorkbook = !args.json || args.out !== undefined;
  // A bad --out is reported before a long read, not after it.
  if (wantWorkbook && found && fileKind(args.input) !== null) await checkOutPath(args.input, args.out ?? outDefault ?? defaultOut(args.input), args.force);
  if (big) progress(`reading ${basename(args.input)}…`);
  // First pass, row by row: only the columns this run needs are kept, so any size fits in memory.
  let cols: Columns | null = null;
  const where = args.sheet !== undefined ? `${basename(args.input)}, sheet ${args.sheet}` : basename(args.input);
  const streamedTable = await readTableStreaming(args.input, {
    ...(args.sheet !== undefined ? { sheet: args.sheet } : {}),
    keep: (headers) => {
      cols = resolveColumns(args, headers, where);
      // The id column's cells are only printed with --json; a workbook run needs just its name.
      return [...cols.valueIdx, ...cols.groupIdx, ...(cols.idIndex !== null && args.json ? [cols.idIndex] : [])];
    },
  });
  if (streamedTable.rowCount === 0) throw new InputFileError(`${streamedTable.source} has a header row but no data rows`);
  const { valueIdx, groupIdx, idIndex } = cols ?? resolveColumns(args, streamedTable.headers, streamedTable.source);
  const streaming = args.stream || fileKind(args.input) === 'csv' || streamedTable.rowCount > threshold;
  // Below the threshold an .xlsx is written from the whole workbook in memory, which keeps everything
  // in it (hyperlinks, comments, pictures...); the table is read that way too, as before.
  const table: ReadTable = !streaming && wantWorkbook ? await readTable(args.input, { sheet: streamedTable.sheetName }) : streamedTable;
  const large = table.rowCount >= LARGE_ROWS;

  if (large) progress(`scoring ${table.rowCount.toLocaleString('en')} rows…`);
  let result: ScoreResult;
  try {
    result = scoreTable(
    {
      valueColumns: valueIdx.map((i) => ({ name: table.headers[i], cells: table.columns[i] })),
      groupColumns: groupIdx.map((i) => ({ name: table.headers[i], cells: table.columns[i] })),
    },
    {
      method: args.method,
      ...(args.cutoff !== undefined ? { cutoff: args.cutoff } : {}),
      direction: args.direction,
      logScale: args.log,
      minGroupSize: args.minGroup,
      smallGroups: args.smallGroups,
      decimal: args.decimal,
    },
  );
  } catch (e) {
    // The engine names the bad option or column; to the user that is bad input.
    throw new UsageError(e instanceof Error ? e.message : String(e));
  }
  for (const col of result.columns) {
    if (col.values.every((x) => !Number.isFinite(x))) {
      const why = EXCLUSION_REASONS.filter((r) => col.excludedCounts[r] > 0)
        .map((r) => `${col.excludedCounts[r]} ${EXCLUSION_LABELS[r]}`)
        .join('; ');
      throw new UsageError(`value column "${col.column}" has no numbers in ${table.source}${why ? ` (${why})` : ''}`);
    }
  }

  let outPath: string | null = null;
  let notCarried: readonly string[] | null = null;
  if (wantWorkbook) {
    outPath = args.out ?? outDefault ?? defaultOut(args.input);
    const plan = buildPlan(result, {
      source: table.source,
      when: new Date(),
      table,
      idColumn: idIndex !== null ? table.headers[idIndex] : null,
      // Row by row, each explanation is worded as its row is written, not all held at once.
      ...(streaming ? { reasonText: 'on-demand' as const } : {}),
    });
    if (large) progress('writing…');
    const onProgress = large ? (phase: string, f: number) => progress(`${phase} ${Math.round(f * 100)}%`) : undefined;
    if (streaming) {
      const summary = await writeScoredWorkbookStreaming(args.input, table, plan, outPath, { force: args.force, onProgress });
      notCarried = summary.notCarried;
    } else {
      await writeScoredWorkbook(args.input, table, plan, outPath, { force: args.force, workbook: table.workbook, onProgress });
    }
    if (large) progress('');
    if (io.progress && large) io.err('\n');
  }

  const modeLine =
    notCarried === null
      ? ''
      : `Large-file mode (written row by row). ${
          notCarried.length ? `Not carried over from the input: ${notCarried.join('; ')}.` : 'Nothing in the input was left out.'
        }\n`;
  if (args.json) {
    io.out(`${JSON.stringify(toJson(result, table, idIndex), null, 2)}\n`);
    if (outPath) io.err(`wrote ${outPath}\n${modeLine}`);
  } else {
    const flagged = new Set<number>();
    for (const col of result.columns) for (let r = 0; r < result.rowCount; r++) if (col.flagged[r]) flagged.add(r);
    const groups = result.columns[0].groups.length;
    io.out(
      `Scored ${result.columns.map((c) => `${c.scoredRows} of ${result.rowCount} rows of "${c.column}"`).join(', ')} ` +
        `in ${groups} group${groups === 1 ? '' : 's'} (${result.options.method}, cutoff ${result.options.cutoff}); ` +
        `${flagged.size} claim${flagged.size === 1 ? '' : 's'} flagged.\n` +
        decimalLines(result) +
        `Wrote ${outPath}\n${modeLine}${CAUTION}\n`,
    );
  }
  return { outPath, result };
}

/** "Amount: read with decimal comma (...)" for each column whose text cells showed a separator. */
function decimalLines(result: ScoreResult): string {
  return result.columns
    .filter((c) => c.decimal.how !== 'default' || c.decimal.ambiguousCells > 0)
    .map((c) => `${describeDecimal(c.column, c.decimal)}\n`)
    .join('');
}

async function runDemo(argv: readonly string[], io: Io): Promise<number> {
  const args = parseDemoArgs(argv);
  let inputPath: string;
  if (args.out === undefined) inputPath = join('out', 'demo-claims.xlsx');
  else if (extname(args.out).toLowerCase() === '.xlsx') inputPath = args.out;
  else inputPath = join(args.out, 'demo-claims.xlsx');
  const scoredPath = join(dirname(inputPath), `${basename(inputPath, '.xlsx')}-scored.xlsx`);
  // The default files are the demo's own and are replaced on each run; elsewhere ask for --force.
  const force = args.force || args.out === undefined;
  await mkdir(dirname(resolve(inputPath)), { recursive: true });
  if (!force) {
    for (const p of [inputPath, scoredPath]) {
      const there = await stat(p).then(() => true, () => false);
      if (there) throw new OutputFileError(`${p} already exists; choose another --out or add --force to replace it`);
    }
  }
  await writeDemoWorkbook(inputPath, demoClaims());
  const { result } = await runScore(
    {
      input: inputPath,
      values: ['Amount'],
      groups: ['Cost centre', 'Category'],
      id: 'Claim ID',
      method: 'robust',
      cutoff: undefined,
      direction: 'both',
      minGroup: 8,
      smallGroups: 'pool',
      log: false,
      decimal: 'auto',
      sheet: DEMO_SHEET,
      out: scoredPath,
      force: true,
      json: false,
      stream: false,
    },
    { ...io, out: () => {} },
  );
  const col = result.columns[0];
  io.out(
    `Demo claims (invented):  ${inputPath}\n` +
      `Scored workbook:         ${scoredPath}\n` +
      `${col.flaggedRows} of ${result.rowCount} claims flagged (robust z, cutoff ${result.options.cutoff}, groups Cost centre + Category).\n` +
      `${CAUTION}\n`,
  );
  return 0;
}

export async function main(argv: string[], ioOverride?: Partial<Io>): Promise<number> {
  const io: Io = { ...defaultIo(), ...ioOverride };
  const [command, ...rest] = argv;
  try {
    if (command === undefined) throw new UsageError('no command given; try tailmark --help');
    if (command === '--help' || command === '-h' || command === 'help') {
      io.out(HELP);
      return 0;
    }
    if (rest.includes('--help') || rest.includes('-h')) {
      io.out(HELP);
      return 0;
    }
    switch (command) {
      case 'score':
        await runScore(parseScoreArgs(rest), io);
        return 0;
      case 'demo':
        return await runDemo(rest, io);
      case 'sandbox': {
        const m = await import('./sandbox-command.js');
        return await m.runSandboxCommand(rest);
      }
      default:
        throw new UsageError(`unknown command "${command}"; commands: score, demo, sandbox (see tailmark --help)`);
    }
  } catch (e) {
    if (e instanceof UsageError || e instanceof InputFileError || e instanceof OutputFileError) {
      io.err(`tailmark: ${e.message}\n`);
      return 2;
    }
    io.err(`tailmark: unexpected error: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  }
}
