// The list part of a workflow list page (bulletins, releases): a heading with a workflow-state filter kept in the
// address (?state=…), then loading, error (with retry), an empty line, or the table (the caller draws the rows).
import type { ReactNode } from 'react';
import { useSearchParams } from 'react-router';
import type { UseQueryResult } from '@tanstack/react-query';
import { QueryTable } from './QueryTable';
import { SelectField } from './ui';

/** The state filter from ?state= (anything not in `states` is "any", ''); setting it replaces the history entry. */
export function useStateFilter<S extends string>(states: readonly S[]): [S | '', (s: S | '') => void] {
  const [search, setSearch] = useSearchParams();
  const raw = search.get('state') ?? '';
  const state: S | '' = (states as readonly string[]).includes(raw) ? (raw as S) : '';
  return [state, (s) => setSearch(s ? { state: s } : {}, { replace: true })];
}

export function StateFilteredList<S extends string, T>({
  headingId,
  heading,
  noun,
  states,
  labels,
  state,
  onStateChange,
  filterClassName,
  list,
  tableClassName,
  columns,
  row,
}: {
  headingId: string;
  heading: string;
  /** One item, for "Loading bulletins…" and "No bulletin yet." */
  noun: string;
  states: readonly S[];
  labels: Record<S, string>;
  state: S | '';
  onStateChange: (s: S | '') => void;
  /** Width of the filter, e.g. "w-48". */
  filterClassName: string;
  list: UseQueryResult<T[]>;
  /** The table's minimum width, e.g. "min-w-[48rem]". */
  tableClassName: string;
  /** The column headings. */
  columns: readonly string[];
  /** One table row (<tr> with a key) per loaded item. */
  row: (item: T) => ReactNode;
}) {
  return (
    <section aria-labelledby={headingId}>
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <h2 id={headingId} className="text-lg font-semibold">
          {heading}
        </h2>
        <SelectField label="State" value={state} onChange={(e) => onStateChange(e.target.value as S | '')} className={filterClassName}>
          <option value="">Any</option>
          {states.map((s) => (
            <option key={s} value={s}>
              {labels[s]}
            </option>
          ))}
        </SelectField>
      </div>
      <QueryTable
        list={list}
        loadingLabel={`Loading ${noun}s…`}
        empty={`No ${noun}${state ? ' in this state' : ' yet'}.`}
        tableClassName={tableClassName}
        columns={columns}
        row={row}
      />
    </section>
  );
}
