/**
 * Worker-thread entry (Node): runs the pipeline off the command's main thread, speaking the
 * protocol of src/pipeline/offthread.ts. Started by threads.ts from the built file (dist/).
 */
import { parentPort } from 'node:worker_threads';
import { servePipeline, type ToWorker } from '../pipeline/index.js';

const port = parentPort;
if (port) {
  const handle = servePipeline((msg, transfer) => port.postMessage(msg, transfer ?? []));
  port.on('message', (m: ToWorker) => handle(m));
}
