import { Button, Checkbox, Field, Select, Text, Textarea } from '@fluentui/react-components';
import { REVIEW_STATUSES } from '../../report/style.js';
import { reviewCounts, rowsToMark } from '../state.js';
import type { PaneModel } from '../usePaneState.js';
import { usePaneStyles } from './styles.js';

/** Statuses after which a claim's follow-up is finished. */
export const DONE_LABELS: readonly string[] = REVIEW_STATUSES.filter((r) => r.id === 'cleared' || r.id === 'escalated').map((r) => r.label);

const LIST_LIMIT = 200;

function fmt(v: number | null): string {
  return v === null ? '—' : v.toLocaleString('en', { maximumFractionDigits: 2 });
}

/** (e) Step through the exceptions in the sheet and record the outcome in place. */
export function ReviewSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions } = model;
  const list = state.exceptions;
  if (!state.table?.hasResults && list.length === 0) return null;
  const counts = reviewCounts(list, DONE_LABELS);
  const e = list[state.current];
  const targets = rowsToMark(state);
  const statusKnown = REVIEW_STATUSES.some((r) => r.label === state.statusDraft);
  return (
    <section className={s.section} aria-labelledby="tm-review-h">
      <h2 id="tm-review-h" className={s.heading}>
        5. Follow up
      </h2>
      <Text data-testid="review-counts">
        <strong data-testid="open-count">{counts.open}</strong> open · <strong data-testid="done-count">{counts.done}</strong> done · {list.length}{' '}
        exceptions
      </Text>
      {list.length === 0 ? (
        <Text className={s.muted}>No exceptions at this cutoff.</Text>
      ) : (
        <>
          <div className={s.row}>
            <Button onClick={() => actions.move(-1)} data-testid="prev" aria-label="Previous exception">
              ‹ Previous
            </Button>
            <Text className={s.grow} style={{ textAlign: 'center' }} data-testid="position">
              {state.current + 1} / {list.length}
            </Text>
            <Button onClick={() => actions.move(1)} data-testid="next" aria-label="Next exception">
              Next ›
            </Button>
          </div>
          {e && (
            <Text block className={s.small} data-testid="current-claim">
              <strong>{e.claimId ?? `Row ${e.row + 1}`}</strong> · {e.group} · amount {fmt(e.value)} · score {fmt(e.score)} · status “{e.status || 'none'}”
            </Text>
          )}
          <Field label="Status">
            <Select value={statusKnown ? state.statusDraft : ''} onChange={(_, d) => actions.setDrafts({ status: d.value })} data-testid="status">
              <option value="" disabled>
                Choose…
              </option>
              {REVIEW_STATUSES.map((r) => (
                <option key={r.id} value={r.label} title={r.meaning}>
                  {r.label}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Note" hint="Stored in the sheet as text.">
            <Textarea value={state.noteDraft} onChange={(_, d) => actions.setDrafts({ note: d.value })} resize="vertical" data-testid="note" />
          </Field>
          <Button appearance="primary" onClick={actions.saveMark} disabled={state.busy !== null || targets.length === 0} data-testid="save-mark">
            {targets.length > 1 ? `Save for ${targets.length} ticked claims` : 'Save for this claim'}
          </Button>
          <ul className={s.list} aria-label="Exceptions">
            {list.slice(0, LIST_LIMIT).map((x, i) => (
              <li key={x.row} className={`${s.listItem} ${i === state.current ? s.current : ''}`}>
                <Checkbox
                  checked={state.checked.includes(x.row)}
                  onChange={(_, d) => actions.check(x.row, d.checked === true)}
                  aria-label={`Tick ${x.claimId ?? `row ${x.row + 1}`}`}
                />
                <Button appearance="transparent" size="small" onClick={() => actions.goTo(i)} style={{ justifyContent: 'flex-start', minWidth: 0, flexGrow: 1 }}>
                  {x.claimId ?? `Row ${x.row + 1}`} · {fmt(x.value)} · {x.status || 'no status'}
                </Button>
              </li>
            ))}
          </ul>
          {list.length > LIST_LIMIT && <Text className={s.muted}>Showing the first {LIST_LIMIT}; use Next to reach the rest.</Text>}
        </>
      )}
    </section>
  );
}
