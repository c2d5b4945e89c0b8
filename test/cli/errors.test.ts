import { beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { demoClaims } from '../../src/demo/claims.js';
import { writeDemoWorkbook } from '../../src/files/demo.js';
import { run, sha256 } from './helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-bad-'));
const input = join(dir, 'claims.xlsx');
let hash = '';

beforeAll(async () => {
  await writeDemoWorkbook(input, demoClaims());
  hash = sha256(input);
});

/** Every bad input: exit code 2, exactly one line on stderr, nothing on stdout, no output file. */
async function bad(pattern: RegExp, ...argv: string[]) {
  const before = readdirSync(dir).sort();
  const r = await run(...argv);
  expect(r.code, r.err).toBe(2);
  expect(r.out).toBe('');
  const lines = r.err.split('\n').filter((l) => l !== '');
  expect(lines, r.err).toHaveLength(1);
  expect(lines[0]).toMatch(/^tailmark: /);
  expect(lines[0]).toMatch(pattern);
  expect(readdirSync(dir).sort()).toEqual(before);
  expect(sha256(input)).toBe(hash);
  return lines[0];
}

describe('bad input: exit code 2 and one clear line', () => {
  it('unknown header lists the headers that exist', async () => {
    const line = await bad(/value column "Amout" not found/, 'score', input, '--value', 'Amout');
    expect(line).toContain('"Claim ID", "Employee", "Cost centre", "Category", "Claim date", "Amount", "Notes"');
    await bad(/group column "Department" not found.*"Cost centre"/, 'score', input, '--value', 'Amount', '--group', 'Department');
    await bad(/id column "Ref" not found/, 'score', input, '--value', 'Amount', '--id', 'Ref');
  });

  it('matches headers ignoring case and spaces before giving up', async () => {
    const r = await run('score', input, '--value', ' amount ', '--group', 'cost centre', '--json');
    expect(r.code).toBe(0);
  });

  it('missing, empty and unreadable files', async () => {
    await bad(/input file not found: .*nope\.xlsx/, 'score', join(dir, 'nope.xlsx'), '--value', 'Amount');
    const empty = join(dir, 'empty.csv');
    writeFileSync(empty, '');
    await bad(/input file is empty/, 'score', empty, '--value', 'Amount');
    const blank = join(dir, 'blank.csv');
    writeFileSync(blank, '\n\n , \n');
    await bad(/is empty \(no header row found\)/, 'score', blank, '--value', 'Amount');
    const headerOnly = join(dir, 'header-only.csv');
    writeFileSync(headerOnly, 'Amount,Team\n');
    await bad(/has a header row but no data rows/, 'score', headerOnly, '--value', 'Amount');
    const junk = join(dir, 'junk.xlsx');
    writeFileSync(junk, 'not a workbook at all');
    await bad(/cannot read junk\.xlsx as an \.xlsx workbook/, 'score', junk, '--value', 'Amount');
    const odd = join(dir, 'claims.ods');
    writeFileSync(odd, 'x');
    await bad(/unsupported file type "\.ods"/, 'score', odd, '--value', 'Amount');
  });

  it('value column with no numbers says what the cells are', async () => {
    await bad(/value column "Employee" has no numbers.*text that is not a number/, 'score', input, '--value', 'Employee');
  });

  it('missing sheet lists the sheets', async () => {
    await bad(/sheet "Summary" not found in claims\.xlsx; sheets: "Claims"/, 'score', input, '--value', 'Amount', '--sheet', 'Summary');
  });

  it('bad option values', async () => {
    await bad(/--method must be one of robust, classic, iqr, adjusted, skew; got "median"/, 'score', input, '--value', 'Amount', '--method', 'median');
    await bad(/--cutoff must be a number above 0; got "-1"/, 'score', input, '--value', 'Amount', '--cutoff', '-1');
    await bad(/--cutoff must be a number above 0; got "abc"/, 'score', input, '--value', 'Amount', '--cutoff', 'abc');
    await bad(/--direction must be one of high, low, both; got "up"/, 'score', input, '--value', 'Amount', '--direction', 'up');
    await bad(/--min-group must be a whole number of at least 1; got "0"/, 'score', input, '--value', 'Amount', '--min-group', '0');
    await bad(/--min-group must be a whole number/, 'score', input, '--value', 'Amount', '--min-group', '2.5');
    await bad(/--small-groups must be one of pool, skip/, 'score', input, '--value', 'Amount', '--small-groups', 'merge');
    await bad(/unknown option --colour/, 'score', input, '--value', 'Amount', '--colour', 'red');
    await bad(/--value needs a value/, 'score', input, '--value');
    await bad(/needs at least one --value/, 'score', input);
    await bad(/needs an input file/, 'score', '--value', 'Amount');
    await bad(/--method given more than once/, 'score', input, '--value', 'Amount', '--method', 'robust', '--method', 'iqr');
    await bad(/given both as --value and as --group/, 'score', input, '--value', 'Amount', '--group', 'Amount');
    await bad(/--sheet applies to \.xlsx files only/, 'score', join(dir, 'header-only.csv'), '--value', 'Amount', '--sheet', 'X');
    await bad(/--out must end in \.xlsx/, 'score', input, '--value', 'Amount', '--out', join(dir, 'out.csv'));
    await bad(/folder for --out does not exist/, 'score', input, '--value', 'Amount', '--out', join(dir, 'no', 'such', 'o.xlsx'));
  });

  it('unknown command and no command', async () => {
    await bad(/unknown command "scroe"/, 'scroe');
    await bad(/no command given/);
  });

  it('--help exits 0 and lists every score option', async () => {
    const r = await run('--help');
    expect(r.code).toBe(0);
    for (const o of ['--value', '--group', '--id', '--method', '--cutoff', '--direction', '--min-group', '--small-groups', '--log', '--decimal-comma', '--sheet', '--out', '--force', '--json']) {
      expect(r.out).toContain(o);
    }
    expect(existsSync(join(dir, 'claims-tailmark.xlsx'))).toBe(false);
  });
});
