/**
 * Shared e2e plumbing: build the browser bundles once (production) into test-output/dist-web,
 * serve them with our static server on a free port, and drive /usr/bin/chromium with playwright-core.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { startServer } from '../../scripts/serve.mjs';

export const ROOT = path.resolve(import.meta.dirname, '..', '..');
export const OUT_DIR = path.join(ROOT, 'test-output', 'dist-web');
/**
 * Where the tests save screenshots: test-output/screenshots (ignored by git), so a test run never rewrites
 * tracked files. TAILMARK_UPDATE_SCREENSHOTS=1 saves them into docs/screenshots instead, to refresh the docs.
 */
export const SCREENSHOT_DIR =
  process.env.TAILMARK_UPDATE_SCREENSHOTS === '1' ? path.join(ROOT, 'docs', 'screenshots') : path.join(ROOT, 'test-output', 'screenshots');
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** Runs `webpack --mode production` into test-output/dist-web; throws with webpack's output on failure. */
export function buildWeb(outDir = OUT_DIR): void {
  // While iterating on the tests only: TAILMARK_E2E_REUSE_BUILD=1 reuses the last build.
  if (process.env.TAILMARK_E2E_REUSE_BUILD === '1' && existsSync(path.join(outDir, 'preview.html'))) return;
  mkdirSync(path.dirname(outDir), { recursive: true });
  const cli = path.join(ROOT, 'node_modules', 'webpack-cli', 'bin', 'cli.js');
  const r = spawnSync(process.execPath, [cli, '--mode', 'production', '--output-path', outDir], {
    cwd: ROOT,
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
  });
  if (r.status !== 0) throw new Error(`webpack failed (exit ${r.status}):\n${r.stdout}\n${r.stderr}`);
  if (!existsSync(path.join(outDir, 'preview.html')) || statSync(path.join(outDir, 'preview.html')).size === 0) {
    throw new Error('webpack wrote no preview.html');
  }
}

export interface Session {
  readonly url: string;
  readonly browser: Browser;
  close(): Promise<void>;
}

export async function startSession(dir = OUT_DIR): Promise<Session> {
  const server = await startServer({ dir, port: 0, host: '127.0.0.1' });
  const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', args: CHROMIUM_ARGS });
  return {
    url: server.url,
    browser,
    async close() {
      await browser.close();
      await server.close();
    },
  };
}

export interface OpenedPage {
  readonly page: Page;
  /** Every URL the page requested. */
  readonly requests: string[];
  /** Uncaught page errors and console errors. */
  readonly errors: string[];
}

export async function openPage(
  s: Session,
  file: string,
  opts: { width?: number; height?: number; theme?: 'light' | 'dark'; query?: string } = {},
): Promise<OpenedPage> {
  const page = await s.browser.newPage({ viewport: { width: opts.width ?? 1280, height: opts.height ?? 900 } });
  const requests: string[] = [];
  const errors: string[] = [];
  page.on('request', (r) => requests.push(r.url()));
  page.on('pageerror', (e) => errors.push(e.message));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  // No network in tests: anything not on our server is refused (and recorded).
  await page.route('**/*', (route) => (route.request().url().startsWith(s.url) ? route.continue() : route.abort()));
  const params = new URLSearchParams(opts.query ?? '');
  if (opts.theme) params.set('theme', opts.theme);
  const q = params.toString();
  await page.goto(`${s.url}/${file}${q ? `?${q}` : ''}`);
  return { page, requests, errors };
}
