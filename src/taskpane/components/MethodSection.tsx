import { Button, Checkbox, Field, Input, Select, Slider, Text, Textarea } from '@fluentui/react-components';
import type { ReactNode } from 'react';
import { CAUTION_SHORT } from '../../report/style.js';
import type { DecimalMode, Direction, MethodId, SmallGroupPolicy } from '../../scoring/types.js';
import { methodDefaultCutoff } from '../engine.js';
import { GroupCountTable } from './GroupCountTable.js';
import { NumberInput } from './NumberInput.js';
import type { PaneModel } from '../usePaneState.js';
import { Fold } from './Section.js';
import { usePaneStyles } from './styles.js';

export const METHOD_WORDS: Record<MethodId, { label: string; unit: string; range: [number, number] }> = {
  robust: { label: 'Robust z (median and MAD)', unit: 'robust z', range: [1, 10] },
  classic: { label: 'Classic z (mean and SD)', unit: 'z', range: [1, 10] },
  iqr: { label: 'IQR fences (quartiles)', unit: 'k × IQR', range: [0.5, 6] },
  adjusted: { label: 'Adjusted boxplot (medcouple)', unit: 'k × adjusted IQR', range: [0.5, 6] },
  skew: { label: 'Skew-aware fences (medcouple)', unit: 'k × IQR, long side adjusted', range: [0.5, 6] },
};

const DIRECTION_WORDS: Record<Direction, string> = {
  high: 'Unusually high only',
  low: 'Unusually low only',
  both: 'High or low',
};

const MAX_GROUP_ROWS = 12;

/** (b) Method, direction and cutoff, with the live (unwritten) preview of what they flag. */
/** `fileChoices`: how an opened file was read (the preview page only), shown beside the decimal separator. */
export function MethodSection({ model, fileChoices }: { model: PaneModel; fileChoices?: ReactNode }) {
  const s = usePaneStyles();
  const { state, actions, preview } = model;
  const settings = state.settings;
  if (!settings || !state.table) return null;
  const m = METHOD_WORDS[settings.method];
  const def = methodDefaultCutoff(settings.method);
  const first = preview?.columns[0];
  const groups = first ? [...first.groups].sort((a, b) => b.flagged - a.flagged || b.n - a.n) : [];
  const unreachable = first ? first.groups.filter((g) => g.unreachable).length : 0;
  const reference = state.saved && state.saved.method === settings.method ? state.saved.cutoff : def;
  const cutoffChanged = settings.cutoff !== reference;
  return (
    <Fold model={model} area="method" title="2. How to score" summary={`${m.label}, cutoff ${settings.cutoff}`}>
      <Field label="Method">
        <Select value={settings.method} onChange={(_, d) => actions.setSettings({ method: d.value as MethodId })} data-testid="method">
          {(Object.keys(METHOD_WORDS) as MethodId[]).map((id) => (
            <option key={id} value={id}>
              {METHOD_WORDS[id].label}
            </option>
          ))}
        </Select>
      </Field>
      <Field label="Look for">
        <Select value={settings.direction} onChange={(_, d) => actions.setSettings({ direction: d.value as Direction })}>
          {(Object.keys(DIRECTION_WORDS) as Direction[]).map((id) => (
            <option key={id} value={id}>
              {DIRECTION_WORDS[id]}
            </option>
          ))}
        </Select>
      </Field>
      <Checkbox
        label="Score on a log scale (for skewed amounts; zero and credits are left out)"
        checked={settings.logScale}
        onChange={(_, d) => actions.setSettings({ logScale: d.checked === true })}
      />
      <Field label="Decimal separator in text amounts" hint={first?.decimal}>
        <Select value={settings.decimal} onChange={(_, d) => actions.setSettings({ decimal: d.value as DecimalMode })} data-testid="decimal">
          <option value="auto">Decide from each column's cells</option>
          <option value="comma">Decimal comma (1.234,50)</option>
          <option value="point">Decimal point (1,234.50)</option>
        </Select>
      </Field>
      {fileChoices}
      <div className={s.row}>
        <Field label="Smallest peer group" className={s.grow}>
          <NumberInput
            min={2}
            step={1}
            value={settings.minGroupSize}
            valid={(n) => Number.isInteger(n) && n >= 2}
            onValue={(n) => actions.setSettings({ minGroupSize: n })}
          />
        </Field>
        <Field label="Smaller groups" className={s.grow}>
          <Select value={settings.smallGroups} onChange={(_, d) => actions.setSettings({ smallGroups: d.value as SmallGroupPolicy })}>
            <option value="pool">Compare with whole column</option>
            <option value="skip">Leave unscored</option>
          </Select>
        </Field>
      </div>
      <Field label={`Cutoff (${m.unit}; default ${def})`}>
        <div className={s.row}>
          <Slider
            className={s.grow}
            min={m.range[0]}
            max={m.range[1]}
            step={0.1}
            value={Math.min(m.range[1], Math.max(m.range[0], settings.cutoff))}
            onChange={(_, d) => actions.setSettings({ cutoff: Math.round(d.value * 10) / 10 })}
            // Marks at whole units only (the 0.1 steps would draw a dense barcode of marks).
            style={{ ['--fui-Slider--steps-percent' as string]: `${100 / (m.range[1] - m.range[0])}%` }}
            aria-label="Cutoff slider"
          />
          <NumberInput
            step={0.1}
            min={0}
            style={{ width: '6.5em' }}
            value={settings.cutoff}
            valid={(n) => n > 0}
            onValue={(n) => actions.setSettings({ cutoff: n })}
            aria-label="Cutoff value"
            data-testid="cutoff"
          />
          <Button size="small" disabled={settings.cutoff === def} onClick={() => actions.setSettings({ cutoff: def })}>
            Default
          </Button>
        </div>
      </Field>
      {cutoffChanged && (
        <Field
          label="Why this cutoff? (optional)"
          hint={`Goes to the log sheet with the run${state.budgetUsed !== null ? `, with the note that it came from a budget of ${state.budgetUsed} claims` : ''}.`}
        >
          <Textarea
            value={state.cutoffReason}
            onChange={(_, d) => actions.setCutoffReason(d.value)}
            resize="vertical"
            rows={2}
            data-testid="cutoff-reason"
          />
        </Field>
      )}
      <div className={s.row}>
        <Field label="I can review this many claims" className={s.grow}>
          <Input
            type="number"
            min={0}
            step={1}
            value={state.budget}
            onChange={(_, d) => actions.setBudget(d.value)}
            onKeyDown={(e) => {
              if (e.key === 'Enter') actions.applyBudget();
            }}
            data-testid="budget"
          />
        </Field>
        <Button onClick={actions.applyBudget} disabled={!preview} data-testid="apply-budget">
          Set cutoff
        </Button>
      </div>
      <div aria-live="polite" data-testid="preview">
        {state.previewLoading && <Text className={s.muted}>Reading the chosen columns…</Text>}
        {model.previewError && (
          <Text block role="alert" data-testid="preview-error">
            No preview: {model.previewError}
          </Text>
        )}
        {preview && first && (
          <>
            <Text block>
              At this cutoff: <strong data-testid="preview-flagged">{preview.flaggedRows}</strong> of{' '}
              {Math.max(...preview.columns.map((c) => c.scored)).toLocaleString('en')} scored claims would be flagged
              {preview.columns.length > 1 ? ` (${preview.columns.map((c) => `${c.column}: ${c.flagged}`).join(', ')})` : ''}. Nothing is written
              until you press Run.
            </Text>
            <Text block className={s.small} data-testid="live-caution">
              {CAUTION_SHORT}
            </Text>
            <Text block className={s.small} data-testid="meaning">
              {preview.meaning}
            </Text>
            {unreachable > 0 && (
              <Text block className={s.small}>
                In {unreachable} small group{unreachable === 1 ? '' : 's'} this method cannot reach the cutoff at all.
              </Text>
            )}
            <GroupCountTable
              caption="Flagged claims per peer group at this cutoff"
              testId="group-counts"
              rows={groups.slice(0, MAX_GROUP_ROWS).map((g) => ({ label: g.label, n: g.n, flagged: g.flagged, remark: g.unreachable ? ' (cutoff out of reach)' : g.chance ? ` (${g.chance})` : undefined }))}
            />
            {groups.length > MAX_GROUP_ROWS && (
              <Text className={s.muted}>
                …and {groups.length - MAX_GROUP_ROWS} more groups ({groups.slice(MAX_GROUP_ROWS).reduce((a, g) => a + g.flagged, 0)} flagged).
              </Text>
            )}
          </>
        )}
      </div>
    </Fold>
  );
}
