/**
 * Browser end-to-end tests of the follow-up view on the preview page (real task pane, sandbox
 * workbook, headless Chromium): save and next with the keyboard, order by score, the unsaved-note
 * guard, a selection in the sheet showing its claim, and Remove keeping the reviewer's marks.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoClaims } from '../../src/demo/claims.js';
import { NOTE_HEADER, REVIEW_STATUSES, STATUS_HEADER } from '../../src/report/style.js';
import { scoreColumns } from '../../src/pipeline/run.js';
import { defaultCutoff } from '../../src/scoring/index.js';
import { DEFAULT_OPTIONS, type RawCell } from '../../src/scoring/types.js';
import { openPage, SCREENSHOT_DIR, startSession, type Session } from './harness.js';

const label = (id: string) => REVIEW_STATUSES.find((s) => s.id === id)!.label;

/** Claim IDs of the demo's flagged claims with the pane's default choices, largest |score| first, from the pipeline. */
function flaggedByScore(): string[] {
  const demo = demoClaims();
  const column = (h: string): { name: string; cells: RawCell[] } => {
    const i = demo.headers.indexOf(h);
    return { name: h, cells: demo.rows.map((r) => r[i]) };
  };
  const result = scoreColumns([column('Amount')], [column('Cost centre'), column('Category')], {
    valueColumns: ['Amount'],
    groupColumns: ['Cost centre', 'Category'],
    method: DEFAULT_OPTIONS.method,
  });
  const col = result.columns[0];
  const id = demo.headers.indexOf('Claim ID');
  const rows: number[] = [];
  for (let r = 0; r < result.rowCount; r++) if (col.flagged[r] === 1) rows.push(r);
  // As the sheet holds them: rounded to 2 decimals, and no score (blank cell) for an infinite one, which sorts last.
  const key = (r: number) => (Number.isFinite(col.scores[r]) ? Math.abs(Math.round(col.scores[r] * 100) / 100) : -1);
  rows.sort((a, b) => key(b) - key(a) || a - b);
  return rows.map((r) => String(demo.rows[r][id]));
}

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
  await page.getByTestId('claim-card').waitFor({ timeout: 30_000 });
}

/** The sheet's cell text in the row of a claim ID, in a column named by its header. */
async function cellOf(page: Page, claimId: string, header: string): Promise<string> {
  return page.evaluate(
    ({ claimId, header }) => {
      const h = window.tailmarkPreview!;
      const sheet = h.sheetNames()[0];
      const headers = h.headers(sheet);
      const c = headers.indexOf(header);
      const idCol = headers.indexOf('Claim ID');
      for (let r = 1; r < 2000; r++) if (h.text(sheet, r, idCol) === claimId) return h.text(sheet, r, c);
      return `(no row for ${claimId})`;
    },
    { claimId, header },
  );
}

const currentId = async (page: Page) => ((await page.getByTestId('current-claim').textContent()) ?? '').split(' · ')[0];

describe('follow-up view', () => {
  it('orders by score, largest first, and shows the claim with its reason, peer group and fields', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await runDemo(page);
    const expected = flaggedByScore();
    expect(await currentId(page)).toBe(expected[0]);
    const items = await page.getByTestId('review-list').locator('li').allTextContents();
    expect(items.map((t) => t.split(' · ')[0])).toEqual(expected);
    await expect(page.getByTestId('claim-reason').textContent()).resolves.toMatch(/Flagged/);
    await expect(page.getByTestId('claim-group').textContent()).resolves.toMatch(/median/);
    await expect(page.getByTestId('strip').getAttribute('aria-label')).resolves.toMatch(/largest/);
    // The claim's other fields (here the demo's Employee, Claim date and Notes columns).
    await expect(page.getByTestId('claim-fields').textContent()).resolves.toMatch(/Employee/);
    await expect(page.getByTestId('review-caution').textContent()).resolves.toMatch(/not misconduct/);
    // Sheet order puts the lowest row first.
    await page.getByTestId('order').selectOption('sheet');
    const bySheet = (await page.getByTestId('review-list').locator('li').allTextContents()).map((t) => t.split(' · ')[0]);
    expect([...bySheet].sort()).toEqual([...expected].sort());
    expect(bySheet[0]).not.toBe(undefined);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('saves and moves on with Enter, recording the status and note in the sheet', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await runDemo(page);
    const expected = flaggedByScore();
    await page.getByTestId('reviewer-input').fill('T.R.');
    await page.getByTestId('reviewer-input').press('Enter');
    await expect.poll(() => page.getByTestId('reviewer').textContent()).toMatch(/T\.R\./);
    await page.getByTestId('status').selectOption(label('cleared'));
    await page.getByTestId('note').fill('receipt matches');
    await page.getByTestId('note').press('Enter');
    await expect.poll(() => currentId(page)).toBe(expected[1]);
    expect(await page.getByTestId('position').textContent()).toBe(`2 / ${expected.length}`);
    expect(await cellOf(page, expected[0], STATUS_HEADER)).toBe(label('cleared'));
    expect(await cellOf(page, expected[0], NOTE_HEADER)).toBe('receipt matches');
    // The next claim's own (empty) note is loaded, and Shift+Enter is a new line, not a save.
    expect(await page.getByTestId('note').inputValue()).toBe('');
    await page.getByTestId('note').press('Shift+Enter');
    expect(await currentId(page)).toBe(expected[1]);
    expect(errors).toEqual([]);
    await page.close();
  });

  it('never drops an unsaved note: Next asks to save, discard or stay', async () => {
    const { page } = await openPage(session, 'preview.html');
    await runDemo(page);
    const expected = flaggedByScore();
    await page.getByTestId('note').fill('half a thought');
    await page.getByTestId('next').click();
    await page.getByTestId('pending').waitFor();
    expect(await currentId(page)).toBe(expected[0]);
    await page.getByTestId('pending-stay').click();
    expect(await page.getByTestId('note').inputValue()).toBe('half a thought');
    expect(await page.getByTestId('pending').count()).toBe(0);
    // Save and go on: the note is written and the next claim shown.
    await page.getByTestId('next').click();
    await page.getByTestId('pending-save').click();
    await expect.poll(() => currentId(page)).toBe(expected[1]);
    expect(await cellOf(page, expected[0], NOTE_HEADER)).toBe('half a thought');
    // Discard: nothing written.
    await page.getByTestId('note').fill('not this');
    await page.getByTestId('next').click();
    await page.getByTestId('pending-discard').click();
    await expect.poll(() => currentId(page)).toBe(expected[2]);
    expect(await cellOf(page, expected[1], NOTE_HEADER)).toBe('');
    await page.close();
  });

  it('shows the claim of a row selected in the sheet', async () => {
    const { page } = await openPage(session, 'preview.html');
    await runDemo(page);
    const expected = flaggedByScore();
    const target = expected[3];
    const rowIndex = await page.evaluate((id) => {
      const h = window.tailmarkPreview!;
      const sheet = h.sheetNames()[0];
      const idCol = h.headers(sheet).indexOf('Claim ID');
      for (let r = 1; r < 2000; r++) if (h.text(sheet, r, idCol) === id) return r;
      return -1;
    }, target);
    expect(rowIndex).toBeGreaterThan(0);
    await page.evaluate((r) => window.tailmarkPreview!.select(window.tailmarkPreview!.sheetNames()[0], r, 1), rowIndex);
    await expect.poll(() => currentId(page), { timeout: 10_000 }).toBe(target);
    await page.close();
  });

  it('Remove says how many marks there are and can keep them as plain cells', async () => {
    const { page } = await openPage(session, 'preview.html');
    await runDemo(page);
    const expected = flaggedByScore();
    await page.getByTestId('status').selectOption(label('asked'));
    await page.getByTestId('note').fill('emailed');
    await page.getByTestId('save-mark').click();
    await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/Saved the mark on 1 claim/);
    await page.getByTestId('remove').click();
    await expect(page.getByTestId('remove-counts').textContent()).resolves.toMatch(/1 claim has a status and 1 claim has a note/);
    expect(await page.getByTestId('remove-keep').isChecked()).toBe(true);
    await page.getByTestId('confirm-remove').click();
    await expect.poll(() => page.getByTestId('notice').textContent()).toMatch(/stay as plain cells/);
    expect(await page.getByTestId('notice').textContent()).not.toMatch(/untouched/);
    const headers = await page.evaluate(() => window.tailmarkPreview!.headers(window.tailmarkPreview!.sheetNames()[0]));
    expect(headers.filter((h) => /tail score|tail flag|· why/.test(h))).toEqual([]);
    expect(await cellOf(page, expected[0], STATUS_HEADER)).toBe(label('asked'));
    expect(await cellOf(page, expected[0], NOTE_HEADER)).toBe('emailed');
    await page.close();
  });
});

/** The log sheet's lines as records keyed by its header (row 2 of the sheet). */
async function logLines(page: Page): Promise<Record<string, string>[]> {
  return page.evaluate(() => {
    const h = window.tailmarkPreview!;
    const sheet = 'Tailmark log';
    if (!h.sheetNames().includes(sheet)) return [];
    const header: string[] = [];
    for (let c = 0; c < 30; c++) header.push(h.text(sheet, 1, c));
    const out: Record<string, string>[] = [];
    for (let r = 2; r < 200; r++) {
      const line: Record<string, string> = {};
      let any = false;
      header.forEach((name, c) => {
        if (name === '') return;
        const t = h.text(sheet, r, c);
        if (t !== '') any = true;
        line[name] = t;
      });
      if (!any) break;
      out.push(line);
    }
    return out;
  });
}

describe('audit trail', () => {
  it('logs who set which status when, and each run with its cutoff change, reason and review budget', async () => {
    const { page, errors } = await openPage(session, 'preview.html');
    await page.getByTestId('row-count').waitFor({ timeout: 30_000 });
    await page.getByTestId('preview-flagged').waitFor({ timeout: 30_000 });
    // A cutoff from "I can review 10 claims", with a reason.
    await page.getByTestId('budget').fill('10');
    await page.getByTestId('apply-budget').click();
    await page.getByTestId('cutoff-reason').fill('two days for this quarter');
    const cut = Number(await page.getByTestId('cutoff').inputValue());
    await page.getByTestId('run').click();
    await page.getByTestId('summary').waitFor({ timeout: 60_000 });
    await page.getByTestId('claim-card').waitFor({ timeout: 30_000 });
    await page.getByTestId('reviewer-input').fill('T.R.');
    await page.getByTestId('reviewer-save').click();
    const first = await currentId(page);
    await page.getByTestId('status').selectOption(label('asked'));
    await page.getByTestId('note').fill('emailed the approver');
    await page.getByTestId('note').press('Enter');
    await expect.poll(() => currentId(page)).not.toBe(first);
    const lines = await logLines(page);
    const run = lines.find((l) => l.Event === 'Run')!;
    expect(run).toBeDefined();
    expect(Number(run.Cutoff)).toBeCloseTo(cut, 6);
    const change = lines.find((l) => l.Event === 'Cutoff changed')!;
    expect(change).toMatchObject({ 'Reason given': 'two days for this quarter', 'From a review budget': 'yes: at most 10 claims', 'Previous cutoff': String(defaultCutoff(DEFAULT_OPTIONS.method)) });
    const mark = lines.find((l) => l.Event === 'Status set')!;
    expect(mark).toMatchObject({ Who: 'T.R.', Claim: first, Status: `${label('open')} → ${label('asked')}`, Note: 'emailed the approver' });
    expect(Date.parse(mark['When (UTC)'])).toBeGreaterThan(Date.parse('2020-01-01'));
    // A second run adds lines below; the earlier ones stay as they were.
    await page.getByTestId('run').click();
    await expect.poll(async () => (await logLines(page)).filter((l) => l.Event === 'Run').length, { timeout: 60_000 }).toBe(2);
    expect((await logLines(page)).slice(0, lines.length)).toEqual(lines);
    expect(errors).toEqual([]);
    await page.close();
  });
});

describe('screenshots of the follow-up view', () => {
  it('at 320 px (pane alone) and desktop width, light and dark, with the unsaved-note question and the Remove dialog', async () => {
    mkdirSync(SCREENSHOT_DIR, { recursive: true });
    for (const theme of ['light', 'dark'] as const) {
      const desk = await openPage(session, 'preview.html', { theme, width: 1280, height: 900 });
      await runDemo(desk.page);
      await desk.page.getByTestId('claim-card').scrollIntoViewIfNeeded();
      await desk.page.screenshot({ path: path.join(SCREENSHOT_DIR, `followup-desktop-${theme}.png`) });
      await desk.page.close();

      const { page } = await openPage(session, 'preview.html', { theme, width: 320, height: 900, query: 'view=pane' });
      await runDemo(page);
      // Nothing may be wider than the 320 px viewport.
      expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBeLessThanOrEqual(0);
      await page.getByTestId('section-review').screenshot({ path: path.join(SCREENSHOT_DIR, `followup-320-${theme}.png`) });
      await page.getByTestId('note').fill('asked for the hotel invoice');
      await page.getByTestId('next').click();
      await page.getByTestId('pending').waitFor();
      await page.getByTestId('pending').scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `followup-unsaved-320-${theme}.png`) });
      await page.getByTestId('pending-save').click();
      await expect.poll(() => page.getByTestId('pending').count()).toBe(0);
      await page.getByTestId('remove').click();
      await page.getByTestId('remove-counts').waitFor();
      // Let the dialog finish fading in.
      await page.waitForTimeout(500);
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `remove-320-${theme}.png`) });
      await page.close();
    }
  });
});
