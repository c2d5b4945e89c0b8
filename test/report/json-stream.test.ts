import { describe, expect, it } from 'vitest';
import { demoClaims } from '../../src/demo/claims.js';
import { runPipeline } from '../../src/pipeline/index.js';
import { planJsonChunks, planToJson } from '../../src/report/json.js';

// The streamed --json text must be the same document as the object (checked with JSON.parse, which
// is outside the code under test).
describe('planJsonChunks', () => {
  it('joined, parses to planToJson of the same plan (with claim ids)', () => {
    const demo = demoClaims({ rows: 300 });
    const columns = demo.headers.map((_, c) => demo.rows.map((r) => r[c]));
    const table = { source: 'demo', sheetName: 'Claims', headers: demo.headers, columns, rowCount: demo.rows.length, headerRow: 1, firstColumn: 0 };
    const { plan } = runPipeline(table, { valueColumns: ['Amount'], groupColumns: ['Cost centre'], idColumn: 'Claim ID' }, { when: new Date(0) });
    const chunks = [...planJsonChunks(plan)];
    expect(JSON.parse(chunks.join(''))).toEqual(JSON.parse(JSON.stringify(planToJson(plan))));
  });
});
