import { beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as XLSX from 'xlsx';
import { readBook } from './helpers.js';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'bin', 'tailmark.js');
const built = join(root, 'dist', 'src', 'cli', 'main.js');

/** Newest modification time (ms) of a file, or of the files below a folder. */
function newestMtime(path: string): number {
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  return Math.max(0, ...readdirSync(path).map((name) => newestMtime(join(path, name))));
}

beforeAll(() => {
  // Build dist/ as `npm ci` (prepare) does, unless it is newer than every source (as right after
  // `npm ci`). Another area's type error must not hide ours, so the exit status is not asserted;
  // the compiled entry point must exist.
  const sources = ['src', 'bench', 'package.json', 'tsconfig.json', 'tsconfig.build.json'].map((p) => join(root, p));
  if (!existsSync(built) || statSync(built).mtimeMs < Math.max(...sources.map(newestMtime))) {
    try {
      execFileSync('npm', ['run', 'build:node'], { cwd: root, stdio: 'pipe' });
    } catch {
      /* tsc emits even when it reports errors elsewhere */
    }
  }
  expect(existsSync(built)).toBe(true);
}, 180_000);

function node(args: string[], cwd = root) {
  return spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8' });
}

describe('bin/tailmark.js (real process)', () => {
  it('--help exits 0 with the usage text', () => {
    const r = node(['--help']);
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('tailmark score <input.xlsx|input.csv|.tsv|.txt> --value <header>');
    expect(r.stderr).toBe('');
  });

  it('bad input exits 2 with one line on stderr', () => {
    const r = node(['score', join(tmpdir(), 'tailmark-no-such-file.xlsx'), '--value', 'Amount']);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/input file not found/);
  });

  it('demo writes the input and scored workbooks under out/ and can run again', () => {
    const cwd = mkdtempSync(join(tmpdir(), 'tailmark-demo-'));
    for (let i = 0; i < 2; i++) {
      const r = node(['demo'], cwd);
      expect(r.stderr).toBe('');
      expect(r.status).toBe(0);
      expect(r.stdout).toContain(join('out', 'demo-claims.xlsx'));
      expect(r.stdout).toContain(join('out', 'demo-claims-scored.xlsx'));
      // The summary names the method the demo was scored with (the default), not a fixed one.
      expect(r.stdout).toMatch(/claims flagged \(skew-aware fences \(medcouple\), cutoff 3,/);
    }
    const book = readBook(join(cwd, 'out', 'demo-claims-scored.xlsx'));
    expect(book.SheetNames).toEqual(['Claims', 'Tailmark notes', 'Tailmark log']);
    const header = XLSX.utils.sheet_to_json<unknown[]>(book.Sheets.Claims, { header: 1 })[0];
    expect(header).toContain('Amount · tail score');
  });

  it('demo with an explicit --out refuses to replace files without --force', () => {
    const cwd = mkdtempSync(join(tmpdir(), 'tailmark-demo-'));
    const target = join(cwd, 'my-demo.xlsx');
    expect(node(['demo', '--out', target], cwd).status).toBe(0);
    expect(existsSync(join(cwd, 'my-demo-scored.xlsx'))).toBe(true);
    const again = node(['demo', '--out', target], cwd);
    expect(again.status).toBe(2);
    expect(again.stderr).toMatch(/already exists.*--force/);
    expect(node(['demo', '--out', target, '--force'], cwd).status).toBe(0);
  });
});
