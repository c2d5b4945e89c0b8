// The sandbox imports nothing of Tailmark's and nothing Node-only, so it can stand in for Excel in
// the browser preview as well as in Node (ARCHITECTURE.md, import direction).
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

const dir = join(import.meta.dirname, '../../src/sandbox');

describe('sandbox import boundary', () => {
  it('imports only its own files and exceljs', () => {
    const bad: string[] = [];
    for (const f of readdirSync(dir).filter((x) => x.endsWith('.ts'))) {
      const src = readFileSync(join(dir, f), 'utf8');
      for (const m of src.matchAll(/^\s*(?:import|export)[^'"]*from\s+['"]([^'"]+)['"]/gm)) {
        const spec = m[1];
        if (spec.startsWith('./') && !spec.includes('/', 2)) continue;
        if (spec === 'exceljs') continue;
        bad.push(`${f}: ${spec}`);
      }
      if (/\brequire\(|process\.|Buffer\b/.test(src)) bad.push(`${f}: uses a Node global`);
    }
    expect(bad).toEqual([]);
  });
});
