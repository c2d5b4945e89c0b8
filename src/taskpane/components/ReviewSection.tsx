import { Button, Checkbox, Field, Input, Select, Text, Textarea } from '@fluentui/react-components';
import { useState, type KeyboardEvent } from 'react';
import { CAUTION, REVIEW_STATUSES } from '../../report/style.js';
import type { ReviewStatus } from '../../report/types.js';
import type { ClaimRecord, Exception } from '../../workbook/api.js';
import type { ClaimContext } from '../engine.js';
import { DONE_LABELS, reviewCounts, rowsToMark, type ReviewFilter, type ReviewOrder } from '../state.js';
import type { PaneModel } from '../usePaneState.js';
import { Fold } from './Section.js';
import { usePaneStyles } from './styles.js';

export { DONE_LABELS };

const LIST_LIMIT = 200;
/** Columns shown with a claim until the reviewer chooses (common practice, no source: a card stays short). */
const DEFAULT_DETAIL_COLUMNS = 6;

/** A symbol per status, so statuses differ without colour (in the pane and the list). */
export const STATUS_SYMBOLS: Record<ReviewStatus['id'], string> = {
  open: '○',
  asked: '?',
  cleared: '✓',
  escalated: '↑',
};

export function statusWithSymbol(label: string): string {
  const s = REVIEW_STATUSES.find((r) => r.label === label);
  return s ? `${STATUS_SYMBOLS[s.id]} ${s.label}` : label === '' ? '– no status' : label;
}

const ORDER_WORDS: Record<ReviewOrder, string> = {
  score: 'Largest score first',
  group: 'By peer group',
  sheet: 'Sheet order',
};

const FILTER_WORDS: { id: ReviewFilter; label: string }[] = [
  { id: 'all', label: 'All exceptions' },
  { id: 'unfinished', label: 'Not finished' },
  ...REVIEW_STATUSES.map((r) => ({ id: r.id, label: `${STATUS_SYMBOLS[r.id]} ${r.label}` })),
  { id: 'none', label: 'No status' },
];

function fmt(v: number | null, decimals = 2): string {
  return v === null ? '—' : v.toLocaleString('en', { maximumFractionDigits: decimals, minimumFractionDigits: 0 });
}

function ordinal(n: number): string {
  const t = n % 100;
  if (t >= 11 && t <= 13) return `${n}th`;
  return `${n}${['th', 'st', 'nd', 'rd'][n % 10] ?? 'th'}`;
}

function claimName(e: { claimId: string | null; row: number } | null, row: number): string {
  return e?.claimId ?? `Row ${row + 1}`;
}

/** The position of the claim among its peers: one tick per amount, the claim as a tall bar, bounds dashed. */
export function Strip({ context, log }: { context: ClaimContext; log: boolean }) {
  const s = usePaneStyles();
  const pts = context.strip;
  if (pts.length === 0 || context.value === null) return null;
  const useLog = log && pts[0] > 0 && context.value > 0;
  const f = (x: number) => (useLog ? Math.log(x) : x);
  const all = [...pts, context.value, ...(context.lower !== null ? [context.lower] : []), ...(context.upper !== null ? [context.upper] : [])].filter(
    (x) => !useLog || x > 0,
  );
  const lo = f(Math.min(...all));
  const hi = f(Math.max(...all));
  const W = 300;
  const x = (v: number) => (hi > lo ? 6 + ((f(v) - lo) / (hi - lo)) * (W - 12) : W / 2);
  const rank = context.rankFromTop;
  const label =
    `Where this claim sits among ${context.n} amounts of ${context.against}: ` +
    (rank !== null ? `${rank === 1 ? 'the largest' : `the ${ordinal(rank)} largest`}. ` : '') +
    `Amounts run from ${fmt(pts[0])} to ${fmt(pts[pts.length - 1])}` +
    (context.centre !== null ? `, ${context.centreName} ${fmt(context.centre)}` : '') +
    '.';
  return (
    <svg className={s.strip} viewBox={`0 0 ${W} 34`} preserveAspectRatio="none" role="img" aria-label={label} data-testid="strip">
      <line className={s.stripAxis} x1={4} x2={W - 4} y1={17} y2={17} />
      {pts.map((v, i) => (
        <line key={i} className={s.stripAxis} x1={x(v)} x2={x(v)} y1={11} y2={23} style={{ stroke: 'currentColor', opacity: 0.45 }} />
      ))}
      {context.centre !== null && <line className={s.stripCentre} x1={x(context.centre)} x2={x(context.centre)} y1={6} y2={28} />}
      {context.lower !== null && <line className={s.stripBound} x1={x(context.lower)} x2={x(context.lower)} y1={2} y2={32} />}
      {context.upper !== null && <line className={s.stripBound} x1={x(context.upper)} x2={x(context.upper)} y1={2} y2={32} />}
      <rect className={s.stripClaim} x={x(context.value) - 2.5} y={1} width={5} height={32} />
    </svg>
  );
}

function ClaimCard({
  model,
  e,
  row,
  claim,
  context,
  detail,
}: {
  model: PaneModel;
  e: Exception | null;
  row: number;
  claim: ClaimRecord | null;
  context: ClaimContext | null;
  detail: readonly string[];
}) {
  const s = usePaneStyles();
  const saved = model.state.saved;
  const reason = context?.reason ?? claim?.reasons.find((r) => r.text !== '')?.text ?? '';
  const fields = claim ? claim.fields.filter((f) => detail.includes(f.header)) : [];
  return (
    <div className={s.card} data-testid="claim-card" aria-labelledby="tm-claim-title">
      <Text id="tm-claim-title" weight="semibold" data-testid="current-claim">
        {claimName(e, row)} · {e ? statusWithSymbol(e.status) : 'not an exception'}
      </Text>
      <Text className={s.small}>
        {context?.column ?? saved?.valueColumns[0] ?? 'Amount'} <strong>{fmt(context?.value ?? e?.value ?? null)}</strong> · score{' '}
        <strong data-testid="claim-score">{fmt(context?.score ?? e?.score ?? null)}</strong>
        {saved ? ` (cutoff ${saved.cutoff})` : ''}
      </Text>
      {reason !== '' && (
        <Text block className={s.small} data-testid="claim-reason">
          {reason}
        </Text>
      )}
      {context && (
        <>
          <dl className={s.fields} data-testid="claim-group">
            <dt>Compared with</dt>
            <dd>
              {context.against} ({context.n} amounts)
            </dd>
            <dt>Centre</dt>
            <dd>
              {context.centreName} {fmt(context.centre)}
            </dd>
            <dt>Spread</dt>
            <dd>
              {context.spreadName} {fmt(context.spread)}
            </dd>
            <dt>Usual range</dt>
            <dd>
              {context.lower === null ? 'no lower bound' : fmt(context.lower)} to {context.upper === null ? 'no upper bound' : fmt(context.upper)}
            </dd>
            {context.rankFromTop !== null && (
              <>
                <dt>Rank</dt>
                <dd>
                  {context.rankFromTop === 1 ? 'largest' : `${ordinal(context.rankFromTop)} largest`} of {context.n}
                </dd>
              </>
            )}
          </dl>
          <Strip context={context} log={saved?.logScale ?? false} />
          <Text className={s.muted}>Ticks: the group's amounts · bar: this claim · dashed: the bounds · solid: the {context.centreName}.</Text>
        </>
      )}
      {fields.length > 0 && (
        <dl className={s.fields} data-testid="claim-fields">
          {fields.map((f) => (
            <div key={f.header} style={{ display: 'contents' }}>
              <dt>{f.header}</dt>
              <dd>{f.text === '' ? '—' : f.text}</dd>
            </div>
          ))}
        </dl>
      )}
      {!claim && <Text className={s.muted}>Reading the claim…</Text>}
    </div>
  );
}

function ReviewerField({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { prefs } = model.state;
  const [editing, setEditing] = useState(false);
  const [text, setText] = useState(prefs.reviewer ?? '');
  if (prefs.reviewer !== null && !editing) {
    return (
      <div className={s.row}>
        <Text className={s.small} data-testid="reviewer">
          Marks are recorded as <strong>{prefs.reviewer}</strong>.
        </Text>
        <Button
          size="small"
          appearance="subtle"
          onClick={() => {
            setText(prefs.reviewer ?? '');
            setEditing(true);
          }}
        >
          Change
        </Button>
      </div>
    );
  }
  const save = () => {
    model.actions.setPrefs({ ...prefs, reviewer: text.trim() === '' ? null : text.trim() });
    setEditing(false);
  };
  return (
    <div className={s.row}>
      <Field
        className={s.grow}
        label="Your initials or name"
        hint="Recorded with each status you set, in this workbook. Office does not tell add-ins who you are, so type it once here."
      >
        <Input
          value={text}
          maxLength={60}
          onChange={(_, d) => setText(d.value)}
          onKeyDown={(ev) => {
            if (ev.key === 'Enter') save();
          }}
          data-testid="reviewer-input"
        />
      </Field>
      <Button onClick={save} data-testid="reviewer-save">
        Keep
      </Button>
    </div>
  );
}

function ColumnChooser({ model, columns, chosen }: { model: PaneModel; columns: readonly string[]; chosen: readonly string[] }) {
  const s = usePaneStyles();
  const [open, setOpen] = useState(false);
  const { prefs } = model.state;
  return (
    <div>
      <Button size="small" appearance="subtle" aria-expanded={open} onClick={() => setOpen(!open)} data-testid="choose-columns">
        {open ? 'Done choosing columns' : `Columns shown with each claim (${chosen.length})…`}
      </Button>
      {open && (
        <fieldset className={s.fieldset}>
          <legend className={s.legend}>Show with each claim (kept in this workbook)</legend>
          {columns.map((c) => (
            <Checkbox
              key={c}
              label={c}
              checked={chosen.includes(c)}
              onChange={(_, d) => {
                const next = d.checked === true ? [...chosen, c] : chosen.filter((x) => x !== c);
                model.actions.setPrefs({ ...prefs, detailColumns: columns.filter((x) => next.includes(x)) });
              }}
            />
          ))}
        </fieldset>
      )}
    </div>
  );
}

/** (e) The follow-up view: one claim at a time with why, its peers and its fields; mark and move on. */
export function ReviewSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions, view, context } = model;
  const list = state.exceptions;
  if (!state.table?.hasResults && list.length === 0) return null;
  const counts = reviewCounts(list, DONE_LABELS);
  const row = state.currentRow;
  const e = row === null ? null : (list.find((x) => x.row === row) ?? null);
  const pos = row === null ? -1 : view.findIndex((x) => x.row === row);
  const targets = rowsToMark(state);
  const statusKnown = REVIEW_STATUSES.some((r) => r.label === state.statusDraft);
  const busy = state.busy !== null;
  const saved = state.saved;
  const known = new Set([...(saved?.valueColumns ?? []), ...(saved?.groupColumns ?? []), ...(saved?.idColumn ? [saved.idColumn] : [])]);
  const allColumns = state.claim ? state.claim.fields.map((f) => f.header) : [];
  const detail = state.prefs.detailColumns ?? allColumns.filter((h) => !known.has(h)).slice(0, DEFAULT_DETAIL_COLUMNS);
  const onKey = (ev: KeyboardEvent) => {
    if (ev.key === 'Enter' && !ev.shiftKey && !ev.altKey && !ev.ctrlKey && !ev.metaKey) {
      ev.preventDefault();
      actions.saveAndNext();
    }
  };
  const pendingName = state.pending ? claimName(e, row ?? 0) : '';
  return (
    <Fold model={model} area="review" title="5. Follow up" summary={`${counts.open} open · ${counts.done} done`}>
      <Text data-testid="review-counts">
        <strong data-testid="open-count">{counts.open}</strong> open · <strong data-testid="done-count">{counts.done}</strong> done · {list.length}{' '}
        exceptions
      </Text>
      <p className={s.caution} data-testid="review-caution">
        {CAUTION}
      </p>
      <ReviewerField model={model} />
      {list.length === 0 && row === null ? (
        <Text className={s.muted}>No exceptions at this cutoff.</Text>
      ) : (
        <>
          <div className={s.row}>
            <Field label="Order" className={s.grow}>
              <Select value={state.order} onChange={(_, d) => actions.setOrder(d.value as ReviewOrder)} data-testid="order">
                {(Object.keys(ORDER_WORDS) as ReviewOrder[]).map((o) => (
                  <option key={o} value={o}>
                    {ORDER_WORDS[o]}
                  </option>
                ))}
              </Select>
            </Field>
            <Field label="Show" className={s.grow}>
              <Select value={state.filter} onChange={(_, d) => actions.setFilter(d.value as ReviewFilter)} data-testid="filter">
                {FILTER_WORDS.map((f) => (
                  <option key={f.id} value={f.id}>
                    {f.label}
                  </option>
                ))}
              </Select>
            </Field>
          </div>
          <div className={s.row}>
            <Button onClick={() => actions.move(-1)} data-testid="prev" aria-label="Previous claim in the list" disabled={view.length === 0}>
              ‹ Previous
            </Button>
            <Text className={s.grow} style={{ textAlign: 'center' }} data-testid="position">
              {pos >= 0 ? `${pos + 1} / ${view.length}` : `– / ${view.length}`}
            </Text>
            <Button onClick={() => actions.move(1)} data-testid="next" aria-label="Next claim in the list" disabled={view.length === 0}>
              Next ›
            </Button>
          </div>
          {row !== null && <ClaimCard model={model} e={e} row={row} claim={state.claim} context={context} detail={detail} />}
          {row !== null && allColumns.length > 0 && <ColumnChooser model={model} columns={allColumns} chosen={detail} />}
          {state.pending && (
            <div className={s.pending} role="alertdialog" aria-labelledby="tm-pending-t" data-testid="pending">
              <Text id="tm-pending-t" weight="semibold">
                The status or note of {pendingName} is not saved.
              </Text>
              <div className={s.row}>
                <Button appearance="primary" onClick={() => actions.resolvePending('save')} data-testid="pending-save" disabled={busy}>
                  Save and go on
                </Button>
                <Button onClick={() => actions.resolvePending('discard')} data-testid="pending-discard">
                  Discard changes
                </Button>
                <Button appearance="subtle" onClick={() => actions.resolvePending('stay')} data-testid="pending-stay">
                  Stay here
                </Button>
              </div>
            </div>
          )}
          <Field label="Status">
            <Select
              value={statusKnown ? state.statusDraft : ''}
              onChange={(_, d) => actions.setDrafts({ status: d.value })}
              onKeyDown={onKey}
              data-testid="status"
            >
              <option value="" disabled>
                Choose…
              </option>
              {REVIEW_STATUSES.map((r) => (
                <option key={r.id} value={r.label} title={r.meaning}>
                  {STATUS_SYMBOLS[r.id]} {r.label}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Note" hint="Enter saves and shows the next claim; Shift+Enter starts a new line. Stored in the sheet as text.">
            <Textarea
              value={state.noteDraft}
              onChange={(_, d) => actions.setDrafts({ note: d.value })}
              onKeyDown={onKey}
              resize="vertical"
              data-testid="note"
            />
          </Field>
          {state.draftDirty && (
            <Text className={s.small} data-testid="unsaved">
              Not saved yet.
            </Text>
          )}
          <div className={s.row}>
            <Button appearance="primary" onClick={actions.saveAndNext} disabled={busy || row === null} data-testid="save-next">
              Save and next
            </Button>
            <Button onClick={actions.saveMark} disabled={busy || targets.length === 0} data-testid="save-mark">
              {targets.length > 1 ? `Save for ${targets.length} ticked claims` : 'Save'}
            </Button>
          </div>
          <ul className={s.list} aria-label="Exceptions in this list" data-testid="review-list">
            {view.slice(0, LIST_LIMIT).map((x) => (
              <li key={x.row} className={`${s.listItem} ${x.row === row ? s.current : ''}`}>
                <Checkbox
                  checked={state.checked.includes(x.row)}
                  onChange={(_, d) => actions.check(x.row, d.checked === true)}
                  aria-label={`Tick ${claimName(x, x.row)}`}
                />
                <Button
                  appearance="transparent"
                  size="small"
                  onClick={() => actions.goToRow(x.row)}
                  aria-current={x.row === row ? 'true' : undefined}
                  style={{ justifyContent: 'flex-start', minWidth: 0, flexGrow: 1, textAlign: 'left' }}
                >
                  {claimName(x, x.row)} · {fmt(x.value)} · score {fmt(x.score, 1)} · {statusWithSymbol(x.status)}
                </Button>
              </li>
            ))}
          </ul>
          {view.length > LIST_LIMIT && <Text className={s.muted}>Showing the first {LIST_LIMIT}; use Next to reach the rest.</Text>}
        </>
      )}
    </Fold>
  );
}
