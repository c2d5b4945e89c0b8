/**
 * The browser build refuses Node built-ins and src/files / src/cli (ARCHITECTURE.md: a browser
 * bundle never pulls in files or cli). Compiles tiny entries with the project's webpack config.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import webpack, { type Configuration, type Stats } from 'webpack';
import { afterAll, describe, expect, it } from 'vitest';
import makeConfig, { BrowserBoundaryPlugin } from '../../webpack.config.js';
import { ROOT } from './harness.js';

const dir = path.join(ROOT, 'test-output', 'boundary');
mkdirSync(dir, { recursive: true });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function compile(source: string): Promise<string[]> {
  const name = `entry-${Math.random().toString(36).slice(2)}.ts`;
  writeFileSync(path.join(dir, name), source);
  const base = (makeConfig as (env: object, argv: object) => Configuration)({}, { mode: 'development' });
  const config: Configuration = {
    ...base,
    entry: { probe: path.join(dir, name) },
    output: { path: path.join(dir, 'out'), filename: '[name].js' },
    plugins: [...(base.plugins ?? []).filter((p) => p?.constructor?.name === 'NormalModuleReplacementPlugin'), new BrowserBoundaryPlugin()],
    devtool: false,
  };
  return new Promise((resolve, reject) => {
    webpack(config, (err: Error | null | undefined, stats: Stats | undefined) => {
      if (err) return reject(err);
      resolve((stats?.toJson({ all: false, errors: true }).errors ?? []).map((e) => e.message));
    });
  });
}

describe('browser bundle boundary', () => {
  it('fails the build when a Node built-in is imported', async () => {
    const errors = await compile(`import { readFileSync } from 'node:fs';\nexport const x = readFileSync;\n`);
    expect(errors.join('\n')).toMatch(/Node built-in "node:fs"/);
    const bare = await compile(`import path from 'path';\nexport const x = path;\n`);
    expect(bare.join('\n')).toMatch(/Node built-in "path"/);
  });

  it('fails the build when src/files is imported', async () => {
    const errors = await compile(`export * from '../../src/files/read.js';\n`);
    expect(errors.join('\n')).toMatch(/src\/files and src\/cli are Node-only/);
  });

  it('accepts the browser-safe layers', async () => {
    const errors = await compile(`export { scoreTable } from '../../src/scoring/index.js';\nexport { demoClaims } from '../../src/demo/claims.js';\n`);
    expect(errors).toEqual([]);
  });
});
