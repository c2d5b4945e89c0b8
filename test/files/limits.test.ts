/**
 * Issue 12: no silent wrong results. More claims than a sheet holds are refused with the limit and
 * what to do (1,048,576 rows per worksheet: Microsoft's "Excel specifications and limits" page);
 * data validations come back with the ranges they had; --json streams.
 */
import { describe, expect, it } from 'vitest';
import { createWriteStream, existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { compactValidations } from '../../src/files/validation-ranges.js';
import { run, sheetPart, zipPart } from '../cli/helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tailmark-limits-'));

async function tallCsv(path: string, rows: number): Promise<void> {
  const out = createWriteStream(path);
  out.write('Team,Amount\n');
  let buf = '';
  for (let r = 0; r < rows; r++) {
    buf += r % 2 ? 'A,1\n' : 'B,2\n';
    if (buf.length > 1 << 16) {
      if (!out.write(buf)) await new Promise<void>((res) => out.once('drain', () => res()));
      buf = '';
    }
  }
  await new Promise<void>((res) => out.end(buf, () => res()));
}

describe('more claims than a sheet holds', () => {
  it('is refused with the limit and what to do; nothing is written', async () => {
    const f = join(dir, 'tall.csv');
    await tallCsv(f, 1_048_580);
    const out = join(dir, 'tall-out.xlsx');
    const r = await run('score', f, '--value', 'Amount', '--group', 'Team', '--out', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/has 1,048,580 claims below its header \(row 1\), ending on row 1,048,581: a worksheet holds 1,048,576 rows/);
    expect(r.err).toMatch(/Split the file into parts of at most 1,048,575 claims .* or use --json without --out/);
    expect(existsSync(out)).toBe(false);
    // --json has no row limit.
    const j = await run('score', f, '--value', 'Amount', '--group', 'Team', '--json');
    expect(j.code, j.err).toBe(0);
    const parsed = JSON.parse(j.out) as { rows: unknown[]; groups: { key: string; n: number }[] };
    expect(parsed.rows).toHaveLength(1_048_580);
    expect(parsed.groups.map((g) => [g.key, g.n]).sort()).toEqual([['A', 524_290], ['B', 524_290]]);
  }, 120_000);
});

describe('data validations keep their ranges', () => {
  it('per-cell entries are regrouped into the rectangles they came from, without overlaps', () => {
    const v = { type: 'list', formulae: ['"a,b"'] };
    const w = { type: 'whole', operator: 'between', formulae: [1, 9] };
    const model: Record<string, unknown> = {};
    for (let r = 2; r <= 81; r++) model[`D${r}`] = v;
    for (let r = 2; r <= 5; r++) for (const c of ['F', 'G']) model[`${c}${r}`] = w;
    model['H1:H3'] = v;
    compactValidations(model);
    expect(model).toEqual({ 'D2:D81': v, 'F2:G5': w, 'H1:H3': v });
  });

  it('a validation on D2:D81 comes back as D2:D81 in a scored workbook (in-memory writer)', async () => {
    const f = join(dir, 'dv.xlsx');
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Claims');
    ws.addRow(['Team', 'Amount', 'Kind', 'Checked']);
    for (let r = 0; r < 80; r++) ws.addRow([r % 2 ? 'A' : 'B', 10 + (r % 7), 'x', 'no']);
    (ws as unknown as { dataValidations: { add(a: string, v: ExcelJS.DataValidation): void } }).dataValidations.add('D2:D81', {
      type: 'list', allowBlank: true, formulae: ['"yes,no"'],
    });
    await wb.xlsx.writeFile(f);
    const out = join(dir, 'dv-out.xlsx');
    const r = await run('score', f, '--value', 'Amount', '--group', 'Team', '--out', out);
    expect(r.code, r.err).toBe(0);
    const xml = zipPart(out, sheetPart(out, 'Claims'));
    const sqrefs = [...xml.matchAll(/<dataValidation [^>]*sqref="([^"]+)"/g)].map((m) => m[1]);
    expect(sqrefs).toContain('D2:D81');
    expect(sqrefs.filter((s) => s.startsWith('D'))).toEqual(['D2:D81']);
  });
});
