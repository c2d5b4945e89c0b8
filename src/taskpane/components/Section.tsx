import { Button, MessageBar, MessageBarActions, MessageBarBody, MessageBarTitle } from '@fluentui/react-components';
import type { ReactNode } from 'react';
import { errorText } from '../messages.js';
import type { Area } from '../state.js';
import type { PaneModel } from '../usePaneState.js';
import { usePaneStyles } from './styles.js';

/**
 * The message of one section, shown beside the controls that caused it. The live region is always
 * in the page (empty when there is nothing to say), so screen readers announce what appears in it.
 */
export function AreaMessage({ model, area }: { model: PaneModel; area: Area }) {
  const { state, actions } = model;
  const error = state.error && (state.error.area ?? 'table') === area ? state.error : null;
  const notice = !error && state.notice && state.notice.area === area ? state.notice : null;
  const t = error ? errorText(error) : null;
  return (
    <div aria-live={error ? 'assertive' : 'polite'} data-testid={`message-${area}`}>
      {t && (
        <MessageBar intent="warning" layout="multiline" data-testid="error" role="alert">
          <MessageBarBody>
            <MessageBarTitle>{t.title}</MessageBarTitle> {t.message} {t.next}
          </MessageBarBody>
          <MessageBarActions>
            <Button size="small" onClick={actions.dismiss}>
              OK
            </Button>
          </MessageBarActions>
        </MessageBar>
      )}
      {notice && (
        <MessageBar intent="info" layout="multiline" data-testid="notice">
          <MessageBarBody>{notice.text}</MessageBarBody>
          <MessageBarActions>
            <Button size="small" onClick={actions.dismiss}>
              OK
            </Button>
          </MessageBarActions>
        </MessageBar>
      )}
    </div>
  );
}

/**
 * A section of the pane that folds: its heading is a button (aria-expanded) so a long pane can be
 * reduced to the part in use. `extra` sits on the heading line (e.g. "Use selection"); `summary`
 * says in a few words what the folded section holds.
 */
export function Fold({
  model,
  area,
  title,
  extra,
  summary,
  children,
}: {
  model: PaneModel;
  area: Area;
  title: string;
  extra?: ReactNode;
  summary?: string;
  children: ReactNode;
}) {
  const s = usePaneStyles();
  const folded = model.state.folded.includes(area);
  const id = `tm-${area}`;
  return (
    <section className={s.section} aria-labelledby={`${id}-h`} data-testid={`section-${area}`}>
      <div className={s.row}>
        <h2 id={`${id}-h`} className={`${s.heading} ${s.grow}`}>
          <button
            type="button"
            className={s.foldButton}
            aria-expanded={!folded}
            aria-controls={`${id}-body`}
            onClick={() => model.actions.fold(area, !folded)}
            data-testid={`fold-${area}`}
          >
            <span aria-hidden="true" className={s.chevron}>
              {folded ? '▸' : '▾'}
            </span>
            {title}
          </button>
        </h2>
        {extra}
      </div>
      {folded && summary && <span className={s.muted}>{summary}</span>}
      <AreaMessage model={model} area={area} />
      <div id={`${id}-body`} hidden={folded} className={s.body}>
        {children}
      </div>
    </section>
  );
}
