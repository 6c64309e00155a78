// The bulletins of the office: a list (filter by state), and for analysts a form to start a new bulletin about
// a tracked object.
import { useState } from 'react';
import { Link, useNavigate } from 'react-router';
import { BULLETIN_STATE_LABELS, BULLETIN_STATES } from '../../../shared/bulletins/workflow';
import { formatUtc } from '../../../shared/format';
import { useBulletins, useCreateBulletin } from '../../api/bulletins';
import { fieldErrors } from '../../api/client';
import { useObjects } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { StartForm } from '../../components/StartForm';
import { StateFilteredList, useStateFilter } from '../../components/StateFilteredList';
import { buttonClass, PageHeader, SelectField, TextField } from '../../components/ui';
import { BulletinStateBadge } from './BulletinState';

function NewBulletinForm() {
  const objects = useObjects({ page: 1, pageSize: 100, sort: 'designation' });
  const create = useCreateBulletin();
  const navigate = useNavigate();
  const [objectId, setObjectId] = useState('');
  const [title, setTitle] = useState('');
  const errors = fieldErrors(create.error);
  return (
    <StartForm
      heading="Start a bulletin"
      intro="A bulletin is about one object; every number in it is taken from a named run of that object."
      gridClassName="sm:grid-cols-[1fr_2fr_auto]"
      onSubmit={() => create.mutate({ objectId: Number(objectId), title }, { onSuccess: (b) => navigate(`/bulletins/${b.id}`) })}
      submitLabel="Create draft"
      busy={create.isPending}
      canSubmit={!!objectId && !!title.trim()}
      error={create.error}
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
    </StartForm>
  );
}

export function BulletinsPage() {
  const ability = useAppAbility();
  const [state, setState] = useStateFilter(BULLETIN_STATES);
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
        <StateFilteredList
          headingId="list-heading"
          heading="All bulletins"
          noun="bulletin"
          states={BULLETIN_STATES}
          labels={BULLETIN_STATE_LABELS}
          state={state}
          onStateChange={setState}
          filterClassName="w-48"
          list={list}
          tableClassName="min-w-[48rem]"
          columns={['Number', 'Title', 'Object', 'State', 'Version', 'Author', 'Updated']}
          row={(b) => (
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
          )}
        />
      </div>
    </div>
  );
}
