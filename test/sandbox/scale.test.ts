// A full-height sheet (1,048,575 data rows + header, 10 columns) loads and reads back in chunks
// that stay under the 5 MB response limit. Correctness only; speed is measured outside unit tests.
import { describe, expect, it } from 'vitest';
import { SandboxWorkbook } from '../../src/sandbox/index.js';

describe('full-height sheet', () => {
  it('1,048,575 x 10 loads and reads back in chunks, every value intact', async () => {
    const ROWS = 1_048_575;
    const COLS = 10;
    const sb = new SandboxWorkbook().addSheet('Big');
    const header = Array.from({ length: COLS }, (_, j) => `c${j}`);
    sb.setValues('Big', 'A1', [header]);
    // Build column-wise blocks of rows to keep the fixture cheap.
    const block = 65_536;
    for (let start = 0; start < ROWS; start += block) {
      const n = Math.min(block, ROWS - start);
      const rows = Array.from({ length: n }, (_, i) => Array.from({ length: COLS }, (_, j) => (j === 0 ? `id${start + i}` : (start + i) * 10 + j)));
      sb.setValues('Big', `A${start + 2}`, rows);
    }
    let checked = 0;
    let bad = 0;
    const chunk = 40_000; // 40k rows x 10 numbers ~ 3.5 MB of JSON
    await sb.run(async (context) => {
      const ws = context.workbook.worksheets.getItem('Big');
      const used = ws.getUsedRange().load('address');
      await context.sync();
      // Excel writes a range spanning every row as whole columns.
      expect(used.address).toBe('Big!A:J');
      for (let r0 = 1; r0 <= ROWS; r0 += chunk) {
        const n = Math.min(chunk, ROWS + 1 - r0);
        const rg = ws.getRangeByIndexes(r0, 0, n, COLS).load('values');
        await context.sync();
        const v = rg.values;
        for (let i = 0; i < n; i++) {
          const k = r0 - 1 + i;
          if (v[i][0] !== `id${k}` || v[i][9] !== k * 10 + 9) bad++;
          checked++;
        }
      }
    });
    expect(bad).toBe(0);
    expect(checked).toBe(ROWS);
    expect(sb.stats.responseBytes.max).toBeLessThan(5 * 1024 * 1024);
  });
});
