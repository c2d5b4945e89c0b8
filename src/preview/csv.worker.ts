/**
 * The preview page's CSV worker: reads an opened .csv's bytes and parses them off the page's
 * thread (csv.ts: encoding detected from the bytes, as the batch command does) and sends the rows
 * back in slices, so opening a large file never freezes the page.
 */
import { parseCsv, type CsvChoices } from './csv.js';
import type { CsvFromWorker } from './openCsv.js';

const SLICE = 10_000;
const post = (m: CsvFromWorker) => self.postMessage(m);

self.onmessage = (e: MessageEvent<{ file: File; choices: CsvChoices }>) => {
  void (async () => {
    try {
      const { file, choices } = e.data;
      const { rows, found } = parseCsv(new Uint8Array(await file.arrayBuffer()), file.name, choices);
      for (let i = 0; i < rows.length; i += SLICE) post({ type: 'rows', offset: i, total: rows.length, rows: rows.slice(i, i + SLICE) });
      post({ type: 'done', total: rows.length, found });
    } catch (err) {
      post({ type: 'error', message: err instanceof Error ? err.message : String(err) });
    }
  })();
};
