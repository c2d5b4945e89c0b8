/**
 * Browser end-to-end tests for the reviewer's clean-up and reading tools on the preview page: result
 * columns wide enough to read in the grid and in the downloaded .xlsx; files opened in other
 * encodings. Built for production and served as in preview.test.ts, in headless Chromium.
 */
import path from 'node:path';
import ExcelJS from 'exceljs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NOTE_HEADER, STATUS_HEADER, resultHeaders } from '../../src/report/style.js';
import { buildWeb, openPage, ROOT, startSession, type Session } from './harness.js';

let session: Session;

beforeAll(async () => {
  buildWeb();
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
