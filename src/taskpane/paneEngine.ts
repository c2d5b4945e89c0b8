/**
 * The pane's what-if scoring off the pane's thread: the live counts, the review-budget cutoff, the
 * chart and the follow-up view's peer-group context are answered by a Web Worker
 * (paneEngine.worker.ts) that holds the pane's read of the data, so a slider drag on 300,000 rows
 * never holds the pane. Without workers (tests in Node) the same answers come from this thread, a
 * task later. Only the latest question of each kind is answered: one asked while another of its
 * kind is being worked out replaces any still waiting (which resolve to null).
 */
import type { BudgetAnswer } from '../pipeline/budget.js';
import type { ScoreResult } from '../scoring/types.js';
import type { PreviewData, RunSettings } from '../workbook/api.js';
import { budgetCutoff, chartFor, claimContext, followColumn, previewOf, summarisePreview, type ChartData, type ClaimContext, type PreviewSummary } from './engine.js';

export type EngineAsk =
  | { readonly kind: 'summary'; readonly settings: RunSettings }
  | { readonly kind: 'budget'; readonly settings: RunSettings; readonly claims: number }
  | { readonly kind: 'chart'; readonly settings: RunSettings; readonly column: string; readonly group: string }
  | { readonly kind: 'context'; readonly settings: RunSettings; readonly row: number };

export type EngineAnswer =
  | { readonly kind: 'summary'; readonly summary: PreviewSummary | null; readonly error: string | null }
  | { readonly kind: 'budget'; readonly answer: BudgetAnswer }
  | { readonly kind: 'chart'; readonly chart: ChartData | null }
  | { readonly kind: 'context'; readonly context: ClaimContext | null };

export type ToEngine = { readonly type: 'data'; readonly data: PreviewData } | { readonly type: 'ask'; readonly id: number; readonly ask: EngineAsk };
export type FromEngine = { readonly type: 'answer'; readonly id: number; readonly answer: EngineAnswer } | { readonly type: 'failed'; readonly id: number; readonly message: string };

/**
 * Answers questions about one read of the data (pure; in the worker or here). Keeps the last two
 * scorings (the live settings and the last run's) so a chart or context question re-uses them.
 */
export function engineFor(data: PreviewData): (ask: EngineAsk) => EngineAnswer {
  const kept: { key: string; result: ScoreResult | null; error: string | null }[] = [];
  const scored = (s: RunSettings) => {
    const key = JSON.stringify(s);
    let hit = kept.find((k) => k.key === key);
    if (!hit) {
      hit = { key, ...previewOf(data, s) };
      kept.unshift(hit);
      kept.length = Math.min(kept.length, 2);
    }
    return hit;
  };
  return (ask) => {
    switch (ask.kind) {
      case 'summary': {
        const a = scored(ask.settings);
        return { kind: 'summary', summary: a.result ? summarisePreview(a.result, ask.settings) : null, error: a.error };
      }
      case 'budget': {
        const a = scored(ask.settings);
        return { kind: 'budget', answer: a.result ? budgetCutoff(a.result, ask.claims) : { kind: 'none' } };
      }
      case 'chart':
        try {
          return { kind: 'chart', chart: chartFor(data, ask.settings, ask.column, ask.group) };
        } catch {
          return { kind: 'chart', chart: null };
        }
      case 'context': {
        const r = data.valueColumns.length === ask.settings.valueColumns.length ? scored(ask.settings).result : null;
        const ok = r !== null && ask.row >= 0 && ask.row < r.rowCount;
        return { kind: 'context', context: ok ? claimContext(r, followColumn(r, ask.row), ask.row) : null };
      }
    }
  };
}

export interface PaneEngine {
  /** The data the questions are about (the pane's latest read); questions asked before it are answered about the earlier data. */
  setData(data: PreviewData): void;
  /** The answer, or null when a later question of the same kind replaced this one before it was sent. */
  ask<K extends EngineAsk['kind']>(ask: Extract<EngineAsk, { kind: K }>): Promise<Extract<EngineAnswer, { kind: K }> | null>;
  dispose(): void;
}

interface Port {
  post(m: ToEngine): void;
  /** Sets the handler of the port's answers. */
  listen(onAnswer: (m: FromEngine) => void, onFailure: (message: string) => void): void;
  terminate(): void;
}

/** Same-thread port: the answer a task later (so callers see the same order of events as with a worker). */
function localPort(): Port {
  let answer: ((ask: EngineAsk) => EngineAnswer) | null = null;
  let handler: ((m: FromEngine) => void) | null = null;
  return {
    post(m) {
      if (m.type === 'data') {
        answer = engineFor(m.data);
        return;
      }
      const respond = answer;
      setTimeout(() => {
        if (!handler) return;
        try {
          if (!respond) throw new Error('no data to answer from');
          handler({ type: 'answer', id: m.id, answer: respond(m.ask) });
        } catch (e) {
          handler({ type: 'failed', id: m.id, message: e instanceof Error ? e.message : String(e) });
        }
      }, 0);
    },
    listen(onAnswer) {
      handler = onAnswer;
    },
    terminate() {
      handler = null;
    },
  };
}

function workerPort(): Port {
  const w = new Worker(new URL('./paneEngine.worker.ts', import.meta.url));
  return {
    post: (m) => w.postMessage(m),
    listen(onAnswer, onFailure) {
      w.onmessage = (e: MessageEvent<FromEngine>) => onAnswer(e.data);
      w.onerror = (e) => {
        e.preventDefault();
        onFailure(e.message || 'the scoring worker could not start');
      };
    },
    terminate: () => w.terminate(),
  };
}

export function createPaneEngine(): PaneEngine {
  const port = typeof Worker === 'undefined' ? localPort() : workerPort();
  let nextId = 1;
  const waiting = new Map<number, { resolve: (a: EngineAnswer | null) => void; reject: (e: Error) => void }>();
  /** Per kind: whether a question is with the engine, and the latest one held back meanwhile. */
  const lanes = new Map<string, { busy: boolean; held: { id: number; ask: EngineAsk } | null }>();
  const send = (id: number, ask: EngineAsk) => {
    lanes.set(ask.kind, { busy: true, held: lanes.get(ask.kind)?.held ?? null });
    port.post({ type: 'ask', id, ask });
  };
  const settle = (id: number, kind: string | null, f: (w: { resolve: (a: EngineAnswer | null) => void; reject: (e: Error) => void }) => void) => {
    const w = waiting.get(id);
    waiting.delete(id);
    if (w) f(w);
    if (kind === null) return;
    const lane = lanes.get(kind);
    if (!lane) return;
    lane.busy = false;
    if (lane.held) {
      const h = lane.held;
      lane.held = null;
      send(h.id, h.ask);
    }
  };
  const kindOf = new Map<number, string>();
  port.listen(
    (m) => {
      const kind = kindOf.get(m.id) ?? null;
      kindOf.delete(m.id);
      if (m.type === 'answer') settle(m.id, kind, (w) => w.resolve(m.answer));
      else settle(m.id, kind, (w) => w.reject(new Error(m.message)));
    },
    (message) => {
      for (const w of waiting.values()) w.reject(new Error(message));
      waiting.clear();
      kindOf.clear();
      lanes.clear();
    },
  );
  return {
    setData: (data) => port.post({ type: 'data', data }),
    ask<K extends EngineAsk['kind']>(ask: Extract<EngineAsk, { kind: K }>) {
      const id = nextId++;
      kindOf.set(id, ask.kind);
      const p = new Promise<EngineAnswer | null>((resolve, reject) => waiting.set(id, { resolve, reject }));
      const lane = lanes.get(ask.kind);
      if (lane?.busy) {
        if (lane.held) {
          kindOf.delete(lane.held.id);
          settle(lane.held.id, null, (w) => w.resolve(null));
        }
        lane.held = { id, ask };
      } else send(id, ask);
      return p as Promise<Extract<EngineAnswer, { kind: K }> | null>;
    },
    dispose: () => {
      port.terminate();
      for (const w of waiting.values()) w.resolve(null);
      waiting.clear();
    },
  };
}
