/**
 * The pipeline the pane and the preview page hand the workbook layer: scoring and plan building in
 * a Web Worker (pipeline.worker.ts), so the pane keeps painting, shows progress and answers Cancel
 * during a run. Where workers do not exist (tests in Node), the same-thread fallback.
 */
import { createWorkerPipeline, runPipelineYielding, type AsyncPipeline, type FromWorker } from '../pipeline/index.js';

export function browserPipeline(): AsyncPipeline {
  if (typeof Worker === 'undefined') return runPipelineYielding;
  return createWorkerPipeline(() => {
    const w = new Worker(new URL('./pipeline.worker.ts', import.meta.url));
    return {
      post: (m) => w.postMessage(m),
      listen(onMessage, onFailure) {
        w.onmessage = (e: MessageEvent<FromWorker>) => onMessage(e.data);
        w.onerror = (e) => {
          e.preventDefault();
          onFailure(e.message || 'the worker could not start');
        };
      },
      terminate: () => w.terminate(),
    };
  });
}
