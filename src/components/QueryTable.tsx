// A list loaded by TanStack Query shown as a table: loading, error (with retry), an empty line, or the table with
// its column headings (the caller draws the rows). Used by the workflow lists, the observatories and the fits.
import type { ReactNode } from 'react';
import type { UseQueryResult } from '@tanstack/react-query';
import { ErrorState, LoadingState } from './ui';

export function QueryTable<T>({
  list,
  loadingLabel,
  errorTitle,
  empty,
  tableClassName,
  testId,
  columns,
  row,
}: {
  list: UseQueryResult<T[]>;
  /** e.g. "Loading fits…" */
  loadingLabel: string;
  errorTitle?: string;
  /** What an empty list says, e.g. "No fit yet." */
  empty: ReactNode;
  /** The table's minimum width, e.g. "min-w-[48rem]". */
  tableClassName: string;
  testId?: string;
  /** The column headings; false leaves a column out. */
  columns: readonly (ReactNode | false)[];
  /** One table row (<tr> with a key) per loaded item. */
  row: (item: T) => ReactNode;
}) {
  if (list.isPending) return <LoadingState label={loadingLabel} />;
  if (list.isError) return <ErrorState error={list.error} onRetry={() => void list.refetch()} title={errorTitle} />;
  if (list.data.length === 0) return <p className="text-ink-soft">{empty}</p>;
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-white">
      <table className={`w-full ${tableClassName} text-left text-sm`} data-testid={testId}>
        <thead className="bg-accent-50">
          <tr>
            {columns.map((c, i) =>
              c === false ? null : (
                <th key={i} scope="col" className="px-3 py-2">
                  {c}
                </th>
              ),
            )}
          </tr>
        </thead>
        <tbody>{list.data.map(row)}</tbody>
      </table>
    </div>
  );
}
