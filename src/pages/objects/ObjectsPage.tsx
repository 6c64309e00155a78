// Tracked objects: one table with server-side paging, sorting, search and filters (TanStack Table,
// manual mode: the server sorts and pages, so 10 000 objects cost one page of rows).
import { useEffect, useMemo, useState, type FormEvent } from 'react';
import { Link, useSearchParams } from 'react-router';
import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import {
  OBJECT_SORT_COLUMNS,
  TRACKED_OBJECT_KINDS,
  TRACKED_OBJECT_KIND_LABELS,
  type ObjectSort,
  type ObjectSortColumn,
  type TrackedObject,
  type TrackedObjectKind,
} from '../../../shared/schemas/objects';
import { fieldErrors } from '../../api/client';
import { useCreateObject, useObjects, type ObjectListQuery } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, SelectField, TextField, errorMessage } from '../../components/ui';
import { formatDateUtc, formatNumber, formatUtc } from './format';

const PAGE_SIZES = [25, 50, 100];

const columns: ColumnDef<TrackedObject>[] = [
  { accessorKey: 'designation',
    header: 'Designation',
    cell: ({ row }) => (
      <Link to={`/objects/${row.original.id}`} className="font-medium" data-testid={`object-link-${row.original.designation}`}>
        {row.original.designation}
      </Link>
    ),
  },
  { accessorKey: 'name', header: 'Name', cell: ({ row }) => row.original.name ?? '—' },
  { accessorKey: 'kind', header: 'Kind', cell: ({ row }) => TRACKED_OBJECT_KIND_LABELS[row.original.kind] },
  { accessorKey: 'latestSolutionAt',
    header: 'Latest solution',
    cell: ({ row }) => (row.original.latestSolutionVersion ? `v${row.original.latestSolutionVersion} · ${formatDateUtc(row.original.latestSolutionAt)}` : '—'),
  },
  { accessorKey: 'nextCloseApproachAt', header: 'Next close approach', cell: ({ row }) => formatDateUtc(row.original.nextCloseApproachAt) },
  { accessorKey: 'maxImpactProbability', header: 'Highest IP', cell: ({ row }) => formatNumber(row.original.maxImpactProbability, 2) },
  { accessorKey: 'cumulativePalermo', header: 'Cum. Palermo', cell: ({ row }) => (row.original.cumulativePalermo === null ? '—' : row.original.cumulativePalermo.toFixed(2)) },
  { accessorKey: 'maxTorino', header: 'Max Torino', cell: ({ row }) => row.original.maxTorino ?? '—' },
  { accessorKey: 'lastRunAt', header: 'Last run', cell: ({ row }) => formatUtc(row.original.lastRunAt) },
];

const SORTABLE = new Set<string>(OBJECT_SORT_COLUMNS);

function sortFromState(s: SortingState): ObjectSort {
  const first = s[0];
  if (!first || !SORTABLE.has(first.id)) return 'designation';
  return (first.desc ? `-${first.id}` : first.id) as ObjectSort;
}

function stateFromSort(sort: string | null): SortingState {
  if (!sort) return [{ id: 'designation', desc: false }];
  const desc = sort.startsWith('-');
  const id = desc ? sort.slice(1) : sort;
  return SORTABLE.has(id) ? [{ id: id as ObjectSortColumn, desc }] : [{ id: 'designation', desc: false }];
}

function NewObjectForm({ onDone }: { onDone: () => void }) {
  const create = useCreateObject();
  const [designation, setDesignation] = useState('');
  const [name, setName] = useState('');
  const [kind, setKind] = useState<TrackedObjectKind>('near-earth-asteroid');
  const errors = fieldErrors(create.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    create.mutate({ designation, name: name || undefined, kind }, { onSuccess: onDone });
  };
  return (
    <Card className="mb-6" aria-labelledby="new-object-heading">
      <h2 id="new-object-heading" className="mb-4 text-lg font-semibold">Register an object</h2>
      <form onSubmit={submit} className="grid gap-4 sm:grid-cols-4 sm:items-end" noValidate>
        <TextField label="Designation" value={designation} onChange={(e) => setDesignation(e.target.value)} error={errors.designation} required />
        <TextField label="Name (optional)" value={name} onChange={(e) => setName(e.target.value)} error={errors.name} />
        <SelectField label="Kind" value={kind} onChange={(e) => setKind(e.target.value as TrackedObjectKind)} error={errors.kind}>
          {TRACKED_OBJECT_KINDS.map((k) => (
            <option key={k} value={k}>
              {TRACKED_OBJECT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <Button type="submit" busy={create.isPending}>
          Register
        </Button>
      </form>
      {create.isError && !Object.keys(errors).length && <Notice tone="error" className="mt-4">{errorMessage(create.error)}</Notice>}
      {create.isError && errors.designation && create.error && <p className="sr-only">{errorMessage(create.error)}</p>}
    </Card>
  );
}

export function ObjectsPage() {
  const ability = useAppAbility();
  const [params, setParams] = useSearchParams();
  const [showNew, setShowNew] = useState(false);
  const [search, setSearch] = useState(params.get('q') ?? '');

  const query: ObjectListQuery = {
    page: Number(params.get('page') ?? 1) || 1,
    pageSize: Number(params.get('pageSize') ?? 50) || 50,
    sort: sortFromState(stateFromSort(params.get('sort'))),
    q: params.get('q') || undefined,
    kind: (params.get('kind') as TrackedObjectKind) || undefined,
    watch: (params.get('watch') as 'true' | 'false') || undefined,
  };
  const update = (changes: Record<string, string | undefined>) => {
    const next = new URLSearchParams(params);
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === '') next.delete(k);
      else next.set(k, v);
    }
    setParams(next, { replace: true });
  };

  // Search as you type, a moment after the last key.
  useEffect(() => {
    const t = setTimeout(() => {
      if ((params.get('q') ?? '') !== search) update({ q: search, page: undefined });
    }, 300);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [search]);

  const list = useObjects(query);
  const sorting = useMemo(() => stateFromSort(query.sort), [query.sort]);
  const table = useReactTable({
    data: list.data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    rowCount: list.data?.total ?? 0,
    state: { sorting, pagination: { pageIndex: query.page - 1, pageSize: query.pageSize } },
    onSortingChange: (updater) => {
      const next = typeof updater === 'function' ? updater(sorting) : updater;
      update({ sort: sortFromState(next), page: undefined });
    },
  });
  const total = list.data?.total ?? 0;
  const pageCount = Math.max(1, Math.ceil(total / query.pageSize));
  const page = query.page;

  return (
    <div>
      <title>Objects · Tocsin</title>
      <PageHeader
        title="Objects"
        intro={<p>Every object the office tracks, with its latest orbit solution and, once runs exist, its risk figures.</p>}
        actions={
          ability.can('create', 'TrackedObject') ? (
            <Button variant={showNew ? 'secondary' : 'primary'} onClick={() => setShowNew((v) => !v)}>
              {showNew ? 'Close' : 'Register an object'}
            </Button>
          ) : undefined
        }
      />
      {showNew && <NewObjectForm onDone={() => setShowNew(false)} />}

      <div className="mb-4 grid gap-4 sm:grid-cols-4 sm:items-end" role="search">
        <TextField label="Search designation or name" value={search} onChange={(e) => setSearch(e.target.value)} type="search" className="sm:col-span-2" />
        <SelectField label="Kind" value={query.kind ?? ''} onChange={(e) => update({ kind: e.target.value, page: undefined })}>
          <option value="">All kinds</option>
          {TRACKED_OBJECT_KINDS.map((k) => (
            <option key={k} value={k}>
              {TRACKED_OBJECT_KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Watch list" value={query.watch ?? ''} onChange={(e) => update({ watch: e.target.value, page: undefined })}>
          <option value="">All objects</option>
          <option value="true">Watched only</option>
          <option value="false">Not watched</option>
        </SelectField>
      </div>

      {list.isPending ? (
        <LoadingState label="Loading objects…" />
      ) : list.isError ? (
        <ErrorState error={list.error} onRetry={() => list.refetch()} />
      ) : (
        <>
          <div className="overflow-x-auto rounded-lg border border-rule bg-white">
            <table className="w-full min-w-[56rem] text-left text-sm" aria-busy={list.isFetching || undefined}>
              <caption className="sr-only">Tracked objects, page {page} of {pageCount}</caption>
              <thead className="bg-accent-50 text-ink">
                {table.getHeaderGroups().map((hg) => (
                  <tr key={hg.id}>
                    {hg.headers.map((h) => {
                      const sorted = h.column.getIsSorted();
                      return (
                        <th key={h.id} scope="col" className="px-3 py-2 font-semibold" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}>
                          <button type="button" className="inline-flex items-center gap-1 hover:text-accent-800" onClick={h.column.getToggleSortingHandler()}>
                            {flexRender(h.column.columnDef.header, h.getContext())}
                            <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
                          </button>
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody>
                {table.getRowModel().rows.map((row) => (
                  <tr key={row.id} className="border-t border-rule" data-testid={`object-row-${row.original.designation}`}>
                    {row.getVisibleCells().map((cell) => (
                      <td key={cell.id} className="px-3 py-2 align-top tabular-nums">
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    ))}
                  </tr>
                ))}
                {total === 0 && (
                  <tr>
                    <td colSpan={columns.length} className="px-3 py-6 text-center text-ink-soft">
                      No objects match.
                    </td>
                  </tr>
                )}
              </tbody>
            </table>
          </div>
          <nav aria-label="Pages" className="mt-4 flex flex-wrap items-center justify-between gap-3 text-sm">
            <p>
              {total} object{total === 1 ? '' : 's'} · page {page} of {pageCount}
            </p>
            <div className="flex items-center gap-2">
              <label className="flex items-center gap-2">
                Rows
                <select className="h-9 rounded-md border border-rule bg-white px-2" value={query.pageSize} onChange={(e) => update({ pageSize: e.target.value, page: undefined })}>
                  {PAGE_SIZES.map((n) => (
                    <option key={n}>{n}</option>
                  ))}
                </select>
              </label>
              <Button variant="secondary" disabled={page <= 1} onClick={() => update({ page: String(page - 1) })}>
                Previous
              </Button>
              <Button variant="secondary" disabled={page >= pageCount} onClick={() => update({ page: String(page + 1) })}>
                Next
              </Button>
            </div>
          </nav>
        </>
      )}
    </div>
  );
}
