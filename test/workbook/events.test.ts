/**
 * onSelectionChanged follows Microsoft's documented pattern (Office Add-ins docs, "Work with events
 * using the Excel JavaScript API"): add the handler inside one Excel.run, keep the
 * EventHandlerResult, and remove it later with Excel.run(result.context, batch). The fallback
 * (no context runner given) keeps the registering run open until unsubscribe.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbookLayer, type ExcelContextRunner, type ExcelRunner } from '../../src/workbook/index.js';
import { claimsSandbox, hostRun } from './helpers.js';
import type { SandboxWorkbook } from '../../src/sandbox/index.js';

/** sb.run wrapped to count the batches still running. */
function counted(sb: SandboxWorkbook): { run: ExcelRunner; open: () => number } {
  let open = 0;
  const run: ExcelRunner = async (options, batch) => {
    open++;
    try {
      return await hostRun(sb)(options, batch);
    } finally {
      open--;
    }
  };
  return { run, open: () => open };
}

const settle = () => new Promise((r) => setTimeout(r, 10));

describe('onSelectionChanged', () => {
  it('registers in a run that finishes, and removes the handler on the context that added it', async () => {
    const sb = claimsSandbox(20);
    const { run, open } = counted(sb);
    const contexts: OfficeExtension.ClientRequestContext[] = [];
    const runInContext: ExcelContextRunner = (context, batch) => {
      contexts.push(context);
      return hostRun(sb)(context, batch);
    };
    const errors: unknown[] = [];
    const layer = createWorkbookLayer(run, { runInContext, onBackgroundError: (e) => errors.push(e) });
    let calls = 0;
    const off = await layer.onSelectionChanged(() => {
      calls++;
    });
    // No Excel.run is left open while the pane listens.
    expect(open()).toBe(0);
    expect(sb.selectionListenerCount).toBe(1);
    sb.userSelect('Claims', 'C4');
    await sb.flushEvents();
    expect(calls).toBe(1);
    off();
    off(); // a second call does nothing
    await settle();
    expect(contexts).toHaveLength(1);
    expect(sb.selectionListenerCount).toBe(0);
    expect(errors).toEqual([]);
    sb.userSelect('Claims', 'C5');
    await sb.flushEvents();
    expect(calls).toBe(1);
  });

  it('reports a failed removal to onBackgroundError', async () => {
    const sb = claimsSandbox(20);
    const errors: unknown[] = [];
    // A context runner that refuses to resume the context (in Excel, e.g. the session behind it is gone).
    const refuse: ExcelContextRunner = () => Promise.reject(new Error('this context can no longer be resumed'));
    const layer = createWorkbookLayer(hostRun(sb), { runInContext: refuse, onBackgroundError: (e) => errors.push(e) });
    const off = await layer.onSelectionChanged(() => undefined);
    off();
    await settle();
    expect(errors).toHaveLength(1);
    expect(String(errors[0])).toMatch(/context/);
  });

  it('without a context runner, falls back to a run kept open until unsubscribe', async () => {
    const sb = claimsSandbox(20);
    const { run, open } = counted(sb);
    const layer = createWorkbookLayer(run);
    let calls = 0;
    const off = await layer.onSelectionChanged(() => {
      calls++;
    });
    expect(open()).toBe(1);
    sb.userSelect('Claims', 'D4');
    await sb.flushEvents();
    expect(calls).toBe(1);
    off();
    await settle();
    expect(open()).toBe(0);
    expect(sb.selectionListenerCount).toBe(0);
  });
});
