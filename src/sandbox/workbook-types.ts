/**
 * The sandbox workbook's public shapes: request statistics, direct-setup cells, Excel.run's
 * overloads and the selection-changed handler.
 */
import type { CellError } from './formula.js';

export interface ByteStats {
  /** Largest single request/response so far (bytes). */
  max: number;
  total: number;
  last: number;
}

export interface SandboxStats {
  /** Excel.run batches started. */
  runs: number;
  /** context.sync() calls (including the implicit one at the end of a run with queued work). */
  syncs: number;
  /** Queued statements sent (property writes, method calls, loads). */
  requests: number;
  requestBytes: ByteStats;
  responseBytes: ByteStats;
  reset(): void;
}

/** A cell for direct setup (no sync, no typed-input interpretation: strings stay text). */
export interface SandboxCellInput {
  value?: number | string | boolean | CellError | null;
  formula?: string;
  numberFormat?: string;
  fill?: string;
  font?: string;
  bold?: boolean;
  wrap?: boolean;
}

export type Batch<T> = (context: Excel.RequestContext) => Promise<T>;

/** Excel.run's shape: run(batch) or run(object | context, batch). */
export interface SandboxRun {
  <T>(batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
  <T>(options: Excel.RunOptions, batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
  <T>(object: OfficeExtension.ClientRequestContext | OfficeExtension.ClientObject | { context: unknown }, batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
}

export type SelectionHandler = (args: { workbook: unknown; type: string }) => unknown;

export function newBytes(): ByteStats {
  return { max: 0, total: 0, last: 0 };
}
