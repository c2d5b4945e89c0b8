import {
  Button,
  Checkbox,
  Dialog,
  DialogActions,
  DialogBody,
  DialogContent,
  DialogSurface,
  DialogTitle,
  Text,
} from '@fluentui/react-components';
import { useState } from 'react';
import { labelOf } from '../state.js';
import type { PaneModel } from '../usePaneState.js';
import { Fold } from './Section.js';
import { usePaneStyles } from './styles.js';

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** (f) Remove what Tailmark added; says what the reviewer's marks become and offers to keep them. */
export function ManageSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions } = model;
  const [withNotes, setWithNotes] = useState(false);
  const [keepMarks, setKeepMarks] = useState(true);
  /** What "keep a copy" did (shown in the dialog, announced), and whether it is at work. */
  const [kept, setKept] = useState<{ busy: boolean; text: string }>({ busy: false, text: '' });
  const keepCopy = (to: 'csv' | 'sheet') => {
    setKept({ busy: true, text: '' });
    void actions.exportMarks(to).then((text) => setKept({ busy: false, text }));
  };
  if (!state.table?.hasResults) {
    // After a removal its message stays readable here.
    return state.notice?.area === 'manage' ? (
      <Fold model={model} area="manage" title="6. Tidy up">
        {null}
      </Fold>
    ) : null;
  }
  const open = labelOf('open');
  const statuses = state.exceptions.filter((e) => e.status !== '' && e.status !== open).length;
  const notes = state.exceptions.filter((e) => e.note !== '').length;
  const marks = statuses + notes;
  return (
    <Fold model={model} area="manage" title="6. Tidy up">
      <Text className={s.small}>Take Tailmark's columns and highlighting out of the sheet. Your claim data stays as it is.</Text>
      <div className={s.row}>
        <Button appearance="secondary" onClick={() => actions.askRemove(true)} disabled={state.busy !== null} data-testid="remove">
          Remove results…
        </Button>
      </div>
      <Dialog open={state.confirmRemove} onOpenChange={(_, d) => actions.askRemove(d.open)} modalType="alert">
        <DialogSurface aria-describedby="tm-remove-d">
          <DialogBody>
            <DialogTitle>Remove Tailmark's results?</DialogTitle>
            <DialogContent id="tm-remove-d">
              <Text block>
                This takes out the score, flag and reason columns and the highlighting.{' '}
                <span data-testid="remove-counts">
                  {marks === 0
                    ? 'No claim has a status other than the default or a note yet.'
                    : `${plural(statuses, 'claim has a status', 'claims have a status')} and ${plural(notes, 'claim has a note', 'claims have a note')} that you set.`}
                </span>
              </Text>
              {marks > 0 && (
                <div className={s.section} data-testid="keep-copy">
                  <Text block className={s.small}>
                    Keep a copy of them first (claim, status, note, who saved it and when):
                  </Text>
                  <div className={s.row}>
                    <Button size="small" onClick={() => keepCopy('sheet')} disabled={kept.busy} data-testid="export-marks-sheet">
                      Copy to a new sheet
                    </Button>
                    <Button size="small" onClick={() => keepCopy('csv')} disabled={kept.busy} data-testid="export-marks-csv">
                      Save as CSV file
                    </Button>
                  </div>
                  <Text block className={s.small} aria-live="polite" data-testid="export-marks-result">
                    {kept.text}
                  </Text>
                </div>
              )}
              <Checkbox
                label={`Keep the status and note columns as plain cells${marks > 0 ? ` (${plural(marks, 'mark')} stay)` : ''}; a later run picks them up again`}
                checked={keepMarks}
                onChange={(_, d) => setKeepMarks(d.checked === true)}
                data-testid="remove-keep"
              />
              {!keepMarks && marks > 0 && (
                <Text block className={s.small} data-testid="remove-warning">
                  The statuses and notes will be deleted. Keep a copy first (above) if you may need them.
                </Text>
              )}
              <Checkbox
                label="Also clear the notes and log sheets (the record of cutoffs and runs is lost; the empty sheets stay)"
                checked={withNotes}
                onChange={(_, d) => setWithNotes(d.checked === true)}
                data-testid="remove-notes"
              />
            </DialogContent>
            <DialogActions>
              <Button appearance="primary" onClick={() => actions.askRemove(false)} data-testid="cancel-remove">
                Keep everything
              </Button>
              <Button onClick={() => actions.remove(withNotes, keepMarks)} data-testid="confirm-remove">
                Remove
              </Button>
            </DialogActions>
          </DialogBody>
        </DialogSurface>
      </Dialog>
    </Fold>
  );
}
