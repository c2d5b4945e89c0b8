/**
 * What the pane does when the reviewer moves the selection in the sheet. After a run it asks the
 * layer only for the selected claim and the rows whose marks may have been edited in the sheet
 * (the claim it showed): 2 syncs and one row's cells each, whatever the sheet's size. Everything
 * else the follow-up view shows (the list, the claim's peer-group context) stays in memory from
 * the run and the pane's own read. Only a selection outside the last run's block (another table,
 * another sheet) makes the pane detect the table again.
 */
import type { WorkbookLayer } from '../workbook/api.js';
import type { Action, PaneState } from './state.js';

/** The pane's actions for a selection change, or 'detect' when the table must be detected anew. */
export async function selectionActions(layer: WorkbookLayer, state: PaneState): Promise<readonly Action[] | 'detect'> {
  if (state.table?.hasResults !== true) return 'detect';
  const follow = await layer.followSelection(state.currentRow === null ? [] : [state.currentRow]);
  if (!follow.inResults) return 'detect';
  const actions: Action[] = [{ type: 'exception-rows', rows: follow.rows }];
  if (follow.row !== null) actions.push({ type: 'goto', row: follow.row, fromSheet: true, claim: follow.claim });
  return actions;
}
