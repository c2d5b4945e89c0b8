/**
 * `tailmark sandbox <input.xlsx|input.csv> [score options] [--rerun] [--office-client] [--fail-sync <k>] [--out <path>] [--force] [--json]`
 *
 * Runs the add-in's workbook layer headless, exactly as the task pane does (detect -> run), on an
 * in-memory copy of the file (the sandbox), then optionally writes the result as .xlsx and prints
 * what the run cost and changed. With --rerun it marks a few flagged claims with review statuses
 * and notes, runs again with the same settings and reports whether the marks were kept.
 *
 * Exit codes: 0 success, 2 bad input or options (one line on stderr), 1 unexpected failure.
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { stat } from 'node:fs/promises';
import { extname, resolve } from 'node:path';
import ExcelJS from 'exceljs';
import { sandboxFromExcelJs, sandboxToExcelJs } from '../sandbox/exceljs-bridge.js';
import { diffSnapshots, type SandboxSnapshot, type SandboxWorkbook, type SheetSnapshot } from '../sandbox/index.js';
import { createWorkbookLayer } from '../workbook/index.js';
import { isTailmarkError } from '../pipeline/errors.js';
import { TailmarkError, type DetectedTable, type RunSettings } from '../workbook/api.js';
import { findColumn, validateSettings, type SettingWords, type SettingsInput } from '../pipeline/index.js';
import { parseFlags, settingOptionSpec, settingsFromOptions, settingWords } from './args.js';
import { nodePipeline } from './threads.js';
import { LOG_SHEET_NAME } from '../workbook/notes.js';
import { clientSettled, officeClientFor } from './office-client.js';
import { REVIEW_STATUSES } from '../report/index.js';
import { columnFromLetters, columnLetters } from '../report/columns.js';

interface SandboxArgs {
  readonly input: string;
  /** Settings as given (validated once the table's columns are known and the pane's guesses filled in). */
  readonly settings: SettingsInput;
  readonly words: SettingWords;
  readonly sheet: string | undefined;
  readonly rerun: boolean;
  readonly out: string | undefined;
  readonly force: boolean;
  readonly json: boolean;
  /** Run through Microsoft's real Office.js client (requests answered by the sandbox). */
  readonly officeClient: boolean;
  /** Make the k-th sync of the last run fail part-way and report whether the workbook is as before. */
  readonly failSync: number | null;
}

function failSyncOf(raw: string | undefined): number | null {
  if (raw === undefined) return null;
  if (!/^[1-9][0-9]*$/.test(raw.trim())) throw new TailmarkError('usage', `--fail-sync must be a whole number of at least 1 (the sync of the last run to fail); got "${raw}"`);
  return Number(raw);
}

export function parseSandboxArgs(argv: readonly string[]): SandboxArgs {
  const { positional, opts } = parseFlags(
    argv,
    { ...settingOptionSpec(), sheet: 'value', rerun: 'flag', out: 'value', force: 'flag', json: 'flag', 'office-client': 'flag', 'fail-sync': 'value' },
    'sandbox',
  );
  if (positional.length !== 1) {
    throw new TailmarkError(
      'usage',
      positional.length === 0
        ? 'sandbox needs an input file: tailmark sandbox <input.xlsx> [--value <header>] [--rerun] [--out <path>] [--json]'
        : `sandbox takes one input file; got ${positional.length}: ${positional.join(' ')}`,
    );
  }
  const words = settingWords(opts);
  const settings = settingsFromOptions(opts);
  // Bounds are checked now (columns may still be missing: the pane's guesses fill them in later).
  validateSettings({ ...settings, valueColumns: ['(check)'], groupColumns: [] }, words);
  const one = (n: string) => opts.get(n)?.[0];
  return {
    input: positional[0],
    settings,
    words,
    sheet: one('sheet'),
    rerun: opts.has('rerun'),
    out: one('out'),
    force: opts.has('force'),
    json: opts.has('json'),
    officeClient: opts.has('office-client'),
    failSync: failSyncOf(one('fail-sync')),
  };
}

async function loadWorkbook(path: string): Promise<ExcelJS.Workbook> {
  try {
    const info = await stat(path);
    if (!info.isFile()) throw new TailmarkError('usage', `input is not a file: ${path}`);
  } catch (e) {
    if (isTailmarkError(e, 'usage')) throw e;
    throw new TailmarkError('usage', `input file not found: ${path}`);
  }
  const wb = new ExcelJS.Workbook();
  const ext = extname(path).toLowerCase();
  try {
    if (ext === '.xlsx') await wb.xlsx.readFile(path);
    else if (ext === '.csv') await wb.csv.readFile(path);
    else throw new TailmarkError('usage', `unsupported file type "${ext || '(none)'}": use an .xlsx or .csv file`);
  } catch (e) {
    if (isTailmarkError(e, 'usage')) throw e;
    throw new TailmarkError('usage', `cannot read ${path} as ${ext.slice(1)}: ${e instanceof Error ? e.message : String(e)}`);
  }
  return wb;
}

function matchHeader(table: DetectedTable, name: string, role: 'value' | 'group' | 'id'): string {
  return table.columns[findColumn(table.columns.map((c) => c.header), name, role, table.address)].header;
}

/** Settings as the pane would start from: the options given, else the detected guesses. */
export function settingsFor(table: DetectedTable, a: SandboxArgs): RunSettings {
  const given = a.settings;
  const named = (v: unknown): string[] => (Array.isArray(v) ? v.filter((x): x is string => typeof x === 'string') : []);
  const asked = named(given.valueColumns);
  const values = asked.length ? asked.map((v) => matchHeader(table, v, 'value')) : table.columns.filter((c) => c.guess === 'amount').slice(0, 1).map((c) => c.header);
  if (values.length === 0) throw new TailmarkError('usage', `no amount column found in ${table.address}; name one with --value <header>`);
  const groups = named(given.groupColumns).map((g) => matchHeader(table, g, 'group'));
  const id = typeof given.idColumn === 'string' ? matchHeader(table, given.idColumn, 'id') : (table.columns.find((c) => c.guess === 'id')?.header ?? null);
  return validateSettings({ ...given, valueColumns: values, groupColumns: groups, idColumn: id }, a.words);
}

const letterIndex = columnFromLetters;

function splitAddress(a: string): { col: number; row: number; letters: string } {
  const m = /^([A-Z]+)([0-9]+)$/.exec(a)!;
  return { col: letterIndex(m[1]), row: Number(m[2]), letters: m[1] };
}

const lettersOf = columnLetters;

/**
 * User cells changed by the run: every cell of the data sheet outside our result columns is
 * compared with the same cell before (cells right of our columns compared with their place
 * before our columns were added), and every other sheet that existed before is compared whole.
 */
export function countUserCellsChanged(before: SandboxSnapshot, after: SandboxSnapshot, sheet: string, ourColumns: readonly number[]): number {
  let changed = 0;
  const ours = [...ourColumns].sort((x, y) => x - y);
  const bySheet = (s: SandboxSnapshot) => new Map(s.sheets.map((x) => [x.name, x]));
  const a = bySheet(before);
  const b = bySheet(after);
  const inserted = (() => {
    // Were our columns inserted (cells to their right moved) or written into empty columns?
    const sa = a.get(sheet);
    if (!sa || ours.length === 0) return false;
    return Object.keys(sa.cells).some((k) => splitAddress(k).col >= ours[0]);
  })();
  for (const [name, sa] of a) {
    const sb: SheetSnapshot | undefined = b.get(name);
    if (!sb) {
      changed += Object.keys(sa.cells).length;
      continue;
    }
    const mapped: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(sb.cells)) {
      if (name !== sheet) {
        mapped[k] = v;
        continue;
      }
      const { col, row } = splitAddress(k);
      if (ours.includes(col)) continue;
      const shift = inserted ? ours.filter((c) => c < col).length : 0;
      mapped[`${lettersOf(col - shift)}${row}`] = v;
    }
    const keys = new Set([...Object.keys(sa.cells), ...Object.keys(mapped)]);
    for (const k of keys) if (JSON.stringify(sa.cells[k]) !== JSON.stringify(mapped[k])) changed++;
  }
  return changed;
}

export async function runSandboxCommand(argv: string[]): Promise<number> {
  const threads = nodePipeline();
  try {
    const args = parseSandboxArgs(argv);
    const input = resolve(args.input);
    if (args.out !== undefined) {
      const out = resolve(args.out);
      if (out === input) throw new TailmarkError('usage', '--out must not be the input file (the input is never replaced)');
      if (!args.force) {
        const exists = await stat(out).then(() => true, () => false);
        if (exists) throw new TailmarkError('usage', `output file exists: ${args.out} (add --force to replace it)`);
      }
    }
    const wb = await loadWorkbook(input);
    const sb: SandboxWorkbook = sandboxFromExcelJs(wb);
    const sheets = sb.sheetNames();
    if (sheets.length === 0) throw new TailmarkError('usage', `${args.input} has no worksheets`);
    const sheet = args.sheet ?? sheets[0];
    if (!sheets.includes(sheet)) throw new TailmarkError('usage', `no sheet "${sheet}" in ${args.input}; sheets: ${sheets.join(', ')}`);
    sb.setSelection(sheet, 'A1');
    const host = args.officeClient ? officeClientFor(sb) : null;
    const run = host ? (host.run as SandboxWorkbook['run']) : sb.run;
    const layer = createWorkbookLayer(run, { runInContext: run, pipeline: threads.pipeline });
    const before = sb.snapshot();
    // The longest stall of this thread's event loop from detect to the end of the run(s).
    const stalls = monitorEventLoopDelay({ resolution: 10 });
    stalls.enable();
    sb.stats.reset();
    host?.wire.reset();
    const table = await layer.detect();
    const settings = settingsFor(table, args);
    if (args.failSync !== null) {
      // Fault injection: the k-th sync of the last run fails part-way (Excel's failure mode).
      let t = table;
      if (args.rerun) {
        await layer.run(table, settings);
        t = await layer.detect();
      }
      const beforeRun = sb.snapshot();
      if (host) await clientSettled();
      sb.failSyncAt(args.failSync);
      let error: string | null = null;
      try {
        await layer.run(t, settings);
      } catch (e) {
        error = e instanceof Error ? e.message : String(e);
      }
      const changed = diffSnapshots(beforeRun, sb.snapshot());
      const report = {
        client: host ? 'office-js' : 'sandbox',
        faultInjected: sb.faultFired,
        runFailed: error,
        syncsOfLastRun: layer.lastStats?.syncs ?? null,
        workbookUnchangedByFailedRun: changed.length === 0,
        ...(changed.length ? { changedByFailedRun: changed } : {}),
      };
      if (args.json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
      else {
        process.stdout.write(
          sb.faultFired
            ? `injected a failure at sync ${args.failSync} of the ${args.rerun ? 're-run' : 'run'}: ${changed.length === 0 ? 'the workbook is as it was' : `${changed.length} changes stayed`}\n`
            : `the ${args.rerun ? 're-run' : 'run'} finished before sync ${args.failSync}: no failure injected\n`,
        );
      }
      return 0;
    }
    const summary = await layer.run(table, settings);
    const syncs = sb.stats.syncs;
    // Through the real client these are the sizes of the JSON it sent and received.
    const maxRequestBytes = host ? host.wire.requestBytes.max : sb.stats.requestBytes.max;
    const maxResponseBytes = host ? host.wire.responseBytes.max : sb.stats.responseBytes.max;
    const firstRun = layer.lastRun!;
    const afterFirst = sb.snapshot();
    const ourCols = firstRun.resultColumns.map(letterIndex);
    const userCellsChanged = countUserCellsChanged(before, afterFirst, sheet, ourCols);
    const headerRow = Number(/!\$?[A-Z]+\$?([0-9]+)/.exec(table.address)?.[1] ?? '1') - 1;
    const firstCol = Math.min(...ourCols);
    let highlightedRows = 0;
    for (let r = 0; r < table.rowCount; r++) {
      if (sb.highlightAt(sheet, headerRow + 1 + r, firstCol) !== null) highlightedRows++;
    }

    let reviewMarksKept: boolean | null = null;
    let marks: { marked: number; kept: number } | null = null;
    if (args.rerun) {
      const ex = (await layer.listExceptions()).slice(0, 3);
      const labels = REVIEW_STATUSES.filter((s) => s.id !== 'open').map((s) => s.label);
      const wanted = ex.map((e, i) => ({ e, status: labels[i % labels.length], note: `sandbox check ${i + 1}` }));
      for (const w of wanted) await layer.mark([w.e.row], w.status, w.note);
      await layer.run(await layer.detect(), settings);
      const after = await layer.listExceptions();
      let kept = 0;
      for (const w of wanted) {
        const hit = w.e.claimId !== null ? after.find((x) => x.claimId === w.e.claimId) : after.find((x) => x.row === w.e.row);
        if (hit && hit.status === w.status && hit.note === w.note) kept++;
      }
      marks = { marked: wanted.length, kept };
      reviewMarksKept = kept === wanted.length;
    }

    stalls.disable();
    const longestBlockMs = Math.round(stalls.max / 1e6);

    if (args.out !== undefined) {
      await sandboxToExcelJs(sb).xlsx.writeFile(resolve(args.out));
    }
    const report = {
      client: host ? 'office-js' : 'sandbox',
      syncs,
      ...(host ? { clientCleanupRequests: host.wire.releaseRequests } : {}),
      maxRequestBytes,
      maxResponseBytes,
      userCellsChanged,
      resultColumns: firstRun.resultColumns.map((c) => ({ column: c, header: String(sb.valueAt(sheet, headerRow, letterIndex(c))) })),
      highlightedRows,
      notesSheet: summary.notesSheet,
      logSheet: LOG_SHEET_NAME,
      rowsScored: summary.rowsScored,
      flagged: summary.flagged,
      reviewMarksKept,
      reviewMarks: marks,
      changes: diffSnapshots(before, afterFirst).length,
      longestBlockMs,
    };
    if (args.json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
    else {
      process.stdout.write(
        `sandbox run on ${table.address}: ${summary.rowsScored} rows scored, ${summary.flagged} flagged, ${highlightedRows} rows highlighted\n` +
          `  ${host ? 'through the Office.js client: ' : ''}${syncs} syncs, largest request ${maxRequestBytes} B, largest response ${maxResponseBytes} B, user cells changed: ${userCellsChanged}\n` +
          `  result columns ${firstRun.resultColumns.join(', ')}; notes on sheet "${summary.notesSheet}"\n` +
          (marks ? `  re-run: ${marks.kept} of ${marks.marked} review marks kept\n` : '') +
          (args.out ? `  written to ${args.out}\n` : '') +
          'A flag means "look here", not misconduct; follow your organisation\'s policy and local law.\n',
      );
    }
    return 0;
  } catch (e) {
    if (e instanceof TailmarkError) {
      process.stderr.write(`tailmark: ${e.message}\n`);
      return 2;
    }
    process.stderr.write(`tailmark: unexpected error: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  } finally {
    await threads.close();
  }
}
