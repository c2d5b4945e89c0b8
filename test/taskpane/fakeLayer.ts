/**
 * A small in-memory WorkbookLayer for testing the pane without Excel or the sandbox. It scores
 * with src/scoring directly and keeps marks in a Map. Deliberately simple: it is not the real layer.
 */
import { demoClaims } from '../../src/demo/claims.js';
import { scoreTable } from '../../src/scoring/index.js';
import type { RawCell } from '../../src/scoring/types.js';
import {
  TailmarkError,
  type DetectedTable,
  type Exception,
  type PreviewData,
  type RunSettings,
  type RunSummary,
  type WorkbookLayer,
} from '../../src/workbook/api.js';
import { guessColumn } from '../../src/workbook/guess.js';

export interface FakeLayer extends WorkbookLayer {
  /** Make the next detect() fail, as with an empty selection. */
  failDetect: TailmarkError | null;
  readonly calls: string[];
  fireSelectionChanged(): void;
  /** ms each run phase waits (lets tests cancel). */
  phaseDelay: number;
}

export function fakeLayer(rows = 200): FakeLayer {
  const demo = demoClaims({ rows });
  const headers = demo.headers;
  const columns: RawCell[][] = headers.map((_, c) => demo.rows.map((r) => r[c]));
  const handlers = new Set<() => void>();
  const marks = new Map<number, { status: string; note: string }>();
  let saved: RunSettings | null = null;
  let results: { flagged: number[]; scores: Float64Array; values: Float64Array; groups: string[] } | null = null;
  const calls: string[] = [];

  const table = (): DetectedTable => ({
    sheetName: 'Claims',
    address: `Claims!A1:G${demo.rows.length + 1}`,
    tableName: null,
    rowCount: demo.rows.length,
    columns: headers.map((h, i) => guessColumn(i, h, columns[i])),
    hasResults: results !== null,
  });
  const col = (name: string) => {
    const i = headers.indexOf(name);
    if (i < 0) throw new TailmarkError('bad-settings', `No column "${name}".`);
    return { name, cells: columns[i] };
  };
  const wait = (ms: number, signal?: AbortSignal) =>
    new Promise<void>((resolve, reject) => {
      const t = setTimeout(resolve, ms);
      signal?.addEventListener('abort', () => {
        clearTimeout(t);
        reject(new TailmarkError('cancelled', 'Run cancelled.'));
      });
    });

  const layer: FakeLayer = {
    failDetect: null,
    calls,
    phaseDelay: 0,
    async detect() {
      calls.push('detect');
      if (layer.failDetect) throw layer.failDetect;
      return table();
    },
    async readForPreview(_t, s): Promise<PreviewData> {
      calls.push('readForPreview');
      return { valueColumns: s.valueColumns.map(col), groupColumns: s.groupColumns.map(col) };
    },
    async run(_t, s, onProgress, signal): Promise<RunSummary> {
      calls.push('run');
      for (const phase of ['reading', 'scoring', 'writing', 'highlighting', 'notes'] as const) {
        onProgress?.({ phase, fraction: 0.5 });
        if (layer.phaseDelay > 0) await wait(layer.phaseDelay, signal);
        if (signal?.aborted) throw new TailmarkError('cancelled', 'Run cancelled.');
      }
      const r = scoreTable(
        { valueColumns: s.valueColumns.map(col), groupColumns: s.groupColumns.map(col) },
        { method: s.method, cutoff: s.cutoff, direction: s.direction, logScale: s.logScale, minGroupSize: s.minGroupSize, smallGroups: s.smallGroups },
      );
      const c = r.columns[0];
      const flagged: number[] = [];
      for (let i = 0; i < r.rowCount; i++) if (c.flagged[i] === 1) flagged.push(i);
      results = { flagged, scores: c.scores, values: c.values, groups: c.groups.map((g) => g.label) };
      for (const row of flagged) if (!marks.has(row)) marks.set(row, { status: 'To look at', note: '' });
      saved = s;
      return {
        rowsScored: c.scoredRows,
        flagged: c.flaggedRows,
        groups: c.groups.map((g) => ({ label: g.label, n: g.n, flagged: g.flagged, cutoffUnreachable: g.fallbacks.includes('cutoff-unreachable'), fallbacks: g.fallbacks })),
        excluded: Object.entries(c.excludedCounts).map(([reason, count]) => ({ reason, count })),
        notesSheet: 'Tailmark notes',
        syncs: 1,
      };
    },
    async remove() {
      calls.push('remove');
      results = null;
      marks.clear();
    },
    async loadSettings() {
      return saved;
    },
    async listExceptions(): Promise<readonly Exception[]> {
      if (!results) return [];
      const res = results;
      const idCol = headers.indexOf('Claim ID');
      return res.flagged.map((row) => ({
        row,
        claimId: String(columns[idCol][row]),
        group: 'group',
        value: res.values[row],
        score: res.scores[row],
        status: marks.get(row)?.status ?? '',
        note: marks.get(row)?.note ?? '',
      }));
    },
    async selectRow(row) {
      calls.push(`select:${row}`);
      for (const h of handlers) h();
    },
    async mark(rows, status, note) {
      calls.push(`mark:${rows.join(',')}`);
      for (const r of rows) {
        const m = marks.get(r) ?? { status: '', note: '' };
        marks.set(r, { status: status ?? m.status, note: note ?? m.note });
      }
    },
    async onSelectionChanged(handler) {
      handlers.add(handler);
      return () => handlers.delete(handler);
    },
    fireSelectionChanged() {
      for (const h of handlers) h();
    },
  };
  return layer;
}
