/**
 * Browser end-to-end tests for the reviewer's clean-up and reading tools on the preview page: result
 * columns wide enough to read in the grid and in the downloaded .xlsx; files opened in other
 * encodings. Built for production and served as in preview.test.ts, in headless Chromium.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import ExcelJS from 'exceljs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../../src/report/style.js';
import { openPage, ROOT, SCREENSHOT_DIR, startSession, type Session } from './harness.js';

let session: Session;

beforeAll(async () => {
  session = await startSession();
}, 300_000);

afterAll(async () => {
  await session?.close();
});

async function runDemo(page: Page): Promise<void> {
  await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
  await page.getByTestId('preview-flagged').waitFor({ timeout: 30_000 });
  await page.getByTestId('run').click();
  await page.getByTestId('summary').waitFor({ timeout: 60_000 });
}

const OURS = [...Object.values(resultHeaders('Amount')), STATUS_HEADER, NOTE_HEADER];

describe('readable result columns', () => {
  it('the grid shows every result header whole, and the downloaded .xlsx has widths that fit them', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await runDemo(page);
    // Header cells of row 1: text drawn without being cut (scrollWidth is the text's full width).
    const cut = await page.evaluate((ours) => {
      const out: string[] = [];
      for (const el of document.querySelectorAll<HTMLElement>('[data-cell^="0,"]')) {
        const text = el.textContent ?? '';
        if (ours.includes(text) && el.scrollWidth > el.clientWidth) out.push(`${text}: ${el.scrollWidth} px > ${el.clientWidth} px`);
      }
      return out;
    }, OURS);
    const seen = await page.evaluate(() => [...document.querySelectorAll('[data-cell^="0,"]')].map((e) => e.textContent));
    for (const h of OURS) expect(seen, `${h} not in the grid's first row`).toContain(h);
    expect(cut).toEqual([]);

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download').click()]);
    const file = path.join(ROOT, 'test-output', 'readable-download.xlsx');
    await download.saveAs(file);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(file);
    const ws = wb.getWorksheet('Claims')!;
    const header = ws.getRow(1);
    for (let c = 1; c <= ws.columnCount; c++) {
      const text = String(header.getCell(c).value ?? '');
      if (!OURS.includes(text)) continue;
      // Excel's unit is one digit of the default font (7 px); bold header text counted at 8 px a
      // character plus 5 px padding (common practice, no source).
      const need = (8 * text.length + 5) / 7;
      expect(ws.getColumn(c).width ?? 0, `${text}: width ${ws.getColumn(c).width}`).toBeGreaterThanOrEqual(need);
    }
    expect(errors).toEqual([]);
    await page.close();
  }, 120_000);
});

/**
 * One invented claims table, written out in the encodings real exports use. Windows-1252 bytes
 * are made by hand from its code chart (0x80 is the euro sign; Latin-1 letters keep their code
 * points) — independent of the reader under test.
 */
const PLAIN = [
  'Claim ID,Employee,Cost centre,Category,Amount,Note',
  ...Array.from({ length: 24 }, (_, i) =>
    [`CL-${100 + i}`, ['Zoë Brünn', 'Åsa Øberg', 'José Núñez', 'Françoise Lœw'][i % 4], ['Küche', 'Büro'][i % 2], 'Reise', (80 + ((i * 7) % 13) + (i === 17 ? 900 : 0)).toFixed(2), i % 5 === 0 ? 'Taxi – 12 €' : ''].join(','),
  ),
].join('\r\n');

function cp1252(text: string): Buffer {
  const high: Record<string, number> = { '€': 0x80, '–': 0x96, 'œ': 0x9c };
  return Buffer.from([...text].map((ch) => high[ch] ?? (ch.charCodeAt(0) < 256 ? ch.charCodeAt(0) : 0x3f)));
}
const utf16be = (text: string) => {
  const le = Buffer.from(text, 'utf16le');
  for (let i = 0; i < le.length; i += 2) [le[i], le[i + 1]] = [le[i + 1], le[i]];
  return le;
};
const ENCODED: [string, Buffer][] = [
  ['utf8.csv', Buffer.from(PLAIN, 'utf8')],
  ['utf8-bom.csv', Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(PLAIN, 'utf8')])],
  ['utf16le-bom.csv', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(PLAIN, 'utf16le')])],
  ['utf16be-bom.csv', Buffer.concat([Buffer.from([0xfe, 0xff]), utf16be(PLAIN)])],
  ['windows-1252.csv', cp1252(PLAIN)],
  ['titled-semicolon.csv', Buffer.from(`Expense report;;\r\nExported 2025-04-01;;\r\n\r\n${PLAIN.replace(/,/g, ';')}`, 'utf8')],
];

/** The opened sheet's cells as text rows (from the page's test hook). */
async function sheetRows(page: Page): Promise<string[][]> {
  return page.evaluate(() => {
    const p = window.tailmarkPreview!;
    const sheet = p.sheetNames()[0];
    const rows: string[][] = [];
    for (let r = 0; r < 40; r++) {
      const row: string[] = [];
      for (let c = 0; c < 8; c++) row.push(p.text(sheet, r, c));
      if (row.every((x) => x === '')) break;
      rows.push(row);
    }
    return rows;
  });
}

async function openFile(page: Page, name: string, buffer: Buffer): Promise<void> {
  await page.getByTestId('file-input').setInputFiles({ name, mimeType: 'text/csv', buffer });
  await expect.poll(() => page.getByTestId('preview-message').textContent(), { timeout: 20_000 }).toContain(`Opened ${name}`);
}

describe('opening delimited files in other encodings', () => {
  it('reads UTF-8 (with and without a mark), UTF-16 LE/BE and Windows-1252 to the same cells, and shows what it found', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
    // The plain text, split by hand: what every file must read to.
    const expected = PLAIN.split('\r\n').map((l) => [...l.split(','), '', ''].slice(0, 8));
    const found: Record<string, string> = {};
    for (const [name, buffer] of ENCODED) {
      await openFile(page, name, buffer);
      expect(await sheetRows(page), name).toEqual(expected);
      found[name] = (await page.getByTestId('file-encoding').locator('xpath=../..').textContent()) ?? '';
    }
    expect(found['utf16le-bom.csv']).toContain('Read as UTF-16 LE (byte-order mark)');
    expect(found['utf16be-bom.csv']).toContain('Read as UTF-16 BE (byte-order mark)');
    expect(found['windows-1252.csv']).toContain('Read as Windows-1252 (not valid UTF-8)');
    expect(found['utf8.csv']).toContain('Read as UTF-8 (valid UTF-8)');
    // The titled file: header found on row 4, the controls say so.
    await expect(page.getByTestId('file-header-row').locator('xpath=../..').textContent()).resolves.toContain('row 4; the rows above look like titles');
    expect(errors).toEqual([]);
    await page.close();
  }, 180_000);

  it('the encoding and header-row controls read the file again as chosen', async () => {
    const { page } = await openPage(session, 'preview.html');
    await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
    await openFile(page, 'utf8.csv', Buffer.from(PLAIN, 'utf8'));
    // Told the UTF-8 file is Windows-1252, each two-byte letter shows as two (ë = C3 AB -> "Ã«").
    await page.getByTestId('file-encoding').selectOption('windows-1252');
    await expect.poll(async () => (await sheetRows(page))[1]?.[1], { timeout: 20_000 }).toBe('ZoÃ« BrÃ¼nn');
    await expect(page.getByTestId('file-encoding').locator('xpath=../..').textContent()).resolves.toContain('(as chosen)');
    await page.getByTestId('file-encoding').selectOption('auto');
    await expect.poll(async () => (await sheetRows(page))[1]?.[1], { timeout: 20_000 }).toBe('Zoë Brünn');
    // Header row 2 chosen: the first claim's row becomes the column names.
    await page.getByTestId('file-header-row').selectOption('2');
    await expect.poll(async () => (await sheetRows(page))[0]?.[0], { timeout: 20_000 }).toBe('CL-100');
    await page.close();
  }, 120_000);
});


describe('keeping the marks before Remove', () => {
  it('saves them as CSV and copies them to a sheet of their own, which Remove leaves in place', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await runDemo(page);
    await page.getByTestId('claim-card').waitFor({ timeout: 30_000 });
    const claim = (await page.getByTestId('claim-card').textContent()) ?? '';
    await page.getByTestId('status').selectOption('Asked claimant');
    await page.getByTestId('note').fill('emailed, then "called"');
    await page.getByTestId('save-mark').click();
    await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/Saved the mark on 1 claim/);
    await page.getByTestId('remove').click();
    await page.getByTestId('keep-copy').waitFor();

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-marks-csv').click()]);
    expect(download.suggestedFilename()).toBe('tailmark-marks.csv');
    const file = path.join(ROOT, 'test-output', 'readable-marks.csv');
    await download.saveAs(file);
    const csv = readFileSync(file, 'utf8');
    const lines = csv.replace(/^\uFEFF/, '').trimEnd().split('\r\n');
    expect(lines[0]).toBe('Claim,Sheet row,Status,Note,Last saved by,Last saved (UTC)');
    expect(lines).toHaveLength(2);
    // The claim shown in the follow-up card, its status, the note quoted as RFC 4180 says.
    const id = lines[1].split(',')[0];
    expect(claim).toContain(id);
    expect(lines[1]).toContain(',Asked claimant,"emailed, then ""called""",');
    await expect.poll(() => page.getByTestId('export-marks-result').textContent()).toMatch(/Saved 1 claim with a status or note as tailmark-marks\.csv/);

    await page.getByTestId('export-marks-sheet').click();
    await expect.poll(() => page.getByTestId('export-marks-result').textContent()).toMatch(/Copied 1 claim .* to the new sheet "Tailmark marks \d{4}-\d\d-\d\d"/);
    const sheet = (await page.evaluate(() => window.tailmarkPreview!.sheetNames())).find((n) => n.startsWith('Tailmark marks'))!;
    expect(sheet).toBeDefined();

    await page.getByTestId('remove-keep').click();
    await page.getByTestId('confirm-remove').click();
    await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/deleted/);
    const kept = await page.evaluate((s) => [0, 1, 2, 3].map((c) => window.tailmarkPreview!.text(s, 1, c)), sheet);
    expect(kept).toEqual([id, lines[1].split(',')[1], 'Asked claimant', 'emailed, then "called"']);
    expect(errors).toEqual([]);
    await page.close();
  }, 120_000);
});

describe('screenshots of the reading choices and of keeping the marks', () => {
  it('at 320 px (pane alone) and desktop width, light and dark', async () => {
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    const utf16 = ENCODED.find(([n]) => n === 'utf16le-bom.csv')![1];
    for (const theme of ['light', 'dark'] as const) {
      for (const [width, query, name] of [
        [1280, '', 'desktop'],
        [320, 'view=pane', '320'],
      ] as const) {
        const { page } = await openPage(session, 'preview.html', { theme, width, height: 900, query });
        await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
        await page.getByTestId('file-input').setInputFiles({ name: 'claims-utf16.csv', mimeType: 'text/csv', buffer: utf16 });
        await page.getByTestId('file-encoding').waitFor({ timeout: 20_000 });
        await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
        if (width === 320) expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);
        await page.getByTestId('file-header-row').scrollIntoViewIfNeeded();
        await page.screenshot({ path: path.join(SCREENSHOT_DIR, `file-choices-${name}-${theme}.png`) });
        await page.close();
      }
      const { page } = await openPage(session, 'preview.html', { theme, width: 1280, height: 900 });
      await runDemo(page);
      await page.getByTestId('claim-card').waitFor({ timeout: 30_000 });
      await page.getByTestId('status').selectOption('Asked claimant');
      await page.getByTestId('note').fill('asked for the hotel invoice');
      await page.getByTestId('save-mark').click();
      await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/Saved the mark on 1 claim/);
      await page.getByTestId('remove').click();
      await page.getByTestId('export-marks-sheet').click();
      await expect.poll(() => page.getByTestId('export-marks-result').textContent()).toMatch(/Copied/);
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `keep-marks-desktop-${theme}.png`) });
      await page.close();
    }
  }, 300_000);
});

