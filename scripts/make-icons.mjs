// Renders Tailmark's icon (an SVG of our own: a small distribution with one claim out in the tail)
// to PNGs in assets/ with headless Chromium. Run: node scripts/make-icons.mjs
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
export const ICON_SIZES = [16, 32, 64, 80, 128];

export function iconSvg(size) {
  // Simpler drawing at 16 px so it stays legible.
  const bars = size <= 16
    ? '<rect x="3" y="9" width="2" height="4" /><rect x="6" y="5" width="2" height="8" /><rect x="9" y="8" width="2" height="5" />'
    : '<rect x="2.5" y="9.5" width="1.8" height="3.5" /><rect x="4.8" y="6" width="1.8" height="7" /><rect x="7.1" y="4.5" width="1.8" height="8.5" /><rect x="9.4" y="7.5" width="1.8" height="5.5" />';
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${size}" height="${size}" viewBox="0 0 16 16">
  <rect x="0.5" y="0.5" width="15" height="15" rx="3" fill="#1F5F5B"/>
  <g fill="#E8F1EF">${bars}</g>
  <circle cx="13.3" cy="4.2" r="1.6" fill="#F2A65A"/>
  <rect x="2" y="13" width="12" height="0.8" fill="#E8F1EF"/>
</svg>`;
}

export async function makeIcons(outDir = path.join(root, 'assets')) {
  mkdirSync(outDir, { recursive: true });
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    for (const size of ICON_SIZES) {
      const page = await browser.newPage({ viewport: { width: size, height: size }, deviceScaleFactor: 1 });
      await page.setContent(`<html><body style="margin:0;background:transparent">${iconSvg(size)}</body></html>`);
      await page.screenshot({ path: path.join(outDir, `icon-${size}.png`), omitBackground: true, clip: { x: 0, y: 0, width: size, height: size } });
      await page.close();
    }
  } finally {
    await browser.close();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await makeIcons();
  console.log(`Wrote ${ICON_SIZES.map((s) => `assets/icon-${s}.png`).join(', ')}`);
}
