/**
 * Keeps the import direction of ../shared/ARCHITECTURE.md true: each layer may import only the
 * layers below it, pure layers import no Node/DOM/Office, and no browser bundle pulls in files or cli.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve, dirname, sep } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const src = join(root, 'src');

/** Which of our layers each layer may import. */
const allowed: Record<string, readonly string[]> = {
  scoring: [],
  demo: ['scoring'],
  sandbox: [],
  report: ['scoring'],
  pipeline: ['report', 'scoring'],
  workbook: ['pipeline', 'report', 'scoring'],
  files: ['pipeline', 'report', 'scoring', 'demo'],
  taskpane: ['pipeline', 'workbook', 'report', 'scoring'],
  preview: ['taskpane', 'pipeline', 'workbook', 'report', 'scoring', 'sandbox', 'demo'],
  cli: ['files', 'pipeline', 'workbook', 'report', 'scoring', 'sandbox', 'demo'],
};
/** Layers that must stay free of Node built-ins (pure, or shipped to the browser). */
const noNode = ['scoring', 'demo', 'sandbox', 'report', 'pipeline', 'workbook', 'taskpane', 'preview'];

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? walk(p) : /\.(ts|tsx)$/.test(name) ? [p] : [];
  });
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const out: string[] = [];
  const re = /(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|^\s*import\s*['"]([^'"]+)['"]/gm;
  for (let m = re.exec(text); m; m = re.exec(text)) out.push(m[1] ?? m[2] ?? m[3]);
  return out;
}

const files = walk(src);
/** Files Office loads directly (task pane page, ribbon commands): they wire Office.onReady to our layers. */
const hostEntries = [join('taskpane', 'index.tsx'), join('taskpane', 'commands.ts')];

describe('import direction (ARCHITECTURE.md)', () => {
  it('finds the source tree', () => {
    expect(files.length).toBeGreaterThan(3);
  });

  for (const file of files) {
    const rel = relative(src, file);
    const layer = rel.split(sep)[0];
    it(`${rel} imports only layers below it`, () => {
      expect(Object.keys(allowed), `unknown layer src/${layer}`).toContain(layer);
      for (const spec of importsOf(file)) {
        if (spec.startsWith('.')) {
          const target = relative(src, resolve(dirname(file), spec)).split(sep)[0];
          if (target === layer) continue;
          expect(allowed[layer], `${rel} imports src/${target} (${spec})`).toContain(target);
        } else if (noNode.includes(layer)) {
          expect(spec.startsWith('node:') || ['fs', 'path', 'os', 'child_process', 'zlib', 'stream'].includes(spec), `${rel} imports Node module ${spec}`).toBe(false);
        }
      }
    });
  }

  it('only src/workbook touches Excel.* or Office.* at run time', () => {
    for (const file of files) {
      const rel = relative(src, file);
      const layer = rel.split(sep)[0];
      if (layer === 'workbook' || layer === 'sandbox') continue;
      // Host entry points may call Office.onReady and hand Excel.run to the workbook layer.
      if (hostEntries.includes(rel)) continue;
      const code = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
      const uses = code.match(/\b(Excel|Office)\.(run|context|onReady|EventType)\b/g) ?? [];
      expect(uses, `${rel} calls Office.js directly`).toEqual([]);
    }
  });

  it('every host runs through the pipeline: only src/pipeline calls the engine or builds a plan', () => {
    // The run (scoreTable), the plan (buildPlan) and the settings-to-engine mapping (resolveOptions)
    // are the pipeline's; a host that called them itself would be a second orchestration.
    const engineCalls = /\b(scoreTable|buildPlan|resolveOptions)\b/;
    const offenders: string[] = [];
    for (const file of files) {
      const rel = relative(src, file);
      const layer = rel.split(sep)[0];
      if (layer === 'pipeline' || layer === 'scoring' || layer === 'report') continue;
      const code = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
      if (engineCalls.test(code)) offenders.push(rel);
    }
    expect(offenders).toEqual([]);
    // Within scoring and report, only their own definitions and re-exports name them.
    const pipelineRun = readFileSync(join(src, 'pipeline', 'run.ts'), 'utf8');
    expect(pipelineRun).toMatch(/scoreTable\(/);
    expect(pipelineRun).toMatch(/buildPlan\(/);
  });

  it('one user-facing error type: no other class extends Error with a message for the user', () => {
    const classes: string[] = [];
    for (const file of files) {
      const rel = relative(src, file);
      if (rel.split(sep)[0] === 'sandbox') continue; // stands in for Excel: its errors are Excel's
      const code = readFileSync(file, 'utf8');
      for (const m of code.matchAll(/class\s+(\w+)\s+extends\s+Error\b/g)) classes.push(`${rel}: ${m[1]}`);
    }
    expect(classes).toEqual([join('pipeline', 'errors.ts') + ': TailmarkError']);
  });
});
