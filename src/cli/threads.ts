/**
 * The pipeline on a Node worker thread (pipeline-thread.ts), so a long run leaves the main
 * thread's event loop free. Falls back to the same-thread pipeline when the built worker file is
 * not there (the command run from TypeScript sources, e.g. in tests).
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { createWorkerPipeline, runPipelineYielding, type AsyncPipeline, type FromWorker } from '../pipeline/index.js';

export interface NodePipeline {
  readonly pipeline: AsyncPipeline;
  /** 'worker-thread' or 'same-thread' (the fallback). */
  readonly where: 'worker-thread' | 'same-thread';
  /** Stops any worker thread still running (call when the command is done). */
  close(): Promise<void>;
}

export function nodePipeline(): NodePipeline {
  const file = new URL('./pipeline-thread.js', import.meta.url);
  if (!existsSync(fileURLToPath(file))) return { pipeline: runPipelineYielding, where: 'same-thread', close: () => Promise.resolve() };
  const live = new Set<Worker>();
  const pipeline = createWorkerPipeline(() => {
    const w = new Worker(file);
    live.add(w);
    w.once('exit', () => live.delete(w));
    return {
      post: (m) => w.postMessage(m),
      listen(onMessage, onFailure) {
        w.removeAllListeners('message').removeAllListeners('error');
        w.on('message', (m: FromWorker) => onMessage(m));
        w.on('error', (e) => onFailure(e.message));
      },
      terminate: () => void w.terminate(),
    };
  });
  return {
    pipeline,
    where: 'worker-thread',
    close: async () => {
      await Promise.all([...live].map((w) => w.terminate()));
    },
  };
}
