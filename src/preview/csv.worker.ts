/**
 * The preview page's CSV worker: reads and parses an opened .csv off the page's thread (csv.ts)
 * and sends the rows back in slices, so opening a large file never freezes the page.
 */
import { parseCsv } from './csv.js';
import type { CsvFromWorker } from './openCsv.js';

const SLICE = 10_000;
const post = (m: CsvFromWorker) => self.postMessage(m);

self.onmessage = (e: MessageEvent<File>) => {
  void (async () => {
    try {
      const rows = parseCsv(await e.data.text());
      for (let i = 0; i < rows.length; i += SLICE) post({ type: 'rows', offset: i, total: rows.length, rows: rows.slice(i, i + SLICE) });
      post({ type: 'done', total: rows.length });
    } catch (err) {
      post({ type: 'error', message: err instanceof Error ? err.message : String(err) });
    }
  })();
};
