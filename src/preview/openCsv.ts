/**
 * Opening a .csv on the preview page without freezing it: the file's bytes are read and parsed in
 * a worker (csv.worker.ts) and its rows arrive in slices, each put into the sandbox sheet in its
 * own task, with progress. Without workers (tests), it parses here.
 */
import { sandboxFromRows, SandboxWorkbook } from '../sandbox/index.js';
import { parseCsv, type CsvChoices, type CsvFound } from './csv.js';

type Row = (string | number | null)[];

export type CsvFromWorker =
  | { readonly type: 'rows'; readonly offset: number; readonly total: number; readonly rows: Row[] }
  | { readonly type: 'done'; readonly total: number; readonly found: CsvFound }
  | { readonly type: 'error'; readonly message: string };

/** Reads `file` into a new sandbox workbook with one sheet `sheetName`; `onProgress` gets 0..1. */
export async function openCsv(
  file: File,
  sheetName: string,
  choices: CsvChoices,
  onProgress: (fraction: number) => void,
): Promise<{ sb: SandboxWorkbook; found: CsvFound }> {
  if (typeof Worker === 'undefined') {
    const { rows, found } = parseCsv(new Uint8Array(await file.arrayBuffer()), file.name, choices);
    if (rows.length === 0) throw new Error('The file is empty.');
    return { sb: sandboxFromRows(sheetName, rows), found };
  }
  const sb = new SandboxWorkbook();
  sb.addSheet(sheetName);
  const worker = new Worker(new URL('./csv.worker.ts', import.meta.url));
  try {
    const found = await new Promise<CsvFound>((resolve, reject) => {
      // Slices are applied one per task, in order, however fast they arrive.
      let chain = Promise.resolve();
      worker.onmessage = (e: MessageEvent<CsvFromWorker>) => {
        const m = e.data;
        chain = chain.then(async () => {
          if (m.type === 'rows') {
            if (m.rows.length > 0) sb.setValues(sheetName, `A${m.offset + 1}`, m.rows);
            onProgress((m.offset + m.rows.length) / m.total);
            await new Promise((r) => setTimeout(r, 0));
          } else if (m.type === 'done') {
            if (m.total === 0) reject(new Error('The file is empty.'));
            else resolve(m.found);
          } else reject(new Error(m.message));
        });
      };
      worker.onerror = (e) => {
        e.preventDefault();
        reject(new Error(e.message || 'the file could not be read'));
      };
      worker.postMessage({ file, choices });
    });
    return { sb, found };
  } finally {
    worker.terminate();
  }
}
