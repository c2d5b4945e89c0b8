/**
 * The preview page's .xlsx worker: unzips and reads an opened workbook with ExcelJS and builds the
 * sandbox off the page's thread, then sends it in parts (src/sandbox/transfer.ts), so opening a
 * large workbook never freezes the page.
 */
import { readXlsx, sandboxFromExcelJs } from '../sandbox/exceljs-bridge.js';
import { toParts } from '../sandbox/transfer.js';
import type { XlsxFromWorker } from './openXlsx.js';

/** Cells per message: each is applied on the page in its own task. */
const CELLS_PER_PART = 40_000;
const post = (m: XlsxFromWorker) => self.postMessage(m);

self.onmessage = (e: MessageEvent<File>) => {
  void (async () => {
    try {
      const sb = sandboxFromExcelJs(await readXlsx(await e.data.arrayBuffer()));
      const { shell, parts } = toParts(sb, CELLS_PER_PART);
      post({ type: 'shell', shell, parts: parts.length });
      parts.forEach((part, i) => post({ type: 'part', index: i, part }));
      post({ type: 'done' });
    } catch (err) {
      post({ type: 'error', message: err instanceof Error ? err.message : String(err) });
    }
  })();
};
