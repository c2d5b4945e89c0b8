/**
 * The second host of the workbook layer: Microsoft's real Excel client library
 * (`@microsoft/office-js`, `dist/excel-web-16.00.js`) loaded in Node, its requests answered by the
 * sandbox through OfficeRequestBridge.
 *
 * The client script expects a browser page; a handful of globals are stubbed (window, self,
 * navigator, document, location) before it is evaluated once per process. Every `context.sync()`
 * goes to `OfficeExtension.HttpUtility.setCustomSendRequestFunc` (the client's documented test
 * hook) because each Excel.run is given a session url of its own; the url says which sandbox and
 * which client context a request belongs to. Selection events go through `Office.context.document`
 * (addHandlerAsync / removeHandlerAsync), which is stubbed to the sandbox's selection listeners.
 * `Office.context.requirements.isSetSupported` answers from `excelApi` (default 1.20).
 *
 * What this host proves and what it cannot: see DEVELOPERS.md ("Two test hosts").
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { runInThisContext } from 'node:vm';
import { OfficeRequestBridge, type WireRequest, type WireResponse, type WireStats } from '../sandbox/office-bridge.js';
import type { SandboxWorkbook } from '../sandbox/index.js';

interface Client {
  readonly Excel: typeof Excel;
  readonly OfficeExtension: typeof OfficeExtension;
}

type OfficeHandler = (args: { type: string }) => unknown;

interface HostState {
  client: Client | null;
  readonly bridges: Map<string, OfficeRequestBridge>;
  active: { bridge: OfficeRequestBridge; excelApi: string } | null;
  readonly listeners: Map<OfficeHandler, { sandbox: SandboxWorkbook; id: number }>;
  next: number;
}

const state: HostState = { client: null, bridges: new Map(), active: null, listeners: new Map(), next: 1 };

function versionAtLeast(have: string, want: string): boolean {
  const a = have.split('.').map(Number);
  const b = want.split('.').map(Number);
  for (let i = 0; i < Math.max(a.length, b.length); i++) {
    const x = a[i] ?? 0;
    const y = b[i] ?? 0;
    if (x !== y) return x > y;
  }
  return true;
}

const settle = () => new Promise<void>((r) => setTimeout(r, 0));

function loadClient(): Client {
  if (state.client) return state.client;
  const g = globalThis as unknown as Record<string, unknown>;
  const stub = (name: string, value: unknown) => {
    if (g[name] === undefined) g[name] = value;
  };
  stub('window', globalThis);
  stub('self', globalThis);
  stub('navigator', { userAgent: 'Node.js (Tailmark test host)', language: 'en-US' });
  stub('location', { href: 'https://localhost/', search: '', hash: '', protocol: 'https:', host: 'localhost', hostname: 'localhost' });
  stub('document', {
    readyState: 'complete',
    createElement: () => ({ style: {}, setAttribute: () => undefined, appendChild: () => undefined }),
    getElementsByTagName: () => [],
    addEventListener: () => undefined,
    documentElement: { style: {} },
  });
  stub('addEventListener', () => undefined);
  stub('removeEventListener', () => undefined);
  const require = createRequire(import.meta.url);
  const file = require.resolve('@microsoft/office-js/dist/excel-web-16.00.js');
  runInThisContext(readFileSync(file, 'utf8'), { filename: file });
  const client: Client = { Excel: g.Excel as typeof Excel, OfficeExtension: g.OfficeExtension as typeof OfficeExtension };
  // Office.context is a getter over OSF._OfficeAppFactory.getContext(), which office.js's loader
  // (not loaded here) provides in a real page.
  const osf = g.OSF as { _OfficeAppFactory?: { getContext?: () => unknown } } | undefined;
  if (!osf) throw new Error('The Office.js client script did not define OSF (unexpected version of @microsoft/office-js).');
  const factory = (osf._OfficeAppFactory ??= {});
  const officeContext = {
    requirements: {
      isSetSupported: (name: string, version?: string) =>
        name === 'ExcelApi' ? versionAtLeast(state.active?.excelApi ?? '1.20', version ?? '1.1') : true,
    },
    document: {
      addHandlerAsync: (_type: unknown, handler: OfficeHandler, callback?: (r: { status: string }) => void) => {
        const a = state.active;
        if (a) {
          const sandbox = a.bridge.sandbox;
          const id = sandbox.addSelectionListener(async () => {
            await handler({ type: 'documentSelectionChanged' });
            // The client hands the event on through promise chains; let them finish.
            for (let i = 0; i < 5; i++) await settle();
          });
          state.listeners.set(handler, { sandbox, id });
        }
        callback?.({ status: 'succeeded' });
      },
      removeHandlerAsync: (_type: unknown, options: { handler?: OfficeHandler } | undefined, callback?: (r: { status: string }) => void) => {
        const h = options?.handler;
        const l = h ? state.listeners.get(h) : undefined;
        if (h && l) {
          l.sandbox.removeSelectionListener(l.id);
          state.listeners.delete(h);
        }
        callback?.({ status: 'succeeded' });
      },
    },
  };
  factory.getContext = () => officeContext;
  // The documented test hook; @types/office-js does not declare HttpUtility.
  const http = (g.OfficeExtension as { HttpUtility: { setCustomSendRequestFunc(f: (r: WireRequest) => Promise<WireResponse>): void } }).HttpUtility;
  http.setCustomSendRequestFunc(send);
  state.client = client;
  return client;
}

/** One turn of the event loop (a macrotask), as a real request's answer arrives. */
const roundTrip = () => new Promise<void>((r) => setImmediate(r));

/**
 * Let the client's clean-up requests of finished Excel.runs arrive (it releases kept references
 * in a request it does not wait for), so the next measurement or injected fault does not meet them.
 */
export async function clientSettled(): Promise<void> {
  for (let i = 0; i < 5; i++) await new Promise<void>((r) => setTimeout(r, 0));
}

/**
 * The client's request, answered as a network round trip would be: the answer comes in a task of
 * its own, after the client's work of sending, and the bridge's work (Excel's part) is a task of
 * its own too. Without this, every sync of an Excel.run chained as microtasks and the whole run
 * was one stretch of the event loop (the test host's doing, not the layer's): the longest block
 * of a 400,000-row run read 19 s instead of that of its longest sync.
 */
async function send(request: WireRequest): Promise<WireResponse> {
  const host = /^https:\/\/([^/]+)\//.exec(request.url)?.[1] ?? '';
  const bridge = state.bridges.get(host);
  if (!bridge) return { statusCode: 404, headers: {}, body: JSON.stringify({ error: { code: 'ItemNotFound', message: `No sandbox answers ${host}.` } }) };
  await roundTrip();
  const answer = await bridge.handle(request);
  await roundTrip();
  return answer;
}

export interface OfficeClientHost {
  /** Excel.run of the real client: run(batch), run(options, batch) or run(contextOrObject, batch). */
  readonly run: {
    <T>(batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
    <T>(options: Excel.RunOptions, batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
    <T>(context: OfficeExtension.ClientRequestContext, batch: (context: Excel.RequestContext) => Promise<T>): Promise<T>;
  };
  /** Real request/response sizes, as the client sent and received them. */
  readonly wire: WireStats;
  readonly bridge: OfficeRequestBridge;
}

/**
 * Connect a sandbox to the real Office.js client. The most recently connected sandbox is the one
 * the (process-wide) Office.context.document events and requirement checks speak for.
 */
export function officeClientFor(sandbox: SandboxWorkbook, options: { excelApi?: string } = {}): OfficeClientHost {
  const client = loadClient();
  const host = `sandbox-${state.next++}.tailmark.invalid`;
  const bridge = new OfficeRequestBridge(sandbox);
  state.bridges.set(host, bridge);
  state.active = { bridge, excelApi: options.excelApi ?? '1.20' };
  let runs = 0;
  const session = () => `https://${host}/run-${++runs}`;
  const run = (<T>(a: unknown, b?: unknown): Promise<T> => {
    const xl = client.Excel;
    if (typeof a === 'function') return xl.run({ session: session() } as Excel.RunOptions, a as (c: Excel.RequestContext) => Promise<T>);
    if (a instanceof client.OfficeExtension.ClientRequestContext || a instanceof client.OfficeExtension.ClientObject) {
      return xl.run(a as OfficeExtension.ClientRequestContext, b as (c: Excel.RequestContext) => Promise<T>);
    }
    return xl.run({ ...(a as Excel.RunOptions), session: session() } as Excel.RunOptions, b as (c: Excel.RequestContext) => Promise<T>);
  }) as OfficeClientHost['run'];
  return { run, wire: bridge.stats, bridge };
}
