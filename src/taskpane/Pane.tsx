import { Text } from '@fluentui/react-components';
import type { ReactNode } from 'react';
import type { WorkbookLayer } from '../workbook/api.js';
import { ChartSection } from './components/ChartSection.js';
import { ManageSection } from './components/ManageSection.js';
import { MethodSection } from './components/MethodSection.js';
import { ReviewSection } from './components/ReviewSection.js';
import { RunSection } from './components/RunSection.js';
import { usePaneStyles } from './components/styles.js';
import { TableSection } from './components/TableSection.js';
import { usePaneState, type PaneModel } from './usePaneState.js';

/** The pane's screens, rendered from the model only. */
export function PaneView({ model, fileChoices }: { model: PaneModel; fileChoices?: ReactNode }) {
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
      <TableSection model={model} />
      <MethodSection model={model} fileChoices={fileChoices} />
      <ChartSection model={model} />
      <RunSection model={model} />
      <ReviewSection model={model} />
      <ManageSection model={model} />
    </main>
  );
}

/**
 * The task pane, given a workbook layer (real Excel or the sandbox). `fileChoices`: controls for
 * how a file was read (the preview page's opened .csv), shown beside the decimal separator.
 */
export function TailmarkPane({ layer, fileChoices }: { layer: WorkbookLayer; fileChoices?: ReactNode }) {
  const model = usePaneState(layer);
  return <PaneView model={model} fileChoices={fileChoices} />;
}
