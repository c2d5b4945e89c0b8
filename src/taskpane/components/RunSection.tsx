import { Button, Field, ProgressBar, Text } from '@fluentui/react-components';
import { CAUTION } from '../../report/style.js';
import type { RunProgress } from '../../workbook/api.js';
import type { PaneModel } from '../usePaneState.js';
import { usePaneStyles } from './styles.js';
import { GroupCountTable } from './GroupCountTable.js';
import { Fold } from './Section.js';

/** Peer groups listed in the run summary before "show all" (most flagged, and every unreachable one). */
export const SUMMARY_GROUPS = 8;

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
  const differs = !!state.saved && !!state.settings && JSON.stringify(state.saved) !== JSON.stringify(state.settings);
  const groups = summary
    ? [...summary.groups].filter((g) => g.flagged > 0 || g.cutoffUnreachable).sort((a, b) => b.flagged - a.flagged || b.n - a.n)
    : [];
  const shown = state.allGroups ? groups : groups.filter((g, i) => i < SUMMARY_GROUPS || g.cutoffUnreachable);
  const marksOutside = summary ? state.exceptions.length - summary.flagged : 0;
  return (
    <Fold model={model} area="run" title="4. Run" summary={summary ? `${summary.flagged} flagged of ${summary.rowsScored.toLocaleString('en')}` : undefined}>
      <div className={s.row}>
        <Button appearance="primary" onClick={actions.run} disabled={!canRun} data-testid="run">
          {state.table?.hasResults ? 'Run with these settings' : 'Run'}
        </Button>
        {state.saved && differs && (
          <Button onClick={actions.rerunSaved} disabled={!state.table || state.busy !== null} data-testid="rerun-saved">
            Run with the last saved settings
          </Button>
        )}
      </div>
      {state.saved && differs && (
        <Text className={s.small} data-testid="rerun-hint">
          Your choices above differ from the ones saved with the last run (cutoff {state.saved.cutoff}). The second button ignores the changes.
        </Text>
      )}
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
          <Caution />
          {marksOutside > 0 && (
            <Text block className={s.small} data-testid="marks-outside">
              The follow-up list also holds {marksOutside} claim{marksOutside === 1 ? '' : 's'} you marked earlier that this cutoff no longer flags; their
              statuses and notes are kept.
            </Text>
          )}
          <Text block className={s.small}>
            Explanations, the cutoff and the terms used are on the sheet “{summary.notesSheet}”.
          </Text>
          <GroupCountTable
            caption="Flagged claims per peer group"
            testId="summary-groups"
            rows={shown.map((g) => ({ label: g.label, n: g.n, flagged: g.flagged, remark: g.cutoffUnreachable ? ' (cutoff out of reach)' : undefined }))}
          />
          {groups.length > shown.length && (
            <Button size="small" appearance="subtle" onClick={() => actions.showAllGroups(true)} data-testid="show-all-groups">
              Show all {groups.length} groups with flags
            </Button>
          )}
          {state.allGroups && groups.length > SUMMARY_GROUPS && (
            <Button size="small" appearance="subtle" onClick={() => actions.showAllGroups(false)}>
              Show only the groups with most flags
            </Button>
          )}
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
        </div>
      )}
    </Fold>
  );
}
