/**
 * One Excel.run's sync discipline: counts syncs, keeps the payload budget, and batches queued
 * writes so that no request exceeds it.
 */

/** Excel on the web refuses a request or a response over 5 MB. */
export const PAYLOAD_LIMIT = 5 * 1024 * 1024;
/** Share of the limit we plan to use (headroom for JSON overhead we do not see). */
export const SAFETY = 0.6;

/**
 * UTF-8 bytes of a string: what it costs in a request or a response (Excel's 5 MB limit counts
 * bytes; text such as Japanese takes 3 bytes a character). O(length), no copy.
 */
export function utf8Bytes(s: string): number {
  let n = s.length;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) continue;
    if (c < 0x800) n += 1;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length) {
      n += 2; // a surrogate pair: 2 UTF-16 units, 4 bytes
      i++;
    } else n += 2;
  }
  return n;
}

/** UTF-8 bytes of a value's JSON text (what the client sends or receives for it). */
export function jsonBytes(x: unknown): number {
  return utf8Bytes(JSON.stringify(x) ?? '');
}

export interface Budget {
  /** The host's limit, bytes. */
  readonly limit: number;
  /** What we plan per request/response, bytes. */
  readonly target: number;
}

export function makeBudget(limit = PAYLOAD_LIMIT, safety = SAFETY): Budget {
  return { limit, target: Math.max(1024, Math.floor(limit * safety)) };
}

/** True for Excel's "request/response too large" errors. */
export function isPayloadError(e: unknown): boolean {
  const code = errorCode(e);
  return code === 'RequestPayloadSizeLimitExceeded' || code === 'ResponsePayloadSizeLimitExceeded';
}

/** The `code` of an OfficeExtension.Error-like object, or null. */
export function errorCode(e: unknown): string | null {
  if (typeof e !== 'object' || e === null) return null;
  if (e instanceof Error && e.name === 'TailmarkError') return null;
  const code: unknown = (e as { code?: unknown }).code;
  return typeof code === 'string' ? code : null;
}

export class Syncer {
  syncs = 0;
  /** Bytes queued for writing since the last sync (our estimate). */
  pending = 0;
  maxRequest = 0;
  maxResponse = 0;

  constructor(
    readonly context: Excel.RequestContext,
    readonly budget: Budget,
  ) {}

  async sync(): Promise<void> {
    const pending = this.pending;
    this.pending = 0;
    this.maxRequest = Math.max(this.maxRequest, pending);
    this.syncs++;
    await this.context.sync();
  }

  noteResponse(bytes: number): void {
    this.maxResponse = Math.max(this.maxResponse, bytes);
  }

  /** Make room for `bytes` more of queued writes: syncs first when they would not fit. */
  async reserve(bytes: number): Promise<void> {
    if (this.pending > 0 && this.pending + bytes > this.budget.target) await this.sync();
    this.pending += bytes;
  }

  /** Sync if anything is queued. */
  async flush(): Promise<void> {
    if (this.pending > 0) await this.sync();
  }
}
