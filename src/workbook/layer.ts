/** Alias entry point (the task pane imports the layer from here). */
export { createWorkbookLayer, type ExcelRunner, type ExcelContextRunner, type WorkbookLayerOptions, type TailmarkWorkbookLayer, type OperationStats, type RunDetails } from './index.js';
