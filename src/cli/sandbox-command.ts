/**
 * `tailmark sandbox <input.xlsx|input.csv> [score options] [--rerun] [--out <path>] [--force] [--json]`
 *
 * Runs the add-in's workbook layer headless, exactly as the task pane does (detect -> run), on an
 * in-memory copy of the file (the sandbox), then optionally writes the result as .xlsx and prints
 * what the run cost and changed. With --rerun it marks a few flagged claims with review statuses
 * and notes, runs again with the same settings and reports whether the marks were kept.
 *
 * Exit codes: 0 success, 2 bad input or options (one line on stderr), 1 unexpected failure.
 */
import { stat } from 'node:fs/promises';
import { extname, resolve } from 'node:path';
import ExcelJS from 'exceljs';
import { sandboxFromExcelJs, sandboxToExcelJs } from '../sandbox/exceljs-bridge.js';
import { diffSnapshots, type SandboxSnapshot, type SandboxWorkbook, type SheetSnapshot } from '../sandbox/index.js';
import { createWorkbookLayer } from '../workbook/index.js';
import { TailmarkError, type DetectedTable, type RunSettings } from '../workbook/api.js';
import { defaultCutoff } from '../scoring/index.js';
import { METHOD_IDS, type Direction, type MethodId, type SmallGroupPolicy } from '../scoring/types.js';
import { LOG_SHEET_NAME } from '../workbook/notes.js';
import { REVIEW_STATUSES } from '../report/index.js';

class BadInput extends Error {}

interface SandboxArgs {
  input: string;
  values: string[];
  groups: string[];
  id: string | null;
  method: MethodId;
  cutoff: number | undefined;
  direction: Direction;
  minGroup: number;
  smallGroups: SmallGroupPolicy;
  log: boolean;
  decimalComma: boolean;
  sheet: string | undefined;
  rerun: boolean;
  out: string | undefined;
  force: boolean;
  json: boolean;
}

const FLAGS = new Set(['log', 'decimal-comma', 'rerun', 'force', 'json']);
const VALUES = new Set(['value', 'group', 'id', 'method', 'cutoff', 'direction', 'min-group', 'small-groups', 'sheet', 'out']);
const LISTS = new Set(['value', 'group']);

function oneOf<T extends string>(name: string, raw: string | undefined, allowed: readonly T[], fallback: T): T {
  if (raw === undefined) return fallback;
  const v = raw.toLowerCase();
  const hit = allowed.find((a) => a === v);
  if (!hit) throw new BadInput(`--${name} must be one of ${allowed.join(', ')}; got "${raw}"`);
  return hit;
}

export function parseSandboxArgs(argv: readonly string[]): SandboxArgs {
  const positional: string[] = [];
  const opts = new Map<string, string[]>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith('--')) {
      positional.push(a);
      continue;
    }
    const eq = a.indexOf('=');
    const name = eq >= 0 ? a.slice(2, eq) : a.slice(2);
    if (FLAGS.has(name)) {
      if (eq >= 0) throw new BadInput(`--${name} takes no value`);
      opts.set(name, ['']);
      continue;
    }
    if (!VALUES.has(name)) throw new BadInput(`unknown option --${name} for "sandbox" (see tailmark --help)`);
    const value = eq >= 0 ? a.slice(eq + 1) : argv[++i];
    if (value === undefined || (eq < 0 && value.startsWith('--'))) throw new BadInput(`--${name} needs a value`);
    const prev = opts.get(name);
    if (prev && !LISTS.has(name)) throw new BadInput(`--${name} given more than once`);
    opts.set(name, [...(prev ?? []), value]);
  }
  if (positional.length !== 1) {
    throw new BadInput(
      positional.length === 0
        ? 'sandbox needs an input file: tailmark sandbox <input.xlsx> [--value <header>] [--rerun] [--out <path>] [--json]'
        : `sandbox takes one input file; got ${positional.length}: ${positional.join(' ')}`,
    );
  }
  const one = (n: string) => opts.get(n)?.[0];
  let cutoff: number | undefined;
  const rc = one('cutoff');
  if (rc !== undefined) {
    cutoff = Number(rc);
    if (rc.trim() === '' || !Number.isFinite(cutoff) || cutoff <= 0) throw new BadInput(`--cutoff must be a number above 0; got "${rc}"`);
  }
  let minGroup = 8;
  const rm = one('min-group');
  if (rm !== undefined) {
    minGroup = Number(rm);
    if (!/^\d+$/.test(rm.trim()) || minGroup < 1) throw new BadInput(`--min-group must be a whole number of at least 1; got "${rm}"`);
  }
  return {
    input: positional[0],
    values: opts.get('value') ?? [],
    groups: opts.get('group') ?? [],
    id: one('id') ?? null,
    method: oneOf('method', one('method'), METHOD_IDS, 'robust'),
    cutoff,
    direction: oneOf('direction', one('direction'), ['high', 'low', 'both'] as const, 'both'),
    minGroup,
    smallGroups: oneOf('small-groups', one('small-groups'), ['pool', 'skip'] as const, 'pool'),
    log: opts.has('log'),
    decimalComma: opts.has('decimal-comma'),
    sheet: one('sheet'),
    rerun: opts.has('rerun'),
    out: one('out'),
    force: opts.has('force'),
    json: opts.has('json'),
  };
}

async function loadWorkbook(path: string): Promise<ExcelJS.Workbook> {
  try {
    const info = await stat(path);
    if (!info.isFile()) throw new BadInput(`input is not a file: ${path}`);
  } catch (e) {
    if (e instanceof BadInput) throw e;
    throw new BadInput(`input file not found: ${path}`);
  }
  const wb = new ExcelJS.Workbook();
  const ext = extname(path).toLowerCase();
  try {
    if (ext === '.xlsx') await wb.xlsx.readFile(path);
    else if (ext === '.csv') await wb.csv.readFile(path);
    else throw new BadInput(`unsupported file type "${ext || '(none)'}": use an .xlsx or .csv file`);
  } catch (e) {
    if (e instanceof BadInput) throw e;
    throw new BadInput(`cannot read ${path} as ${ext.slice(1)}: ${e instanceof Error ? e.message : String(e)}`);
  }
  return wb;
}

function matchHeader(table: DetectedTable, name: string, what: string): string {
  const c = table.columns.find((x) => x.header === name) ?? table.columns.find((x) => x.header.trim().toLowerCase() === name.trim().toLowerCase());
  if (!c) throw new BadInput(`no ${what} column "${name}" in ${table.address}; columns: ${table.columns.map((x) => x.header).join(', ')}`);
  return c.header;
}

/** Settings as the pane would start from: the options given, else the detected guesses. */
export function settingsFor(table: DetectedTable, a: SandboxArgs): RunSettings {
  const values = a.values.length ? a.values.map((v) => matchHeader(table, v, 'value')) : table.columns.filter((c) => c.guess === 'amount').slice(0, 1).map((c) => c.header);
  if (values.length === 0) throw new BadInput(`no amount column found in ${table.address}; name one with --value <header>`);
  const groups = a.groups.map((g) => matchHeader(table, g, 'group'));
  const id = a.id !== null ? matchHeader(table, a.id, 'id') : (table.columns.find((c) => c.guess === 'id')?.header ?? null);
  return {
    valueColumns: values,
    groupColumns: groups,
    idColumn: id,
    method: a.method,
    cutoff: a.cutoff ?? defaultCutoff(a.method),
    direction: a.direction,
    logScale: a.log,
    minGroupSize: a.minGroup,
    smallGroups: a.smallGroups,
    decimalComma: a.decimalComma,
  };
}

function letterIndex(letters: string): number {
  let n = 0;
  for (const ch of letters) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}

function splitAddress(a: string): { col: number; row: number; letters: string } {
  const m = /^([A-Z]+)([0-9]+)$/.exec(a)!;
  return { col: letterIndex(m[1]), row: Number(m[2]), letters: m[1] };
}

function lettersOf(c: number): string {
  let n = c + 1;
  let s = '';
  while (n > 0) {
    const r = (n - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

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
  try {
    const args = parseSandboxArgs(argv);
    const input = resolve(args.input);
    if (args.out !== undefined) {
      const out = resolve(args.out);
      if (out === input) throw new BadInput('--out must not be the input file (the input is never replaced)');
      if (!args.force) {
        const exists = await stat(out).then(() => true, () => false);
        if (exists) throw new BadInput(`output file exists: ${args.out} (add --force to replace it)`);
      }
    }
    const wb = await loadWorkbook(input);
    const sb: SandboxWorkbook = sandboxFromExcelJs(wb);
    const sheets = sb.sheetNames();
    if (sheets.length === 0) throw new BadInput(`${args.input} has no worksheets`);
    const sheet = args.sheet ?? sheets[0];
    if (!sheets.includes(sheet)) throw new BadInput(`no sheet "${sheet}" in ${args.input}; sheets: ${sheets.join(', ')}`);
    sb.setSelection(sheet, 'A1');
    const layer = createWorkbookLayer(sb.run);
    const before = sb.snapshot();
    sb.stats.reset();
    const table = await layer.detect();
    const settings = settingsFor(table, args);
    const summary = await layer.run(table, settings);
    const syncs = sb.stats.syncs;
    const maxRequestBytes = sb.stats.requestBytes.max;
    const maxResponseBytes = sb.stats.responseBytes.max;
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

    if (args.out !== undefined) {
      await sandboxToExcelJs(sb).xlsx.writeFile(resolve(args.out));
    }
    const report = {
      syncs,
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
    };
    if (args.json) process.stdout.write(JSON.stringify(report, null, 2) + '\n');
    else {
      process.stdout.write(
        `sandbox run on ${table.address}: ${summary.rowsScored} rows scored, ${summary.flagged} flagged, ${highlightedRows} rows highlighted\n` +
          `  ${syncs} syncs, largest request ${maxRequestBytes} B, largest response ${maxResponseBytes} B, user cells changed: ${userCellsChanged}\n` +
          `  result columns ${firstRun.resultColumns.join(', ')}; notes on sheet "${summary.notesSheet}"\n` +
          (marks ? `  re-run: ${marks.kept} of ${marks.marked} review marks kept\n` : '') +
          (args.out ? `  written to ${args.out}\n` : '') +
          'A flag means "look here", not misconduct; follow your organisation\'s policy and local law.\n',
      );
    }
    return 0;
  } catch (e) {
    if (e instanceof BadInput || e instanceof TailmarkError) {
      process.stderr.write(`tailmark: ${e.message}\n`);
      return 2;
    }
    process.stderr.write(`tailmark: unexpected error: ${e instanceof Error ? e.message : String(e)}\n`);
    return 1;
  }
}
