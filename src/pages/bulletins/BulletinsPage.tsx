// The bulletins of the office: a list (filter by state), and for analysts a form to start a new bulletin about
// a tracked object.
import { useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { BULLETIN_STATE_LABELS, BULLETIN_STATES, type BulletinState } from '../../../shared/bulletins/workflow';
import { formatUtc } from '../../../shared/format';
import { useBulletins, useCreateBulletin } from '../../api/bulletins';
import { fieldErrors } from '../../api/client';
import { useObjects } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, buttonClass, Card, ErrorState, LoadingState, Notice, PageHeader, SelectField, TextField, errorMessage } from '../../components/ui';
import { BulletinStateBadge } from './BulletinState';

function NewBulletinForm() {
  const objects = useObjects({ page: 1, pageSize: 100, sort: 'designation' });
  const create = useCreateBulletin();
  const navigate = useNavigate();
  const [objectId, setObjectId] = useState('');
  const [title, setTitle] = useState('');
  const errors = fieldErrors(create.error);
  return (
    <Card>
      <h2 className="text-lg font-semibold">Start a bulletin</h2>
      <p className="mt-1 text-sm text-ink-soft">A bulletin is about one object; every number in it is taken from a named run of that object.</p>
      <form
        className="mt-4 grid gap-4 sm:grid-cols-[1fr_2fr_auto] sm:items-end"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate({ objectId: Number(objectId), title }, { onSuccess: (b) => navigate(`/bulletins/${b.id}`) });
        }}
      >
        <SelectField label="Object" value={objectId} onChange={(e) => setObjectId(e.target.value)} error={errors.objectId} required>
          <option value="">Choose…</option>
          {(objects.data?.items ?? []).map((o) => (
            <option key={o.id} value={o.id}>
              {o.designation}
              {o.name ? ` (${o.name})` : ''}
            </option>
          ))}
        </SelectField>
        <TextField label="Title" value={title} onChange={(e) => setTitle(e.target.value)} error={errors.title} required maxLength={200} />
        <Button type="submit" busy={create.isPending} disabled={!objectId || !title.trim()}>
          Create draft
        </Button>
      </form>
      {create.isError && Object.keys(errors).length === 0 && <Notice tone="error" className="mt-3">{errorMessage(create.error)}</Notice>}
    </Card>
  );
}

export function BulletinsPage() {
  const ability = useAppAbility();
  const [search, setSearch] = useSearchParams();
  const raw = search.get('state') ?? '';
  const state: BulletinState | '' = (BULLETIN_STATES as readonly string[]).includes(raw) ? (raw as BulletinState) : '';
  const setState = (s: BulletinState | '') => setSearch(s ? { state: s } : {}, { replace: true });
  const list = useBulletins(state ? { state } : {});
  return (
    <div>
      <title>Bulletins · Tocsin</title>
      <PageHeader
        title="Bulletins"
        intro="Statements about one object for officials: drafted by analysts, signed off by a second reviewer, then sent to stakeholders."
        actions={
          ability.can('read', 'StakeholderList') ? (
            <Link to="/stakeholder-lists" className={buttonClass('secondary', 'no-underline')}>
              Stakeholder lists
            </Link>
          ) : undefined
        }
      />
      <div className="space-y-6">
        {ability.can('create', 'Bulletin') && ability.can('read', 'TrackedObject') && <NewBulletinForm />}
        <section aria-labelledby="list-heading">
          <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
            <h2 id="list-heading" className="text-lg font-semibold">
              All bulletins
            </h2>
            <SelectField label="State" value={state} onChange={(e) => setState(e.target.value as BulletinState | '')} className="w-48">
              <option value="">Any</option>
              {BULLETIN_STATES.map((s) => (
                <option key={s} value={s}>
                  {BULLETIN_STATE_LABELS[s]}
                </option>
              ))}
            </SelectField>
          </div>
          {list.isPending && <LoadingState label="Loading bulletins…" />}
          {list.isError && <ErrorState error={list.error} onRetry={() => list.refetch()} />}
          {list.isSuccess &&
            (list.data.length === 0 ? (
              <p className="text-ink-soft">No bulletin{state ? ' in this state' : ' yet'}.</p>
            ) : (
              <div className="overflow-x-auto rounded-lg border border-rule bg-white">
                <table className="w-full min-w-[48rem] text-left text-sm">
                  <thead className="bg-accent-50">
                    <tr>
                      <th scope="col" className="px-3 py-2">Number</th>
                      <th scope="col" className="px-3 py-2">Title</th>
                      <th scope="col" className="px-3 py-2">Object</th>
                      <th scope="col" className="px-3 py-2">State</th>
                      <th scope="col" className="px-3 py-2">Version</th>
                      <th scope="col" className="px-3 py-2">Author</th>
                      <th scope="col" className="px-3 py-2">Updated</th>
                    </tr>
                  </thead>
                  <tbody>
                    {list.data.map((b) => (
                      <tr key={b.id} className="border-t border-rule" data-testid={`bulletin-row-${b.id}`}>
                        <td className="px-3 py-2 whitespace-nowrap tabular-nums">{b.number}</td>
                        <td className="px-3 py-2">
                          <Link to={`/bulletins/${b.id}`} className="font-medium">
                            {b.title}
                          </Link>
                        </td>
                        <td className="px-3 py-2 whitespace-nowrap">{b.objectDesignation}</td>
                        <td className="px-3 py-2">
                          <BulletinStateBadge state={b.state} />
                        </td>
                        <td className="px-3 py-2 whitespace-nowrap tabular-nums">
                          {[b.latestVersion ? `v${b.latestVersion}` : null, b.state === 'draft' || b.state === 'in_review' || b.state === 'changes_requested' ? `drafting v${b.draftVersion}` : null]
                            .filter(Boolean)
                            .join(' · ')}
                        </td>
                        <td className="px-3 py-2 whitespace-nowrap">{b.author?.name ?? '—'}</td>
                        <td className="px-3 py-2 whitespace-nowrap">{formatUtc(b.updatedAt, { seconds: false })}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            ))}
        </section>
      </div>
    </div>
  );
}
