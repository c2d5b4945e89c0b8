import { usePaneStyles } from './styles.js';

export interface GroupCountRow {
  readonly label: string;
  readonly n: number;
  readonly flagged: number;
  /** Shown after the label, e.g. " (cutoff out of reach)". */
  readonly remark?: string;
}

/** Peer group / claims / flagged: the table the cutoff preview and the run summary both show. */
export function GroupCountTable({ caption, rows, testId }: { caption: string; rows: readonly GroupCountRow[]; testId?: string }) {
  const s = usePaneStyles();
  return (
    <table className={s.table} data-testid={testId}>
      <caption className={s.visuallyHidden}>{caption}</caption>
      <thead>
        <tr>
          <th scope="col">Peer group</th>
          <th scope="col" className="num">
            Claims
          </th>
          <th scope="col" className="num">
            Flagged
          </th>
        </tr>
      </thead>
      <tbody>
        {rows.map((g) => (
          <tr key={g.label}>
            <td>
              {g.label}
              {g.remark ?? ''}
            </td>
            <td className="num">{g.n}</td>
            <td className="num">{g.flagged}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
