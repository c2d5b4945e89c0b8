import { Button, Checkbox, Field, Select, Text } from '@fluentui/react-components';
import type { DetectedColumn } from '../../workbook/api.js';
import type { PaneModel } from '../usePaneState.js';
import { groupCandidates, valueCandidates } from '../state.js';
import { Fold } from './Section.js';
import { usePaneStyles } from './styles.js';

const GUESS_WORDS: Record<DetectedColumn['guess'], string> = {
  amount: 'amounts',
  key: 'grouping key',
  id: 'claim id',
  date: 'dates',
  text: 'text',
  empty: 'empty',
};

function toggle(list: readonly string[], item: string, on: boolean): string[] {
  const rest = list.filter((x) => x !== item);
  return on ? [...rest, item] : rest;
}

/** (a) The detected table and the reviewer's column choices. */
export function TableSection({ model }: { model: PaneModel }) {
  const s = usePaneStyles();
  const { state, actions } = model;
  const { table, settings } = state;
  return (
    <Fold
      model={model}
      area="table"
      title="1. Your claims"
      summary={table ? `${table.tableName ?? table.sheetName} · ${table.rowCount.toLocaleString('en')} claim rows` : undefined}
      extra={
        <Button size="small" onClick={actions.refresh} disabled={state.busy === 'running'} data-testid="use-selection">
          Use selection
        </Button>
      }
    >
      {!table && state.busy === 'detecting' && <Text className={s.muted}>Reading the selection…</Text>}
      {!table && state.busy !== 'detecting' && (
        <Text className={s.muted}>Select a cell inside your claims table, then press “Use selection”.</Text>
      )}
      {table && settings && (
        <>
          <Text data-testid="table-info">
            <strong>{table.tableName ?? table.sheetName}</strong> · {table.address} ·{' '}
            <span data-testid="row-count">{table.rowCount.toLocaleString('en')}</span> claim rows
            {table.hasResults ? ' · has earlier results' : ''}
          </Text>
          <div className={s.headers} aria-label="Header row">
            {table.columns.map((c) => (
              <span key={c.index} className={s.chip} title={`${c.header}: looks like ${GUESS_WORDS[c.guess]}`}>
                {c.header || `(column ${c.index + 1})`} <span className={s.muted}>· {GUESS_WORDS[c.guess]}</span>
              </span>
            ))}
          </div>
          <fieldset className={s.fieldset}>
            <legend className={s.legend}>Amounts to check</legend>
            {valueCandidates(table).map((c) => (
              <Checkbox
                key={c.index}
                label={`${c.header} (${Math.round(c.numericShare * 100)}% numbers)`}
                checked={settings.valueColumns.includes(c.header)}
                onChange={(_, d) => actions.setSettings({ valueColumns: toggle(settings.valueColumns, c.header, d.checked === true) })}
              />
            ))}
            {valueCandidates(table).length === 0 && <Text className={s.muted}>No column holds numbers.</Text>}
          </fieldset>
          <fieldset className={s.fieldset}>
            <legend className={s.legend}>Compare within (peer group)</legend>
            {groupCandidates(table, settings.groupColumns)
              .filter((c) => !settings.valueColumns.includes(c.header))
              .map((c) => (
                <Checkbox
                  key={c.index}
                  label={`${c.header} (${c.distinct.toLocaleString('en')} values)`}
                  checked={settings.groupColumns.includes(c.header)}
                  onChange={(_, d) => actions.setSettings({ groupColumns: toggle(settings.groupColumns, c.header, d.checked === true) })}
                />
              ))}
            <Text className={s.muted}>None ticked: every claim is compared with the whole column.</Text>
          </fieldset>
          <Field label="Claim id column (optional)">
            <Select
              value={settings.idColumn ?? ''}
              onChange={(_, d) => actions.setSettings({ idColumn: d.value === '' ? null : d.value })}
            >
              <option value="">(none)</option>
              {table.columns.map((c) => (
                <option key={c.index} value={c.header}>
                  {c.header}
                </option>
              ))}
            </Select>
          </Field>
        </>
      )}
    </Fold>
  );
}
