/**
 * Opening an .xlsx on the preview page without freezing it: the workbook is read in a worker
 * (xlsx.worker.ts) and arrives in parts, each put into the sandbox in its own task, with progress.
 * Without workers (tests), it is read here.
 */
import type { SandboxWorkbook } from '../sandbox/index.js';
import { addCells, finish, fromShell, type CellPart, type WorkbookShell } from '../sandbox/transfer.js';

export type XlsxFromWorker =
  | { readonly type: 'shell'; readonly shell: WorkbookShell; readonly parts: number }
  | { readonly type: 'part'; readonly index: number; readonly part: CellPart }
  | { readonly type: 'done' }
  | { readonly type: 'error'; readonly message: string };

/** Reads `file` into a new sandbox workbook; `onProgress` gets 0..1 once the file is read (null before). */
export async function openXlsx(file: File, onProgress: (fraction: number | null) => void): Promise<SandboxWorkbook> {
  if (typeof Worker === 'undefined') {
    const { readXlsx, sandboxFromExcelJs } = await import('../sandbox/exceljs-bridge.js');
    return sandboxFromExcelJs(await readXlsx(await file.arrayBuffer()));
  }
  const worker = new Worker(new URL('./xlsx.worker.ts', import.meta.url));
  try {
    return await new Promise<SandboxWorkbook>((resolve, reject) => {
      let sb: SandboxWorkbook | null = null;
      let shell: WorkbookShell | null = null;
      let total = 0;
      // Parts are applied one per task, in order, however fast they arrive.
      let chain = Promise.resolve();
      worker.onmessage = (e: MessageEvent<XlsxFromWorker>) => {
        const m = e.data;
        chain = chain.then(async () => {
          if (m.type === 'shell') {
            shell = m.shell;
            total = m.parts;
            sb = fromShell(m.shell);
            onProgress(0);
          } else if (m.type === 'part') {
            if (!sb) throw new Error('the workbook arrived out of order');
            addCells(sb, m.part);
            onProgress((m.index + 1) / Math.max(1, total));
            await new Promise((r) => setTimeout(r, 0));
          } else if (m.type === 'done') {
            if (!sb || !shell) throw new Error('the workbook arrived out of order');
            finish(sb, shell);
            resolve(sb);
          } else reject(new Error(m.message));
        }).catch((err: unknown) => reject(err instanceof Error ? err : new Error(String(err))));
      };
      worker.onerror = (e) => {
        e.preventDefault();
        reject(new Error(e.message || 'the file could not be read'));
      };
      worker.postMessage(file);
    });
  } finally {
    worker.terminate();
  }
}
