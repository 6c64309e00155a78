// Stakeholder lists: who an approved bulletin version can be sent to. Everyone who distributes reads them here;
// administrators create lists from Tocsin users (liaisons then get briefings in their inbox) and outside addresses.
import { useState } from 'react';
import { Link } from 'react-router';
import { ROLE_LABELS, isRole } from '../../../shared/roles';
import { STAKEHOLDER_KIND_LABELS, STAKEHOLDER_KINDS } from '../../../shared/schemas/bulletins';
import { fieldErrors } from '../../api/client';
import { useCreateStakeholderList, useStakeholderLists } from '../../api/stakeholderLists';
import { useUsers } from '../../api/users';
import { useAppAbility } from '../../auth/useAppAbility';
import { parseOutsideAddresses } from './addresses';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, SelectField, TextField, errorMessage } from '../../components/ui';

function NewListForm() {
  const users = useUsers();
  const create = useCreateStakeholderList();
  const [name, setName] = useState('');
  const [kind, setKind] = useState<(typeof STAKEHOLDER_KINDS)[number]>('government');
  const [description, setDescription] = useState('');
  const [picked, setPicked] = useState<Set<number>>(new Set());
  const [outside, setOutside] = useState('');
  const parsed = parseOutsideAddresses(outside);
  const errors = fieldErrors(create.error);
  const active = (users.data ?? []).filter((u) => u.active !== false);
  return (
    <Card>
      <h2 className="text-lg font-semibold">New list</h2>
      <form
        className="mt-4 space-y-4"
        onSubmit={(e) => {
          e.preventDefault();
          if (parsed.bad.length) return;
          create.mutate(
            { name, kind, description, members: [...[...picked].map((userId) => ({ userId })), ...parsed.members] },
            {
              onSuccess: () => {
                setName('');
                setDescription('');
                setPicked(new Set());
                setOutside('');
              },
            },
          );
        }}
      >
        <div className="grid gap-4 sm:grid-cols-[2fr_1fr]">
          <TextField label="Name" value={name} onChange={(e) => setName(e.target.value)} error={errors.name} required maxLength={200} />
          <SelectField label="Kind" value={kind} onChange={(e) => setKind(e.target.value as typeof kind)}>
            {STAKEHOLDER_KINDS.map((k) => (
              <option key={k} value={k}>
                {STAKEHOLDER_KIND_LABELS[k]}
              </option>
            ))}
          </SelectField>
        </div>
        <TextField label="Description" value={description} onChange={(e) => setDescription(e.target.value)} maxLength={2000} />
        <fieldset>
          <legend className="mb-1 text-sm font-medium">Tocsin users</legend>
          {users.isPending && <p className="text-sm text-ink-soft">Loading users…</p>}
          <div className="grid gap-1 sm:grid-cols-2">
            {active.map((u) => (
              <label key={u.id} className="flex items-center gap-2 text-sm">
                <input
                  type="checkbox"
                  className="size-4 accent-accent-700"
                  checked={picked.has(u.id)}
                  onChange={() =>
                    setPicked((s) => {
                      const n = new Set(s);
                      if (n.has(u.id)) n.delete(u.id);
                      else n.add(u.id);
                      return n;
                    })
                  }
                />
                {u.name} <span className="text-ink-soft">· {isRole(u.role) ? ROLE_LABELS[u.role] : u.role}</span>
              </label>
            ))}
          </div>
        </fieldset>
        <div>
          <label htmlFor="outside-addresses" className="mb-1 block text-sm font-medium">
            Outside addresses
          </label>
          <textarea
            id="outside-addresses"
            rows={3}
            className="block w-full rounded-md border border-rule p-2 font-mono text-sm"
            placeholder="Partner office duty desk <duty@partner.example>"
            value={outside}
            onChange={(e) => setOutside(e.target.value)}
            aria-describedby="outside-hint"
          />
          <p id="outside-hint" className="mt-1 text-xs text-ink-soft">
            One per line: Name &lt;address&gt;. They receive the e-mail with the PDF; only Tocsin users can acknowledge in the app.
          </p>
          {parsed.bad.length > 0 && <p className="mt-1 text-sm font-medium text-danger-700">Cannot read: {parsed.bad.join('; ')}</p>}
        </div>
        {create.isError && <Notice tone="error">{errorMessage(create.error)}</Notice>}
        <Button type="submit" busy={create.isPending} disabled={!name.trim() || parsed.bad.length > 0 || picked.size + parsed.members.length === 0}>
          Create list
        </Button>
      </form>
    </Card>
  );
}

export function StakeholderListsPage() {
  const ability = useAppAbility();
  const lists = useStakeholderLists();
  return (
    <div>
      <title>Stakeholder lists · Tocsin</title>
      <p className="mb-2 text-sm">
        <Link to="/bulletins">← Bulletins</Link>
      </p>
      <PageHeader title="Stakeholder lists" intro="Who an approved bulletin version can be sent to." />
      <div className="space-y-6">
        {lists.isPending && <LoadingState label="Loading the lists…" />}
        {lists.isError && <ErrorState error={lists.error} onRetry={() => lists.refetch()} />}
        {lists.isSuccess && lists.data.length === 0 && <p className="text-ink-soft">No list yet.</p>}
        {lists.data?.map((l) => (
          <section key={l.id} className="rounded-lg border border-rule bg-white" data-testid={`stakeholder-list-${l.id}`}>
            <div className="border-b border-rule px-4 py-3">
              <h2 className="font-serif text-base font-bold">{l.name}</h2>
              <p className="text-sm text-ink-soft">
                {STAKEHOLDER_KIND_LABELS[l.kind]} · {l.members.length} recipient{l.members.length === 1 ? '' : 's'}
                {l.description && ` · ${l.description}`}
              </p>
            </div>
            <ul className="grid gap-x-6 px-4 py-2 text-sm sm:grid-cols-2">
              {l.members.map((m) => (
                <li key={m.id} className="py-0.5">
                  {m.name} <span className="text-ink-soft">&lt;{m.email}&gt;{m.role ? ` · ${isRole(m.role) ? ROLE_LABELS[m.role] : m.role}` : ' · outside address'}</span>
                </li>
              ))}
            </ul>
          </section>
        ))}
        {ability.can('create', 'StakeholderList') && ability.can('read', 'User') && <NewListForm />}
      </div>
    </div>
  );
}
