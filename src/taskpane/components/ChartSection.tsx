import { Field, Select, Text, tokens } from '@fluentui/react-components';
import { useId } from 'react';
import type { ChartData, ChartLine } from '../engine.js';
import type { PaneModel } from '../usePaneState.js';
import { Fold } from './Section.js';
import { usePaneStyles } from './styles.js';

const W = 300;
const H = 120;
const PAD = 10;
const MAX_DOTS = 800;

function fmt(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  return x.toLocaleString('en', { maximumFractionDigits: 2 });
}

function lineWords(l: ChartLine): string {
  const parts: string[] = [];
  if (l.lower !== null) parts.push(`below ${fmt(l.lower)}`);
  if (l.upper !== null) parts.push(`above ${fmt(l.upper)}`);
  return parts.length ? parts.join(' or ') : 'no bound';
}

/** Deterministic jitter so the dots do not jump between renders. */
function jitter(i: number): number {
  const x = Math.sin(i * 12.9898) * 43758.5453;
  return x - Math.floor(x);
}

/** Strip plot of one group: dots for claims, solid lines for robust bounds, dashed for classic. */
export function DistributionChart({ chart }: { chart: ChartData }) {
  const s = usePaneStyles();
  const titleId = useId();
  const descId = useId();
  const f = chart.logScale ? (v: number) => (v > 0 ? Math.log(v) : NaN) : (v: number) => v;
  const bounds = [chart.robust.lower, chart.robust.upper, chart.classic.lower, chart.classic.upper].filter(
    (b): b is number => b !== null && Number.isFinite(f(b)),
  );
  const shown = chart.values.filter((v) => Number.isFinite(f(v)));
  const all = [...shown.map(f), ...bounds.map(f)];
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) {
    lo = 0;
    hi = 1;
  }
  if (hi === lo) {
    hi = lo + 1;
    lo = lo - 1;
  }
  const x = (v: number) => PAD + ((f(v) - lo) / (hi - lo)) * (W - 2 * PAD);
  const step = Math.max(1, Math.ceil(shown.length / MAX_DOTS));
  const outside = (v: number, l: ChartLine) => (l.lower !== null && v < l.lower) || (l.upper !== null && v > l.upper);
  const description =
    `${chart.n} claims in ${chart.group}${chart.pooled ? ' (small group: compared with the whole column)' : ''}. ` +
    `Robust z at ${chart.robust.cutoff} flags ${chart.robust.flagged} (${lineWords(chart.robust)}); ` +
    `classic z at ${chart.classic.cutoff} flags ${chart.classic.flagged} (${lineWords(chart.classic)}).` +
    (chart.robust.flagged > chart.classic.flagged
      ? ' Classic z flags fewer: large claims inflate the mean and SD and hide each other (masking).'
      : '');
  const vline = (v: number | null, stroke: string, dash: string | undefined, key: string) =>
    v === null || !Number.isFinite(f(v)) ? null : (
      <line key={key} x1={x(v)} x2={x(v)} y1={4} y2={H - 22} style={{ stroke, strokeWidth: 2, strokeDasharray: dash }} />
    );
  return (
    <figure style={{ margin: 0 }}>
      <svg
        viewBox={`0 0 ${W} ${H}`}
        width="100%"
        role="img"
        aria-labelledby={titleId}
        aria-describedby={descId}
        data-testid="chart"
        style={{ display: 'block', backgroundColor: tokens.colorNeutralBackground2, borderRadius: tokens.borderRadiusMedium }}
      >
        <title id={titleId}>Spread of amounts in {chart.group}</title>
        <desc id={descId}>{description}</desc>
        <line x1={PAD} x2={W - PAD} y1={H - 22} y2={H - 22} style={{ stroke: tokens.colorNeutralStroke1, strokeWidth: 1 }} />
        {shown
          .filter((_, i) => i % step === 0 || outside(shown[i], chart.robust) || outside(shown[i], chart.classic))
          .map((v, i) => (
            <circle
              key={i}
              cx={x(v)}
              cy={10 + jitter(i) * (H - 40)}
              r={3}
              style={{
                fill: outside(v, chart.robust) ? tokens.colorPaletteDarkOrangeForeground1 : tokens.colorNeutralForeground3,
                fillOpacity: 0.8,
              }}
            />
          ))}
        {vline(chart.robust.lower, tokens.colorBrandForeground1, undefined, 'rl')}
        {vline(chart.robust.upper, tokens.colorBrandForeground1, undefined, 'ru')}
        {vline(chart.classic.lower, tokens.colorNeutralForeground2, '4 3', 'cl')}
        {vline(chart.classic.upper, tokens.colorNeutralForeground2, '4 3', 'cu')}
        <text x={PAD} y={H - 6} style={{ fill: tokens.colorNeutralForeground2, fontSize: '10px' }}>
          {fmt(chart.logScale ? Math.exp(lo) : lo)}
        </text>
        <text x={W - PAD} y={H - 6} textAnchor="end" style={{ fill: tokens.colorNeutralForeground2, fontSize: '10px' }}>
          {fmt(chart.logScale ? Math.exp(hi) : hi)}
          {chart.logScale ? ' (log axis)' : ''}
        </text>
      </svg>
      <figcaption className={s.small}>
        <span style={{ color: tokens.colorBrandForeground1 }}>━</span> robust z at {chart.robust.cutoff}: flags{' '}
        <strong data-testid="chart-robust">{chart.robust.flagged}</strong> ·{' '}
        <span style={{ color: tokens.colorNeutralForeground2 }}>╍</span> classic z at {chart.classic.cutoff}: flags{' '}
        <strong data-testid="chart-classic">{chart.classic.flagged}</strong>
        {chart.robust.flagged > chart.classic.flagged ? ' — large claims mask each other under classic z.' : ''}
      </figcaption>
      <div className={s.visuallyHidden}>
      <table>
        <caption>Bounds in {chart.group}</caption>
        <thead>
          <tr>
            <th scope="col">Method</th>
            <th scope="col">Cutoff</th>
            <th scope="col">Lower bound</th>
            <th scope="col">Upper bound</th>
            <th scope="col">Flagged</th>
          </tr>
        </thead>
        <tbody>
          {[chart.robust, chart.classic].map((l) => (
            <tr key={l.method}>
              <th scope="row">{l.method === 'robust' ? 'Robust z' : 'Classic z'}</th>
              <td>{l.cutoff}</td>
              <td>{fmt(l.lower)}</td>
              <td>{fmt(l.upper)}</td>
              <td>{l.flagged}</td>
            </tr>
          ))}
        </tbody>
      </table>
      </div>
    </figure>
  );
}

/** (c) Pick a group and see its distribution. */
export function ChartSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { chart, chartGroups, actions, state } = model;
  if (!state.settings || chartGroups.length === 0) return null;
  return (
    <Fold model={model} area="chart" title="3. Look at one group" summary={chart ? `${chart.group}` : undefined}>
      <div className={s.row}>
        {state.settings.valueColumns.length > 1 && (
          <Field label="Amount" className={s.grow}>
            <Select value={chart?.column ?? state.settings.valueColumns[0]} onChange={(_, d) => actions.setChart(null, d.value)}>
              {state.settings.valueColumns.map((c) => (
                <option key={c}>{c}</option>
              ))}
            </Select>
          </Field>
        )}
        <Field label="Peer group" className={s.grow}>
          <Select value={chart?.group ?? chartGroups[0]} onChange={(_, d) => actions.setChart(d.value)} data-testid="chart-group">
            {chartGroups.map((g) => (
              <option key={g}>{g}</option>
            ))}
          </Select>
        </Field>
      </div>
      {chart ? <DistributionChart chart={chart} /> : <Text className={s.muted}>No numbers in this group.</Text>}
    </Fold>
  );
}
