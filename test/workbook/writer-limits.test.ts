/**
 * Issue 10 item 8, the writer's smaller limits: the 32,767-character cell (Excel's specifications
 * and limits), the source written without a text-prefix apostrophe, and the payload budget counted
 * in UTF-8 bytes (Excel's 5 MB request/response limit counts bytes; a Japanese character is 3).
 * Both hosts; on the office-js project the byte figures are the real client's requests and responses.
 */
import { describe, expect, it } from 'vitest';
import { sandboxFromRows } from '../../src/sandbox/index.js';
import { NOTES_SHEET_NAME } from '../../src/report/index.js';
import { TailmarkError } from '../../src/workbook/api.js';
import { CLIENT, claimRows, claimsSandbox, layerFor, officeHost, settled, SETTINGS } from './helpers.js';

describe('the writer keeps within Excel\'s limits', () => {
  it('refuses a note over 32,767 characters before writing anything, and saves one of exactly 32,767', async () => {
    const sb = claimsSandbox(60);
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const before = sb.snapshot();
    const err = await layer.mark([3], null, 'n'.repeat(32_768)).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(TailmarkError);
    expect((err as TailmarkError).message).toMatch(/32,768 characters long; an Excel cell holds at most 32,767/);
    expect(sb.snapshot()).toEqual(before);
    await layer.mark([3], null, 'n'.repeat(32_767));
    expect(String(sb.valueAt('Claims', 4, 9))).toHaveLength(32_767);
  });

  it('refuses a cutoff reason over 32,767 characters (the log holds it in one cell) before writing anything', async () => {
    const sb = claimsSandbox(60);
    const layer = layerFor(sb);
    const table = await layer.detect();
    const before = sb.snapshot();
    await expect(layer.run(table, SETTINGS, undefined, undefined, { cutoffReason: 'r'.repeat(40_000) })).rejects.toThrow(/reason for the cutoff is 40,000 characters long/);
    expect(sb.snapshot()).toEqual(before);
  });

  it('writes the source in words, not as an address beginning with an apostrophe', async () => {
    const sb = sandboxFromRows('Expense claims', claimRows(40));
    sb.setSelection('Expense claims', 'B3');
    const layer = layerFor(sb);
    await layer.run(await layer.detect(), SETTINGS);
    const rows = sb.valuesOf(NOTES_SHEET_NAME, 'A1:B600');
    const source = rows.find((r) => r[0] === 'Source');
    expect(source?.[1]).toBe('sheet Expense claims, A1:E41');
  });

  it('counts the payload in UTF-8 bytes: Japanese text stays under the limit', async () => {
    // Invented claims whose cost centres, categories and names are Japanese (3 bytes a character).
    const rows = claimRows(1_500).map((r, i) =>
      i === 0 ? r : [r[0], `経費担当者${String(r[1]).replace('Person ', '')}・東京本社営業部第二課`, `原価センター${String(r[2]).slice(3)}・関東地区`, `区分${String(r[3])}・出張旅費交通費`, r[4]],
    );
    const limit = 120_000;
    const sb = sandboxFromRows('Claims', rows, { payloadLimitBytes: limit });
    sb.setSelection('Claims', 'B3');
    const host = CLIENT === 'office-js' ? officeHost(sb) : null;
    const layer = layerFor(sb, { payloadLimit: limit });
    const table = await layer.detect();
    await settled();
    host?.wire.reset();
    sb.stats.reset();
    const summary = await layer.run(table, SETTINGS);
    expect(summary.rowsScored).toBe(1_500);
    await layer.readForPreview(table, SETTINGS);
    await layer.listExceptions();
    const req = host ? host.wire.requestBytes.max : sb.stats.requestBytes.max;
    const resp = host ? host.wire.responseBytes.max : sb.stats.responseBytes.max;
    console.log(`Japanese text, ${limit} B limit (${CLIENT}): largest request ${req} B, largest response ${resp} B`);
    expect(req).toBeLessThanOrEqual(limit);
    expect(resp).toBeLessThanOrEqual(limit);
  });
});
