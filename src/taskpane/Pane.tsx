import { Button, MessageBar, MessageBarActions, MessageBarBody, MessageBarTitle, Text } from '@fluentui/react-components';
import type { WorkbookLayer } from '../workbook/api.js';
import { ChartSection } from './components/ChartSection.js';
import { ManageSection } from './components/ManageSection.js';
import { MethodSection } from './components/MethodSection.js';
import { ReviewSection } from './components/ReviewSection.js';
import { RunSection } from './components/RunSection.js';
import { usePaneStyles } from './components/styles.js';
import { TableSection } from './components/TableSection.js';
import { errorText } from './messages.js';
import { usePaneState, type PaneModel } from './usePaneState.js';

function Messages({ model }: { model: PaneModel }) {
  const { state, actions } = model;
  if (state.error) {
    const t = errorText(state.error);
    return (
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
    );
  }
  if (state.notice) {
    return (
      <MessageBar intent="info" layout="multiline" data-testid="notice">
        <MessageBarBody>{state.notice}</MessageBarBody>
        <MessageBarActions>
          <Button size="small" onClick={actions.dismiss}>
            OK
          </Button>
        </MessageBarActions>
      </MessageBar>
    );
  }
  return null;
}

/** The pane's screens, rendered from the model only. */
export function PaneView({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  return (
    <main className={s.root} aria-label="Tailmark" data-testid="pane" aria-busy={model.state.busy !== null}>
      <header>
        <h1 className={s.heading} style={{ fontSize: 'inherit' }}>
          <Text size={500} weight="semibold">
            Tailmark
          </Text>
        </h1>
        <Text className={s.muted}>Find claims that are unusual for their peer group, and follow them up in place.</Text>
      </header>
      <Messages model={model} />
      <TableSection model={model} />
      <MethodSection model={model} />
      <ChartSection model={model} />
      <RunSection model={model} />
      <ReviewSection model={model} />
      <ManageSection model={model} />
    </main>
  );
}

/** The task pane, given a workbook layer (real Excel or the sandbox). */
export function TailmarkPane({ layer }: { layer: WorkbookLayer }) {
  const model = usePaneState(layer);
  return <PaneView model={model} />;
}
