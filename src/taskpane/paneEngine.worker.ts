/**
 * The pane's what-if worker (bundled by webpack from `new Worker(new URL(...))` in paneEngine.ts):
 * holds the pane's read of the data and answers the live counts, budget, chart and context
 * questions off the pane's thread. Imports only the pure layers (through engine.ts).
 */
import { engineFor, type EngineAsk, type EngineAnswer, type FromEngine, type ToEngine } from './paneEngine.js';

let answer: ((ask: EngineAsk) => EngineAnswer) | null = null;
const post = (m: FromEngine) => self.postMessage(m);

self.onmessage = (e: MessageEvent<ToEngine>) => {
  const m = e.data;
  if (m.type === 'data') {
    answer = engineFor(m.data);
    return;
  }
  try {
    if (!answer) throw new Error('no data to answer from');
    post({ type: 'answer', id: m.id, answer: answer(m.ask) });
  } catch (err) {
    post({ type: 'failed', id: m.id, message: err instanceof Error ? err.message : String(err) });
  }
};
