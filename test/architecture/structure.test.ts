/**
 * Keeps the source tree readable: no file in src/ over 600 lines, and no import circle between files
 * (a circle makes load order matter: a module can see another half-initialised). Type-only imports
 * (`import type`, `export type`) are left out: the compiler erases them, so they load nothing.
 */
import { readdirSync, readFileSync, statSync, existsSync } from 'node:fs';
import { join, relative, resolve, dirname } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const src = join(root, 'src');
const MAX_LINES = 600;

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? walk(p) : /\.(ts|tsx)$/.test(name) ? [p] : [];
  });
}

/** The files of ours a file imports (relative specifiers, resolved the way the compiler does). */
function localImports(file: string): string[] {
  // Comments out first: a comment may quote an import.
  const text = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
  const re = /(?:import|export)\s(?!type\s)[^'"]*?from\s*['"](\.[^'"]+)['"]|import\(\s*['"](\.[^'"]+)['"]\s*\)|^\s*import\s*['"](\.[^'"]+)['"]/gm;
  const out: string[] = [];
  for (let m = re.exec(text); m; m = re.exec(text)) {
    const spec = (m[1] ?? m[2] ?? m[3]).replace(/\.js$/, '');
    const base = resolve(dirname(file), spec);
    const hit = [`${base}.ts`, `${base}.tsx`, join(base, 'index.ts'), join(base, 'index.tsx')].find((p) => existsSync(p));
    if (hit) out.push(hit);
  }
  return out;
}

const files = walk(src);

describe('source structure', () => {
  it(`no file in src/ has more than ${MAX_LINES} lines`, () => {
    const long = files
      .map((f) => ({ file: relative(root, f), lines: readFileSync(f, 'utf8').split('\n').length }))
      .filter((f) => f.lines > MAX_LINES)
      .map((f) => `${f.file}: ${f.lines} lines`);
    expect(long).toEqual([]);
  });

  it('no import circle between files in src/', () => {
    const graph = new Map(files.map((f) => [f, localImports(f)]));
    const state = new Map<string, 'open' | 'done'>();
    const circles: string[] = [];
    const stack: string[] = [];
    const visit = (f: string): void => {
      state.set(f, 'open');
      stack.push(f);
      for (const g of graph.get(f) ?? []) {
        if (state.get(g) === 'open') circles.push([...stack.slice(stack.indexOf(g)), g].map((p) => relative(src, p)).join(' → '));
        else if (!state.has(g)) visit(g);
      }
      stack.pop();
      state.set(f, 'done');
    };
    for (const f of files) if (!state.has(f)) visit(f);
    expect(circles).toEqual([]);
  });
});
