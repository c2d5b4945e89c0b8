import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const src = fileURLToPath(new URL('../../src/', import.meta.url));

function importsOf(dir: string): { file: string; spec: string }[] {
  const out: { file: string; spec: string }[] = [];
  for (const f of readdirSync(join(src, dir)).filter((x) => x.endsWith('.ts'))) {
    const text = readFileSync(join(src, dir, f), 'utf8');
    for (const m of text.matchAll(/(?:^|\n)\s*(?:import|export)\s[^;]*?from\s+'([^']+)'/g)) out.push({ file: `${dir}/${f}`, spec: m[1] });
    for (const m of text.matchAll(/import\(\s*'([^']+)'\s*\)/g)) out.push({ file: `${dir}/${f}`, spec: m[1] });
  }
  return out;
}

// Import direction (docs: /work/shared/ARCHITECTURE.md): report imports only scoring; demo only scoring types;
// files never imports cli, taskpane or workbook. Pure modules import nothing from Node.
describe('import direction', () => {
  it('src/report imports only itself and src/scoring', () => {
    const bad = importsOf('report').filter(({ spec }) => !spec.startsWith('./') && !spec.startsWith('../scoring/'));
    expect(bad).toEqual([]);
  });

  it('src/demo imports only scoring types', () => {
    const specs = importsOf('demo');
    expect(specs.filter(({ spec }) => spec !== '../scoring/types.js' && !spec.startsWith('./'))).toEqual([]);
    const text = readFileSync(join(src, 'demo', 'claims.ts'), 'utf8');
    expect(text).toMatch(/import type \{[^}]*\} from '\.\.\/scoring\/types\.js'/);
  });

  it('src/files does not reach up into cli, taskpane or workbook', () => {
    const bad = importsOf('files').filter(({ spec }) => /^\.\.\/(cli|taskpane|workbook|sandbox)\//.test(spec));
    expect(bad).toEqual([]);
  });
});
