/**
 * The pane's scoring worker (a Web Worker, bundled by webpack from `new Worker(new URL(...))` in
 * offThread.ts): runs the pipeline off the pane's thread. Imports only the pure layers.
 */
import { servePipeline, type ToWorker } from '../pipeline/index.js';

const handle = servePipeline((msg, transfer) => self.postMessage(msg, { transfer: transfer ?? [] }));
self.onmessage = (e: MessageEvent<ToWorker>) => handle(e.data);
