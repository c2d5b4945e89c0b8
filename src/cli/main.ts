/**
 * The command line: argument parsing, exit codes and I/O only. The run is the pipeline's
 * (src/pipeline), exactly as in the add-in; files read the source and write the sink.
 *
 * Exit codes: 0 success (flags found or not), 2 bad input or options (one line on stderr), 1 anything
 * unexpected.
 */
import { once } from 'node:events';
import { mkdir, stat } from 'node:fs/promises';
import { basename, dirname, extname, join, resolve } from 'node:path';
import type { RawCell, ScoreResult } from '../scoring/types.js';
import { planJsonChunks } from '../report/json.js';
import { METHOD_NAMES } from '../report/plan.js';
import { CAUTION } from '../report/style.js';
import { describeDecimal } from '../report/decimal.js';
import { demoClaims, DEMO_SHEET } from '../demo/claims.js';
import { fileKind, readTable, unsavedFormulaMessage, type ReadTable } from '../files/read.js';
import { readTableStreaming } from '../files/stream-read.js';
import { writeScoredWorkbookStreaming } from '../files/stream-write.js';
import { writeScoredWorkbook } from '../files/write.js';
import { checkOutPath } from '../files/layout.js';
import { writeDemoWorkbook } from '../files/demo.js';
import { HELP, parseDemoArgs, parseScoreArgs, type ScoreArgs } from './args.js';
import { TailmarkError, fillMergedKeys, resolveColumns, runPipeline, validateSettings, type PipelineRun } from '../pipeline/index.js';
import { previousMarks } from '../files/marks.js';

const LARGE_ROWS = 50_000;
/** Sheets with more data rows than this are written row by row (large-file mode). */
export const DEFAULT_STREAM_ROWS = 50_000;

/** The large-file threshold: TAILMARK_STREAM_ROWS when set (a whole number >= 0), else the default. */
export function streamThreshold(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.TAILMARK_STREAM_ROWS;
  if (raw === undefined || raw.trim() === '') return DEFAULT_STREAM_ROWS;
  if (!/^\d+$/.test(raw.trim())) throw new TailmarkError('usage', `TAILMARK_STREAM_ROWS must be a whole number of rows; got "${raw}"`);
  return Number(raw.trim());
}

interface Io {
  out: (s: string) => void;
  err: (s: string) => void;
  progress: boolean;
  /** Resolves when stdout can take more (streamed --json output waits on it). */
  drain?: () => Promise<void> | void;
}

const defaultIo = (): Io => ({
  out: (s) => void process.stdout.write(s),
  err: (s) => void process.stderr.write(s),
  progress: Boolean(process.stderr.isTTY),
  drain: () => (process.stdout.writableNeedDrain ? once(process.stdout, 'drain').then(() => undefined) : undefined),
});

function defaultOut(input: string): string {
  const dir = dirname(input);
  return join(dir, `${basename(input, extname(input))}-tailmark.xlsx`);
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
  const where = args.sheet !== undefined ? `${basename(args.input)}, sheet ${args.sheet}` : basename(args.input);
  const readOptions = {
    ...(args.sheet !== undefined ? { sheet: args.sheet } : {}),
    ...(args.encoding !== undefined ? { encoding: args.encoding } : {}),
    ...(args.headerRow !== undefined ? { headerRow: args.headerRow } : {}),
  };
  const streamedTable = await readTableStreaming(args.input, {
    ...readOptions,
    keep: (headers) => {
      const cols = resolveColumns(headers, args.settings, where);
      // The id column's cells are only printed with --json; a workbook run needs just its name.
      return [...cols.value, ...cols.group, ...(cols.id !== null && args.json ? [cols.id] : [])];
    },
  });
  const streaming = args.stream || fileKind(args.input) === 'csv' || streamedTable.rowCount > threshold;
  // Below the threshold an .xlsx is written from the whole workbook in memory, which keeps everything
  // in it (hyperlinks, comments, pictures...); the table is read that way too, as before.
  const table: ReadTable = !streaming && wantWorkbook ? await readTable(args.input, { ...readOptions, sheet: streamedTable.sheetName }) : streamedTable;
  const cols = resolveColumns(table.headers, args.settings, table.source);
  checkFormulas(table, [...cols.value, ...cols.group], basename(args.input));
  if (wantWorkbook) checkSheetLimit(table, basename(args.input));
  const inputNotes = [...(table.readNotes ?? []), ...fillMergedKeys(table.headers, table.columns as RawCell[][], table.merges ?? [], cols.group)];
  const large = table.rowCount >= LARGE_ROWS;

  if (large) progress(`scoring ${table.rowCount.toLocaleString('en')} rows…`);
  const { result, plan, marks } = runPipeline(table, args.settings, {
    when: new Date(),
    // The previous run's list of marks (in-memory .xlsx only; row by row the notes sheet is not read).
    previousMarks: previousMarks(table),
    // Row by row, each explanation is worded as its row is written, not all held at once.
    ...(streaming ? { reasonText: 'on-demand' as const } : {}),
    inputNotes,
  });

  let outPath: string | null = null;
  let notCarried: readonly string[] | null = null;
  if (wantWorkbook) {
    outPath = args.out ?? outDefault ?? defaultOut(args.input);
    if (large) progress('writing…');
    const onProgress = large ? (phase: string, f: number) => progress(`${phase} ${Math.round(f * 100)}%`) : undefined;
    if (streaming) {
      const summary = await writeScoredWorkbookStreaming(args.input, table, plan, outPath, { force: args.force, onProgress });
      notCarried = summary.notCarried;
    } else {
      await writeScoredWorkbook(args.input, table, plan, outPath, { force: args.force, workbook: table.workbook, onProgress, reviewer: args.settings.reviewer });
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
    // Streamed a chunk at a time, waiting for stdout to drain: no size limit, no whole-document string.
    for (const chunk of planJsonChunks(plan)) {
      io.out(chunk);
      await io.drain?.();
    }
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
        inputNotes.filter((l) => !/-separated$/.test(l) || /not valid|given|byte-order|zero bytes/.test(l)).map((l) => `${l}\n`).join('') +
        marksLine(marks) +
        `Wrote ${outPath}\n${modeLine}${CAUTION}\n`,
    );
  }
  return { outPath, result };
}

/** Rows in one worksheet (the spreadsheet's limit, header included). */
export const SHEET_ROWS = 1_048_576;

/**
 * A scored workbook keeps the input's rows where they are, so the input must fit on one sheet:
 * refuse (before any work) rather than write rows a spreadsheet program would silently drop.
 */
function checkSheetLimit(table: ReadTable, file: string): void {
  const last = table.headerRow + table.rowCount;
  if (last <= SHEET_ROWS) return;
  throw new TailmarkError(
    'input-file',
    `${file} has ${table.rowCount.toLocaleString('en')} claims below its header (row ${table.headerRow}), ending on row ${last.toLocaleString('en')}: ` +
      `a worksheet holds ${SHEET_ROWS.toLocaleString('en')} rows, so the scored workbook cannot hold them all. ` +
      `Split the file into parts of at most ${(SHEET_ROWS - table.headerRow).toLocaleString('en')} claims (for example by month or cost centre) and score each, ` +
      'or use --json without --out, which has no row limit',
  );
}

/** Refuse a run whose value or group column holds formulas without saved results (they read as blank). */
function checkFormulas(table: ReadTable, columns: readonly number[], file: string): void {
  for (const i of columns) {
    const n = table.unsavedFormulas?.[i] ?? 0;
    if (n > 0) throw new TailmarkError('input-file', unsavedFormulaMessage(file, table.headers[i], n));
  }
}

/** What happened to the review marks of an earlier run, when there were any. */
function marksLine(m: PipelineRun['marks']): string {
  if (!m || m.kept + m.restored + m.gone.length === 0) return '';
  const n = m.kept + m.restored;
  const gone = m.gone.length ? `; ${m.gone.length} mark${m.gone.length === 1 ? '' : 's'} of claims no longer in the data are listed in the notes` : '';
  return `Kept ${n} review mark${n === 1 ? '' : 's'} with their claims${gone}.\n`;
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
      if (there) throw new TailmarkError('output-file', `${p} already exists; choose another --out or add --force to replace it`);
    }
  }
  await writeDemoWorkbook(inputPath, demoClaims());
  const { result } = await runScore(
    {
      input: inputPath,
      settings: validateSettings({ valueColumns: ['Amount'], groupColumns: ['Cost centre', 'Category'], idColumn: 'Claim ID', minGroupSize: 8 }),
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
      `${col.flaggedRows} of ${result.rowCount} claims flagged (${METHOD_NAMES[result.options.method]}, cutoff ${result.options.cutoff}, groups Cost centre + Category).\n` +
      `${CAUTION}\n`,
  );
  return 0;
}

export async function main(argv: string[], ioOverride?: Partial<Io>): Promise<number> {
  const io: Io = { ...defaultIo(), ...ioOverride };
  const [command, ...rest] = argv;
  try {
    if (command === undefined) throw new TailmarkError('usage', 'no command given; try tailmark --help');
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
        throw new TailmarkError('usage', `unknown command "${command}"; commands: score, demo, sandbox (see tailmark --help)`);
    }
  } catch (e) {
    if (e instanceof TailmarkError) {
      // Every user-facing problem (options, input file, output file, settings, data) exits 2.
      io.err(`tailmark: ${e.message}\n`);
      return 2;
    }
    io.err(`tailmark: unexpected error: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  }
}
