import { Button, Field, ProgressBar, Text } from '@fluentui/react-components';
import { CAUTION } from '../../report/style.js';
import type { RunProgress } from '../../workbook/api.js';
import type { PaneModel } from '../usePaneState.js';
import { usePaneStyles } from './styles.js';
import { GroupCountTable } from './GroupCountTable.js';

const PHASE_WORDS: Record<RunProgress['phase'], string> = {
  reading: 'Reading the claims',
  scoring: 'Scoring',
  writing: 'Writing result columns',
  highlighting: 'Adding highlighting',
  notes: 'Writing the notes sheet',
};

export function Caution() {
  const s = usePaneStyles();
  return (
    <p className={s.caution} data-testid="caution">
      {CAUTION}
    </p>
  );
}

/** (d) Run, progress with Cancel, and the run summary. */
export function RunSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions } = model;
  const running = state.busy === 'running';
  const canRun = !!state.table && !!state.settings && state.settings.valueColumns.length > 0 && state.busy === null;
  const summary = state.summary;
  return (
    <section className={s.section} aria-labelledby="tm-run-h">
      <h2 id="tm-run-h" className={s.heading}>
        4. Run
      </h2>
      <div className={s.row}>
        <Button appearance="primary" onClick={actions.run} disabled={!canRun} data-testid="run">
          {state.table?.hasResults ? 'Run again' : 'Run'}
        </Button>
        {state.saved && (
          <Button onClick={actions.rerunSaved} disabled={!state.table || state.busy !== null} data-testid="rerun-saved">
            Re-run with saved settings
          </Button>
        )}
      </div>
      {running && (
        <div aria-live="polite">
          {state.showProgress && (
            <Field
              validationMessage={state.progress ? `${PHASE_WORDS[state.progress.phase]}…` : 'Starting…'}
              validationState="none"
              label="Progress"
            >
              <ProgressBar value={state.progress?.fraction ?? undefined} max={1} data-testid="progress" />
            </Field>
          )}
          <Button onClick={actions.cancel} data-testid="cancel">
            Cancel
          </Button>
        </div>
      )}
      {summary && (
        <div aria-live="polite" data-testid="summary">
          <Text block className={s.big}>
            <span data-testid="summary-flagged">{summary.flagged}</span> flagged of {summary.rowsScored.toLocaleString('en')} scored
          </Text>
          <Text block className={s.small}>
            Explanations and the cutoff are on the sheet “{summary.notesSheet}”.
          </Text>
          <GroupCountTable
            caption="Flagged claims per peer group"
            rows={summary.groups
              .filter((g) => g.flagged > 0 || g.cutoffUnreachable)
              .map((g) => ({ label: g.label, n: g.n, flagged: g.flagged, remark: g.cutoffUnreachable ? ' (cutoff out of reach)' : undefined }))}
          />
          {summary.excluded.some((e) => e.count > 0) && (
            <>
              <Text block className={s.small}>
                Cells left out:
              </Text>
              <ul className={s.small} data-testid="excluded">
                {summary.excluded
                  .filter((e) => e.count > 0)
                  .map((e) => (
                    <li key={e.reason}>
                      {e.count} × {e.reason}
                    </li>
                  ))}
              </ul>
            </>
          )}
          {summary.groups.some((g) => g.cutoffUnreachable) && (
            <Text block className={s.small} data-testid="unreachable">
              Cutoff out of reach (group too small for classic z to get there):{' '}
              {summary.groups
                .filter((g) => g.cutoffUnreachable)
                .map((g) => g.label)
                .join('; ')}
              .
            </Text>
          )}
          <Caution />
        </div>
      )}
    </section>
  );
}
