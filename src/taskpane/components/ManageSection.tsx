import {
  Button,
  Checkbox,
  Dialog,
  DialogActions,
  DialogBody,
  DialogContent,
  DialogSurface,
  DialogTitle,
} from '@fluentui/react-components';
import { useState } from 'react';
import type { PaneModel } from '../usePaneState.js';
import { usePaneStyles } from './styles.js';

/** (f) Remove what Tailmark added, with a confirm before the notes sheet goes. */
export function ManageSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions } = model;
  const [withNotes, setWithNotes] = useState(false);
  if (!state.table?.hasResults) return null;
  return (
    <section className={s.section} aria-labelledby="tm-manage-h">
      <h2 id="tm-manage-h" className={s.heading}>
        6. Tidy up
      </h2>
      <Button onClick={() => actions.askRemove(true)} disabled={state.busy !== null} data-testid="remove">
        Remove results…
      </Button>
      <Dialog open={state.confirmRemove} onOpenChange={(_, d) => actions.askRemove(d.open)} modalType="alert">
        <DialogSurface aria-describedby="tm-remove-d">
          <DialogBody>
            <DialogTitle>Remove Tailmark results?</DialogTitle>
            <DialogContent id="tm-remove-d">
              This removes the score, flag, reason, status and note columns and our highlighting. Your own cells stay as they are.
              <Checkbox
                label="Also delete the notes sheet (its record of cutoffs and runs is lost)"
                checked={withNotes}
                onChange={(_, d) => setWithNotes(d.checked === true)}
                data-testid="remove-notes"
              />
            </DialogContent>
            <DialogActions>
              <Button appearance="primary" onClick={() => actions.remove(withNotes)} data-testid="confirm-remove">
                Remove
              </Button>
              <Button onClick={() => actions.askRemove(false)}>Keep</Button>
            </DialogActions>
          </DialogBody>
        </DialogSurface>
      </Dialog>
    </section>
  );
}
