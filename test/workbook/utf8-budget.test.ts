/**
 * The request budget counts UTF-8 bytes, as Excel's 5 MB limit does: text in Japanese (3 bytes
 * a character in UTF-8, per the Unicode standard's encoding form) must not push a request over the limit.
 */
import { describe, expect, it } from 'vitest';
import { sandboxFromRows } from '../../src/sandbox/index.js';
import { createWorkbookLayer } from '../../src/workbook/index.js';
import { utf8Bytes } from '../../src/workbook/sync.js';
import { SETTINGS, hostRun } from './helpers.js';

const LIMIT = 40_000;

describe('the payload budget counts UTF-8 bytes', () => {
  it('utf8Bytes agrees with Node’s Buffer.byteLength (an independent UTF-8 encoder)', () => {
    for (const s of ['', 'abc', 'é', '経費精算', '😀 emoji', '"quoted" \\ text', 'x'.repeat(1000) + '日本'.repeat(500)]) {
      expect(utf8Bytes(s), s.slice(0, 20)).toBe(Buffer.byteLength(s, 'utf8'));
    }
  });

  it('a run over Japanese cost-centre names keeps every request under the limit', async () => {
    const centres = ['東京本社営業部第一課出張旅費精算担当', '大阪支社経理部交通費精算担当', '名古屋営業所総務課宿泊費担当', '福岡支店企画部会議費担当'];
    const rows: (string | number)[][] = [['Claim ID', 'Cost centre', 'Category', 'Amount']];
    for (let i = 0; i < 1500; i++) rows.push([`CL-${i}`, `${centres[i % 4]}・${'第' + (i % 40) + '班'}`, '出張', 100 + (i % 17) + (i % 97 === 5 ? 4000 : 0)]);
    const sb = sandboxFromRows('Claims', rows, { payloadLimitBytes: LIMIT });
    sb.setSelection('Claims', 'A1');
    const layer = createWorkbookLayer(hostRun(sb), { payloadLimit: LIMIT, now: () => new Date('2025-03-31T09:00:00Z') });
    sb.stats.reset();
    await layer.run(await layer.detect(), { ...SETTINGS, groupColumns: ['Cost centre'], minGroupSize: 3 });
    expect(sb.stats.requestBytes.max).toBeLessThanOrEqual(LIMIT);
    expect(sb.stats.responseBytes.max).toBeLessThanOrEqual(LIMIT);
  });
});
