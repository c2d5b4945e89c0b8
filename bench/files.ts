/**
 * Benchmark of the batch command on large files: `tailmark score` on
 *   1. a full-height CSV (a header and 1,048,575 claims: every one of a worksheet's 1,048,576 rows)
 *      -> scored .xlsx, in large-file (row-by-row) mode;
 *   2. a 300,000-row .xlsx with formats and a formula column -> scored .xlsx, large-file mode;
 *   3. the same kind of .xlsx at 100,000 rows with the in-memory writer (TAILMARK_STREAM_ROWS above
 *      its size), the path small files take, for comparison.
 * Invented claims (seeded PRNG; nothing real), written to a temporary folder that is removed after.
 * Each case runs the command in a child process, which reports its wall time and its peak resident
 * memory (process.resourceUsage().maxRSS) on stdout.
 *
 * Target (from the task, no outside source): full-height CSV -> scored xlsx under 2 GB peak and a
 * few minutes (we check < 2,048 MB and < 300 s). Exit code 1 if missed.
 * Usage: npm run bench:files [-- --rows 1048574] [-- --only csv|xlsx|memory] [-- --keep] [-- --json]
 */
import { spawnSync } from 'node:child_process';
import { createWriteStream, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import ExcelJS from 'exceljs';
import { mulberry32 } from '../src/demo/random.js';

const SHEET_ROWS = 1_048_576; // rows in a worksheet
const CSV_ROWS = SHEET_ROWS - 1; // data rows under one header row
const XLSX_ROWS = 300_000;
const MEMORY_ROWS = 100_000;
const TARGET_MB = 2048;
const TARGET_S = 300;

interface ChildResult {
  ms: number;
  peakMB: number;
  code: number;
  out: string;
}


const CENTRES = Array.from({ length: 40 }, (_, i) => `CC-${100 + i * 7}`);
const CATEGORIES: [string, number][] = [
  ['Travel', 185],
  ['Lodging', 140],
  ['Meals', 38],
  ['Mileage', 52],
  ['Supplies', 64],
  ['Training', 420],
];
const SYL = ['ka', 'ro', 'vi', 'ne', 'tu', 'sa', 'mo', 'le', 'qu', 'zi'];

interface Claim {
  id: string;
  employee: string;
  centre: string;
  category: string;
  day: number; // days after 1 Jan 2025
  amount: number | string | null;
  note: string;
}

function* claims(rows: number): Generator<Claim> {
  const rand = mulberry32(20250401);
  const names = Array.from({ length: 400 }, (_, i) => `${SYL[i % 10]}${SYL[(i * 3) % 10]}${SYL[(i * 7) % 10]} ${SYL[(i >> 2) % 10]}${SYL[(i >> 4) % 10]}n`);
  for (let r = 0; r < rows; r++) {
    const [category, median] = CATEGORIES[Math.floor(rand() * CATEGORIES.length)];
    const z = Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
    let amount: number | string | null = Math.round(median * Math.exp(0.5 * z) * 100) / 100;
    if (rand() < 0.005) amount = Math.round(amount * 7 * 100) / 100;
    const u = rand();
    if (u < 0.002) amount = null;
    else if (u < 0.004) amount = amount.toLocaleString('en-US', { minimumFractionDigits: 2 });
    else if (u < 0.005) amount = 'see receipt';
    yield {
      id: `X${String(r + 1).padStart(7, '0')}`,
      employee: names[Math.floor(rand() * names.length)],
      centre: CENTRES[Math.floor(rand() * CENTRES.length)],
      category,
      day: Math.floor(rand() * 90),
      amount,
      note: rand() < 0.1 ? 'Client visit, see "agenda"' : '',
    };
  }
}

function csvField(v: string): string {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

async function writeCsv(path: string, rows: number): Promise<void> {
  const out = createWriteStream(path);
  const write = (s: string) => (out.write(s) ? Promise.resolve() : new Promise<void>((res) => out.once('drain', () => res())));
  await write('Claim ID,Employee,Cost centre,Category,Claim date,Amount,Notes\r\n');
  let buf = '';
  for (const c of claims(rows)) {
    const date = new Date(Date.UTC(2025, 0, 1 + c.day)).toISOString().slice(0, 10);
    buf += `${c.id},${c.employee},${c.centre},${c.category},${date},${c.amount === null ? '' : csvField(String(c.amount))},${csvField(c.note)}\r\n`;
    if (buf.length > 1 << 20) {
      await write(buf);
      buf = '';
    }
  }
  await write(buf);
  await new Promise<void>((res, rej) => out.end((e?: Error | null) => (e ? rej(e) : res())));
}

async function writeXlsx(path: string, rows: number): Promise<void> {
  const wb = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: path, useStyles: true, useSharedStrings: true });
  const ws = wb.addWorksheet('Claims', { views: [{ state: 'frozen', ySplit: 1 }] });
  const widths = [11, 14, 11, 11, 12, 12, 12, 26];
  widths.forEach((w, i) => (ws.getColumn(i + 1).width = w));
  const head = ws.addRow(['Claim ID', 'Employee', 'Cost centre', 'Category', 'Claim date', 'Amount', 'VAT (20%)', 'Notes']);
  head.font = { bold: true };
  head.commit();
  const dateStyle = { numFmt: 'dd mmm yyyy' };
  const amountStyle = { numFmt: '#,##0.00;(#,##0.00)' };
  let r = 1;
  for (const c of claims(rows)) {
    r++;
    const row = ws.getRow(r);
    row.getCell(1).value = c.id;
    row.getCell(2).value = c.employee;
    row.getCell(3).value = c.centre;
    row.getCell(4).value = c.category;
    const d = row.getCell(5);
    d.value = new Date(Date.UTC(2025, 0, 1 + c.day));
    d.style = dateStyle;
    const a = row.getCell(6);
    if (c.amount !== null) a.value = c.amount;
    a.style = amountStyle;
    const v = row.getCell(7);
    v.value = typeof c.amount === 'number' ? { formula: `ROUND(F${r}*0.2,2)`, result: Math.round(c.amount * 20) / 100 } : null;
    v.style = amountStyle;
    if (c.note) row.getCell(8).value = c.note;
    row.commit();
  }
  await wb.commit();
}

function runChild(args: string[], env: Record<string, string> = {}): ChildResult {
  const self = fileURLToPath(import.meta.url);
  const r = spawnSync(process.execPath, [self, '--child', ...args], {
    encoding: 'utf8',
    env: { ...process.env, ...env },
    maxBuffer: 64 << 20,
  });
  const last = (r.stdout ?? '').trim().split('\n').pop() ?? '';
  try {
    const j = JSON.parse(last) as ChildResult;
    return j;
  } catch {
    throw new Error(`child failed (status ${r.status}): ${r.stderr || r.stdout}`);
  }
}

/** In the child: run the command in-process and report time and peak RSS. */
async function child(argv: string[]): Promise<void> {
  const { main } = await import('../src/cli/main.js');
  let out = '';
  const t0 = performance.now();
  const code = await main(argv, { out: (s) => void (out += s), err: (s) => void (out += s), progress: false });
  const ms = performance.now() - t0;
  const peakMB = process.resourceUsage().maxRSS / 1024;
  process.stdout.write(`${JSON.stringify({ ms, peakMB, code, out })}\n`);
}

function mb(path: string): string {
  return `${(statSync(path).size / 1e6).toFixed(1)} MB`;
}

async function parent(argv: string[]): Promise<number> {
  const flag = (n: string) => argv.includes(n);
  const value = (n: string) => {
    const i = argv.indexOf(n);
    return i >= 0 ? argv[i + 1] : undefined;
  };
  const only = value('--only');
  const csvRows = Number(value('--rows') ?? CSV_ROWS);
  const dir = mkdtempSync(join(tmpdir(), 'tailmark-bench-files-'));
  const results: { name: string; rows: number; ms: number; peakMB: number; input: string; output: string; note: string }[] = [];
  const scoreArgs = ['--value', 'Amount', '--group', 'Cost centre', '--group', 'Category', '--id', 'Claim ID', '--force'];
  try {
    if (!only || only === 'csv') {
      const input = join(dir, 'claims-full.csv');
      const out = join(dir, 'claims-full-scored.xlsx');
      process.stderr.write(`writing ${csvRows.toLocaleString('en')}-row CSV…\n`);
      await writeCsv(input, csvRows);
      process.stderr.write('scoring it…\n');
      const r = runChild(['score', input, ...scoreArgs, '--out', out]);
      if (r.code !== 0) throw new Error(`csv case failed: ${r.out}`);
      results.push({ name: 'CSV -> xlsx (large-file mode)', rows: csvRows, ms: r.ms, peakMB: r.peakMB, input: mb(input), output: mb(out), note: r.out.split('\n')[0] });
    }
    if (!only || only === 'xlsx') {
      const rows = Number(value('--xlsx-rows') ?? XLSX_ROWS);
      const input = join(dir, 'claims-big.xlsx');
      const out = join(dir, 'claims-big-scored.xlsx');
      process.stderr.write(`writing ${rows.toLocaleString('en')}-row xlsx…\n`);
      await writeXlsx(input, rows);
      process.stderr.write('scoring it…\n');
      const r = runChild(['score', input, ...scoreArgs, '--out', out]);
      if (r.code !== 0) throw new Error(`xlsx case failed: ${r.out}`);
      results.push({ name: 'xlsx -> xlsx (large-file mode)', rows, ms: r.ms, peakMB: r.peakMB, input: mb(input), output: mb(out), note: r.out.split('\n')[0] });
    }
    if (!only || only === 'memory') {
      const rows = MEMORY_ROWS;
      const input = join(dir, 'claims-100k.xlsx');
      const out = join(dir, 'claims-100k-scored.xlsx');
      await writeXlsx(input, rows);
      for (const [name, env] of [
        ['xlsx -> xlsx (in-memory path)', { TAILMARK_STREAM_ROWS: String(rows + 1) }],
        ['xlsx -> xlsx (large-file mode)', { TAILMARK_STREAM_ROWS: '0' }],
      ] as const) {
        process.stderr.write(`scoring ${rows.toLocaleString('en')} rows, ${name}…\n`);
        const r = runChild(['score', input, ...scoreArgs, '--out', out], env);
        if (r.code !== 0) throw new Error(`${name} failed: ${r.out}`);
        results.push({ name, rows, ms: r.ms, peakMB: r.peakMB, input: mb(input), output: mb(out), note: r.out.split('\n')[0] });
      }
    }
  } finally {
    if (!flag('--keep')) rmSync(dir, { recursive: true, force: true });
    else process.stderr.write(`files kept in ${dir}\n`);
  }

  const csv = results.find((r) => r.name.startsWith('CSV'));
  const ok = !csv || csvRows < CSV_ROWS || (csv.peakMB < TARGET_MB && csv.ms < TARGET_S * 1000);
  if (flag('--json')) {
    process.stdout.write(`${JSON.stringify({ results, target: { peakMB: TARGET_MB, seconds: TARGET_S }, ok })}\n`);
  } else {
    for (const r of results) {
      process.stdout.write(
        `${r.name.padEnd(32)} ${r.rows.toLocaleString('en').padStart(10)} rows  ${(r.ms / 1000).toFixed(1).padStart(6)} s  ` +
          `peak ${r.peakMB.toFixed(0).padStart(5)} MB  in ${r.input}, out ${r.output}\n`,
      );
    }
    process.stdout.write(`target (full-height CSV): < ${TARGET_MB} MB and < ${TARGET_S} s: ${ok ? 'met' : 'MISSED'}\n`);
  }
  return ok ? 0 : 1;
}

const argv = process.argv.slice(2);
if (argv[0] === '--child') {
  await child(argv.slice(1));
} else {
  process.exitCode = await parent(argv);
}
