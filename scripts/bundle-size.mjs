// Prints the size of the initial JavaScript each page of dist-web loads (minified, and gzipped at
// level 9), i.e. the local <script src> files of the page; external URLs (Office.js) are listed apart.
//   node scripts/bundle-size.mjs [dist-web]
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';

const here = path.dirname(fileURLToPath(import.meta.url));
export const PANE_GZIP_LIMIT = 400 * 1024;

/** @returns {{ page: string, scripts: string[], external: string[], minified: number, gzipped: number }} */
export function pageSize(dir, page) {
  const html = readFileSync(path.join(dir, page), 'utf8');
  const srcs = [...html.matchAll(/<script\b[^>]*?\bsrc=(?:"([^"]+)"|'([^']+)'|([^\s>]+))/g)].map((m) => m[1] ?? m[2] ?? m[3]);
  const external = srcs.filter((s) => /^[a-z]+:\/\//i.test(s) || s.startsWith('//'));
  const scripts = srcs.filter((s) => !external.includes(s));
  let minified = 0;
  let gzipped = 0;
  for (const s of scripts) {
    const buf = readFileSync(path.join(dir, s.replace(/^\//, '')));
    minified += buf.length;
    gzipped += gzipSync(buf, { level: 9 }).length;
  }
  return { page, scripts, external, minified, gzipped };
}

const kb = (n) => `${(n / 1024).toFixed(1)} KB`;

if (import.meta.url === `file://${process.argv[1]}`) {
  const dir = path.resolve(process.argv[2] ?? path.join(here, '..', 'dist-web'));
  for (const page of ['taskpane.html', 'preview.html', 'commands.html']) {
    const s = pageSize(dir, page);
    console.log(`${page.padEnd(15)} initial JS ${kb(s.minified).padStart(10)} minified, ${kb(s.gzipped).padStart(9)} gzipped  (${s.scripts.join(', ')})` +
      (s.external.length ? `  + external: ${s.external.join(', ')}` : ''));
  }
  const pane = pageSize(dir, 'taskpane.html');
  if (pane.gzipped > PANE_GZIP_LIMIT) {
    console.error(`The task pane's initial JS is ${kb(pane.gzipped)} gzipped, over the ${kb(PANE_GZIP_LIMIT)} limit.`);
    process.exit(1);
  }
}
