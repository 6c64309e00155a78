// The office's observatory table (codes used in the ADES stn field; METHODS.md §9.4). Analysts and reviewers read
// it; admins add, edit, delete and import a file in the CLI's form (ObservatoryImport). An observatory that
// observations use cannot be deleted (the server answers 409 and its message is shown).
import { useState } from 'react';
import type { ObservatoryRow } from '../../../shared/schemas/odApi';
import { useDeleteObservatory, useObservatories } from '../../api/od';
import { useAppAbility } from '../../auth/useAppAbility';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { Button, Notice, PageHeader } from '../../components/ui';
import { QueryTable } from '../../components/QueryTable';
import { formatUtc } from '../objects/format';
import { ObservatoryForm } from './ObservatoryForm';
import { ObservatoryImport } from './ObservatoryImport';

function site(o: ObservatoryRow): string {
  if (o.rhoCosPhi !== null && o.rhoSinPhi !== null) return `ρ cos φ′ ${o.rhoCosPhi} · ρ sin φ′ ${o.rhoSinPhi}`;
  if (o.geodeticLatitudeDeg !== null && o.heightM !== null) return `lat ${o.geodeticLatitudeDeg}° · ${o.heightM} m`;
  return '—';
}

export function ObservatoriesPage() {
  const ability = useAppAbility();
  const list = useObservatories();
  const remove = useDeleteObservatory();
  const canManage = ability.can('create', 'Observatory');
  const [editing, setEditing] = useState<ObservatoryRow | null>(null);
  const [deleting, setDeleting] = useState<ObservatoryRow | null>(null);
  const [message, setMessage] = useState<string | null>(null);

  return (
    <div>
      <title>Observatories · Tocsin</title>
      <PageHeader
        title="Observatories"
        intro={
          <p>
            The sites whose codes astrometry files may name. An observation from a code that is not here is refused. Positions are east longitude with
            either the parallax constants or the geodetic latitude and height.
          </p>
        }
      />
      <div className="space-y-8">
        <div aria-live="polite">{message && <Notice tone="success">{message}</Notice>}</div>
        {canManage && editing === null && (
          <ObservatoryForm key="new" row={null} onDone={(code, added) => setMessage(`Observatory ${code} was ${added ? 'added' : 'saved'}.`)} />
        )}
        {canManage && editing !== null && (
          <ObservatoryForm
            key={editing.code}
            row={editing}
            onDone={(code) => {
              setEditing(null);
              setMessage(`Observatory ${code} was saved.`);
            }}
            onCancel={() => setEditing(null)}
          />
        )}
        {canManage && <ObservatoryImport />}
        <section aria-labelledby="observatory-list-heading">
          <h2 id="observatory-list-heading" className="mb-3 text-lg font-semibold">The office's observatories</h2>
          <QueryTable
            list={list}
            loadingLabel="Loading observatories…"
            errorTitle="The observatories could not be loaded"
            empty="No observatory yet."
            tableClassName="min-w-[48rem]"
            testId="observatory-table"
            columns={['Code', 'Name', 'East longitude', 'Site', 'Observations', 'Updated', canManage && <span className="sr-only">Actions</span>]}
            row={(o) => (
              <tr key={o.code} className="border-t border-rule tabular-nums" data-testid={`observatory-row-${o.code}`}>
                <th scope="row" className="px-3 py-2 font-semibold">{o.code}</th>
                <td className="px-3 py-2">{o.name}</td>
                <td className="px-3 py-2">{o.longitudeDeg}°</td>
                <td className="px-3 py-2">{site(o)}</td>
                <td className="px-3 py-2">{o.observationCount}</td>
                <td className="px-3 py-2 whitespace-nowrap">{formatUtc(o.updatedAt)}</td>
                {canManage && (
                  <td className="px-3 py-2 whitespace-nowrap">
                    <Button variant="quiet" onClick={() => { setMessage(null); setEditing(o); }} aria-label={`Edit ${o.code}`}>Edit</Button>
                    <Button variant="quiet" className="text-danger-700" onClick={() => { setMessage(null); remove.reset(); setDeleting(o); }} aria-label={`Delete ${o.code}`}>
                      Delete
                    </Button>
                  </td>
                )}
              </tr>
            )}
          />
        </section>
      </div>
      <ConfirmDialog
        open={deleting !== null}
        title={deleting ? `Delete observatory ${deleting.code}?` : ''}
        confirmLabel="Delete"
        tone="danger"
        busy={remove.isPending}
        error={remove.error}
        onCancel={() => setDeleting(null)}
        onConfirm={() => {
          if (!deleting) return;
          const code = deleting.code;
          remove.mutate(code, {
            onSuccess: () => {
              setDeleting(null);
              setMessage(`Observatory ${code} was deleted.`);
            },
          });
        }}
      >
        <p>
          {deleting && deleting.observationCount > 0
            ? `${deleting.observationCount} stored observation${deleting.observationCount === 1 ? '' : 's'} name this code: the server will refuse.`
            : 'Files that name this code will be refused afterwards.'}
        </p>
      </ConfirmDialog>
    </div>
  );
}
