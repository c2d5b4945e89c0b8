/**
 * Browser end-to-end tests: the real task pane driving the sandbox workbook on the preview page,
 * built for production and served by scripts/serve.mjs, in headless Chromium. Also saves the
 * screenshots, into test-output/screenshots/ (docs/screenshots/ with TAILMARK_UPDATE_SCREENSHOTS=1).
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import ExcelJS from 'exceljs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pageSize, PANE_GZIP_LIMIT } from '../../scripts/bundle-size.mjs';
import { DEMO_GROUPS, demoClaims } from '../../src/demo/claims.js';
import { NOTES_SHEET_NAME, PALETTE, resultHeaders, REVIEW_STATUSES, STATUS_HEADER } from '../../src/report/style.js';
import { scoreTable } from '../../src/scoring/index.js';
import type { RawCell } from '../../src/scoring/types.js';
import { OUT_DIR, openPage, ROOT, SCREENSHOT_DIR, startSession, type Session } from './harness.js';

/** What the batch engine flags on the demo data with the pane's default choices (robust z, both sides). */
function expectedFlags(cutoff: number): number {
  const demo = demoClaims();
  const column = (h: string): { name: string; cells: RawCell[] } => {
    const i = demo.headers.indexOf(h);
    return { name: h, cells: demo.rows.map((r) => r[i]) };
  };
  const result = scoreTable(
    { valueColumns: [column('Amount')], groupColumns: [column('Cost centre'), column('Category')] },
    { method: 'robust', cutoff, direction: 'both', logScale: false, minGroupSize: 8, smallGroups: 'pool' },
  );
  return result.columns[0].flaggedRows;
}

const label = (id: string) => REVIEW_STATUSES.find((s) => s.id === id)!.label;
const hex = (h: string) => `#${h.toUpperCase()}`;

let session: Session;

beforeAll(async () => {
  session = await startSession();
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
}, 300_000);

afterAll(async () => {
  await session?.close();
});

async function ready(page: Page): Promise<void> {
  await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
  await page.getByTestId('preview-flagged').waitFor({ timeout: 30_000 });
}

async function runAndWait(page: Page): Promise<void> {
  await page.getByTestId('run').click();
  await page.getByTestId('summary').waitFor({ timeout: 60_000 });
  await page.getByTestId('review-counts').waitFor({ timeout: 30_000 });
}

async function shot(page: Page, name: string, fullPage = false): Promise<void> {
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, name), fullPage });
}

describe('preview page with the real task pane', () => {
  it('is labelled as a preview and makes no request outside our server', async () => {
    const { page, requests, errors } = await openPage(session, 'preview.html');
    await ready(page);
    await expect(page.getByText('Preview — not Excel').first().isVisible()).resolves.toBe(true);
    expect(requests.length).toBeGreaterThan(0);
    for (const u of requests) expect(u.startsWith(session.url), u).toBe(true);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('runs the whole flow on the demo data', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await ready(page);

    // Live preview: counts match the batch engine (robust z, chosen in the pane: the default is the
    // skew-aware method) at its default and at a changed cutoff, nothing written.
    const before = await page.evaluate(() => window.tailmarkPreview!.snapshot());
    await page.getByTestId('method').selectOption('robust');
    await expect.poll(() => page.getByTestId('preview-flagged').textContent()).toBe(String(expectedFlags(3.5)));
    await page.getByTestId('cutoff').fill('3');
    await expect.poll(() => page.getByTestId('preview-flagged').textContent()).toBe(String(expectedFlags(3)));
    expect(expectedFlags(3)).toBeGreaterThan(expectedFlags(3.5));
    // "I can review 10 claims" sets a cutoff that flags at most 10, as the batch engine counts them.
    await page.getByTestId('budget').fill('10');
    await page.getByTestId('apply-budget').click();
    await expect.poll(async () => Number(await page.getByTestId('cutoff').inputValue())).toBeGreaterThan(3);
    const budgetCut = Number(await page.getByTestId('cutoff').inputValue());
    expect(expectedFlags(budgetCut)).toBeLessThanOrEqual(10);
    await expect.poll(() => page.getByTestId('preview-flagged').textContent()).toBe(String(expectedFlags(budgetCut)));
    await page.getByTestId('cutoff').fill('3.5');
    await expect.poll(() => page.getByTestId('preview-flagged').textContent()).toBe(String(expectedFlags(3.5)));
    expect(await page.evaluate(() => window.tailmarkPreview!.snapshot())).toBe(before);

    // The chart of the planted masking group shows robust z flagging more than classic z.
    await page.getByTestId('chart-group').selectOption(`${DEMO_GROUPS.masking.costCentre} / ${DEMO_GROUPS.masking.category}`);
    const robust = Number(await page.getByTestId('chart-robust').textContent());
    const classic = Number(await page.getByTestId('chart-classic').textContent());
    expect(robust).toBeGreaterThan(classic);
    await expect(page.getByTestId('chart').locator('desc').textContent()).resolves.toMatch(/masking/);

    // Run: summary count equals the batch engine; results and a notes sheet appear.
    await runAndWait(page);
    const flagged = expectedFlags(3.5);
    expect(await page.getByTestId('summary-flagged').textContent()).toBe(String(flagged));
    expect(await page.getByTestId('open-count').textContent()).toBe(String(flagged));
    await expect(page.getByTestId('caution').first().textContent()).resolves.toMatch(/not misconduct/);
    const sheets = await page.evaluate(() => window.tailmarkPreview!.sheetNames());
    expect(sheets).toContain(NOTES_SHEET_NAME);
    await expect(page.getByRole('tab', { name: NOTES_SHEET_NAME }).isVisible()).resolves.toBe(true);

    // Next exception: the grid selects its row, and that row is highlighted in the "open" colour.
    await page.getByTestId('next').click();
    await expect.poll(() => page.getByTestId('position').textContent()).toBe(`2 / ${flagged}`);
    const activeCell = page.locator('[role=gridcell][aria-selected=true]');
    await activeCell.waitFor();
    const rowIndex = Number((await activeCell.getAttribute('data-cell'))!.split(',')[0]);
    const row = page.locator(`[data-cell^="${rowIndex},"]`);
    await expect.poll(() => row.first().getAttribute('data-fill')).toBe(hex(PALETTE.open.fill));

    // A status change in the grid recolours the row (conditional formats follow the status cell).
    const status = page.locator(`select[data-status-row="${rowIndex}"]`);
    await status.selectOption(label('cleared'));
    await expect.poll(() => row.first().getAttribute('data-fill')).toBe(hex(PALETTE.cleared.fill));
    // The pane learns of edits made in the sheet when the selection moves (as after Enter in Excel).
    await page.locator(`[data-cell="${rowIndex},1"]`).click();
    await expect.poll(() => page.getByTestId('done-count').textContent()).toBe('1');

    // A mark from the pane: note + status on the current claim.
    await page.getByTestId('prev').click();
    await page.getByTestId('status').selectOption(label('asked'));
    await page.getByTestId('note').fill('=receipt requested');
    await page.getByTestId('save-mark').click();
    await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/Saved the mark on 1 claim/);

    // Re-run keeps the marks.
    await page.getByTestId('run').click();
    await page.getByTestId('summary').waitFor();
    await expect.poll(() => page.getByTestId('done-count').textContent()).toBe('1');
    await expect.poll(() => status.inputValue()).toBe(label('cleared'));
    await expect.poll(() => row.first().getAttribute('data-fill')).toBe(hex(PALETTE.cleared.fill));
    const texts = await page.evaluate(() => {
      const h = window.tailmarkPreview!;
      const sheet = h.sheetNames()[0];
      const headers = h.headers(sheet);
      const noteCol = headers.findIndex((x) => /note/i.test(x) && /tailmark/i.test(x));
      const out: string[] = [];
      for (let r = 1; r < 700; r++) out.push(h.text(sheet, r, noteCol));
      return out;
    });
    expect(texts).toContain('=receipt requested');

    expect(errors).toEqual([]);
    await page.close();
  });

  it('downloads the result as .xlsx and opens .xlsx and .csv files in the browser', async () => {
    const { page, requests } = await openPage(session, 'preview.html');
    await ready(page);
    await runAndWait(page);
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download').click()]);
    expect(download.suggestedFilename()).toMatch(/tailmark\.xlsx$/);
    const file = path.join(ROOT, 'test-output', 'preview-download.xlsx');
    await download.saveAs(file);
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(file);
    expect(wb.worksheets.map((w) => w.name)).toContain(NOTES_SHEET_NAME);
    const header = (wb.getWorksheet('Claims')!.getRow(1).values as unknown[]).map(String);
    expect(header).toContain(resultHeaders('Amount').score);
    expect(header).toContain(STATUS_HEADER);

    // Open that .xlsx again: the pane sees the earlier results.
    await page.getByTestId('file-input').setInputFiles(file);
    await expect.poll(() => page.getByTestId('preview-message').textContent(), { timeout: 20_000 }).toMatch(/Opened preview-download\.xlsx/);
    await expect.poll(() => page.getByTestId('table-info').textContent(), { timeout: 20_000 }).toMatch(/has earlier results/);

    // A CSV of our own: 30 invented rows, one group.
    const lines = ['Ref,Unit,Cost'];
    for (let i = 0; i < 30; i++) lines.push(`R${i},U-1,${i === 29 ? '9,999.00' : 100 + (i % 7)}`);
    lines[30] = 'R29,U-1,"9,999.00"';
    await page.getByTestId('file-input').setInputFiles({ name: 'mine.csv', mimeType: 'text/csv', buffer: Buffer.from(lines.join('\r\n')) });
    await expect.poll(() => page.getByTestId('row-count').textContent(), { timeout: 20_000 }).toBe('30');
    await expect(page.getByRole('tab', { name: 'mine' }).isVisible()).resolves.toBe(true);
    // Nothing was fetched for any of it.
    for (const u of requests) expect(u.startsWith(session.url), u).toBe(true);
    await page.close();
  });

  it('cancel leaves the workbook as it was', async () => {
    const { page } = await openPage(session, 'preview.html', { query: 'delay=600' });
    await ready(page);
    const before = await page.evaluate(() => window.tailmarkPreview!.snapshot());
    await page.getByTestId('run').click();
    await page.getByTestId('progress').waitFor({ timeout: 20_000 });
    await page.getByTestId('cancel').click();
    await expect.poll(() => page.getByTestId('notice').textContent(), { timeout: 30_000 }).toMatch(/cancelled/i);
    expect(await page.evaluate(() => window.tailmarkPreview!.snapshot())).toBe(before);
    expect(await page.getByTestId('summary').count()).toBe(0);
    await page.close();
  });

  it('says what to do when the selection is an empty area', async () => {
    const { page } = await openPage(session, 'preview.html');
    await ready(page);
    await page.evaluate(() => window.tailmarkPreview!.select(window.tailmarkPreview!.sheetNames()[0], 40, 20));
    const error = page.getByTestId('error');
    await error.waitFor({ timeout: 10_000 });
    await expect(error.textContent()).resolves.toMatch(/Select/);
    await page.close();
  });

  it('works with the keyboard alone', async () => {
    const { page } = await openPage(session, 'preview.html');
    await ready(page);
    const pane = page.getByTestId('pane');
    await pane.locator('button, input, select, textarea').first().focus();
    // Tab forward until the Run button has focus, then press Enter.
    let found = false;
    for (let i = 0; i < 80 && !found; i++) {
      await page.keyboard.press('Tab');
      found = await page.evaluate(() => document.activeElement?.getAttribute('data-testid') === 'run');
    }
    expect(found).toBe(true);
    await page.keyboard.press('Enter');
    await page.getByTestId('summary').waitFor({ timeout: 60_000 });
    // Next exception with Space, from the keyboard.
    await page.getByTestId('next').focus();
    await page.keyboard.press('Space');
    await expect.poll(() => page.getByTestId('position').textContent()).toMatch(/^2 \//);
    // A checkbox toggles with Space.
    const box = pane.locator('input[type=checkbox]:visible').first();
    const was = await box.isChecked();
    await box.focus();
    await page.keyboard.press('Space');
    await expect.poll(() => box.isChecked()).toBe(!was);
    await page.close();
  });

  it('saves screenshots at 320 px and desktop width, light and dark', async () => {
    for (const theme of ['light', 'dark'] as const) {
      const desk = await openPage(session, 'preview.html', { theme, width: 1280, height: 860 });
      await ready(desk.page);
      await runAndWait(desk.page);
      await desk.page.getByTestId('next').click();
      await shot(desk.page, `preview-desktop-${theme}.png`);
      await desk.page.close();

      const narrow = await openPage(session, 'preview.html', { theme, width: 320, height: 900 });
      await ready(narrow.page);
      await shot(narrow.page, `preview-320-${theme}.png`);
      await narrow.page.close();

      // The pane alone at 320 px, in page flow, after a run: nothing may be wider than the viewport.
      const pane = await openPage(session, 'preview.html', { theme, width: 320, height: 900, query: 'view=pane' });
      await ready(pane.page);
      await runAndWait(pane.page);
      const overflow = await pane.page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await shot(pane.page, `pane-320-${theme}.png`, true);
      await pane.page.close();
    }
  });
});

describe('task pane page outside Office', () => {
  it('explains how to open it in Excel, links to the preview, and asks only for Office.js', async () => {
    const { page, requests } = await openPage(session, 'taskpane.html');
    await page.getByTestId('outside-office').waitFor({ timeout: 20_000 });
    await expect(page.getByRole('link', { name: /preview page/ }).getAttribute('href')).resolves.toBe('preview.html');
    const external = requests.filter((u) => !u.startsWith(session.url));
    expect(external).toEqual(['https://appsforoffice.microsoft.com/lib/1/hosted/office.js']);
    await page.close();
  });
});

describe('bundle', () => {
  it(`keeps the pane's initial JS under ${PANE_GZIP_LIMIT / 1024} KB gzipped and loads Office.js only in Office pages`, () => {
    const pane = pageSize(OUT_DIR, 'taskpane.html');
    expect(pane.scripts.length).toBeGreaterThan(0);
    expect(pane.gzipped).toBeLessThan(PANE_GZIP_LIMIT);
    expect(pane.external).toEqual(['https://appsforoffice.microsoft.com/lib/1/hosted/office.js']);
    const preview = pageSize(OUT_DIR, 'preview.html');
    expect(preview.external).toEqual([]);
  });
});
