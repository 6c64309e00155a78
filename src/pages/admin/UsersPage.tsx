// Admin: everyone with access to Tocsin, with role changes and (de)activation behind a confirmation.
import { useState } from 'react';
import { ROLES, ROLE_LABELS, type Role } from '../../../shared/roles';
import type { UserRecord } from '../../api/types';
import { useResendInvitation, useUpdateUser, useUsers } from '../../api/users';
import { useAuth } from '../../auth/AuthProvider';
import { useAppAbility } from '../../auth/useAppAbility';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { Button, ErrorState, LoadingState, Notice, PageHeader, SelectField } from '../../components/ui';
import { UserCreateForm } from './UserCreateForm';

/** UTC, minute precision: the office works in UTC. */
function formatUtc(iso: string | null): string {
  if (!iso) return 'Never';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

type Pending =
  | { kind: 'role'; user: UserRecord; role: Role }
  | { kind: 'deactivate'; user: UserRecord }
  | { kind: 'reactivate'; user: UserRecord }
  | null;

function StatusBadge({ user }: { user: UserRecord }) {
  if (!user.active)
    return <span className="rounded-full bg-danger-50 px-2 py-0.5 text-xs font-medium text-danger-700 ring-1 ring-danger-200">Deactivated</span>;
  if (user.invited)
    return <span className="rounded-full bg-signal-50 px-2 py-0.5 text-xs font-medium text-signal-700 ring-1 ring-signal-200">Invited</span>;
  return <span className="rounded-full bg-ok-50 px-2 py-0.5 text-xs font-medium text-ok-700 ring-1 ring-ok-700/30">Active</span>;
}

export function UsersPage() {
  const ability = useAppAbility();
  const { user: me } = useAuth();
  const users = useUsers();
  const update = useUpdateUser();
  const resend = useResendInvitation();
  const [pending, setPending] = useState<Pending>(null);
  const [message, setMessage] = useState<string | null>(null);
  const canCreate = ability.can('create', 'User');
  const canUpdate = ability.can('update', 'User');

  const close = () => {
    setPending(null);
    update.reset();
  };
  const confirm = () => {
    if (!pending) return;
    const { user } = pending;
    const patch = pending.kind === 'role' ? { role: pending.role } : { active: pending.kind === 'reactivate' };
    update.mutate(
      { id: user.id, patch },
      {
        onSuccess: () => {
          setMessage(
            pending.kind === 'role'
              ? `${user.name} is now ${ROLE_LABELS[pending.role]}.`
              : pending.kind === 'deactivate'
                ? `${user.name} has been deactivated and signed out everywhere.`
                : `${user.name} can sign in again.`,
          );
          setPending(null);
        },
      },
    );
  };

  return (
    <div>
      <title>Users · Tocsin</title>
      <PageHeader
        title="Users"
        intro={<p>Who has access to Tocsin, in which role. A deactivated user is signed out at once and cannot sign in.</p>}
      />
      <div className="space-y-8">
        {canCreate && <UserCreateForm />}

        <section aria-labelledby="user-list-heading">
          <h2 id="user-list-heading" className="text-lg font-bold">
            People with access
          </h2>
          <div aria-live="polite">{message && <Notice tone="success" className="mt-3">{message}</Notice>}</div>
          {resend.isError && <ErrorState error={resend.error} title="The invitation could not be sent" />}
          {users.isPending ? (
            <LoadingState label="Loading users…" />
          ) : users.isError ? (
            <ErrorState error={users.error} onRetry={() => void users.refetch()} title="The user list could not be loaded" />
          ) : (
            <div className="relative mt-4 overflow-x-auto rounded-lg border border-rule bg-white shadow-xs">
              {/* A table on wide screens; on narrow screens each row becomes a small stacked card. */}
              <table className="w-full text-left text-sm max-md:block md:min-w-[44rem]">
                <caption className="sr-only">Users of this Tocsin office</caption>
                <thead className="border-b border-rule bg-paper text-xs tracking-wide text-ink-soft uppercase max-md:hidden">
                  <tr>
                    <th scope="col" className="px-4 py-3 font-semibold">Name</th>
                    <th scope="col" className="px-4 py-3 font-semibold">Role</th>
                    <th scope="col" className="px-4 py-3 font-semibold">Status</th>
                    <th scope="col" className="px-4 py-3 font-semibold">Last sign-in</th>
                    <th scope="col" className="px-4 py-3 font-semibold"><span className="sr-only">Actions</span></th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-rule max-md:block">
                  {users.data.map((u) => {
                    const isMe = u.id === me?.id;
                    return (
                      <tr key={u.id} data-testid={`user-row-${u.email}`} className={`max-md:grid max-md:grid-cols-[auto_1fr] max-md:items-center max-md:gap-x-4 max-md:gap-y-2 max-md:px-4 max-md:py-4 ${u.active ? '' : 'bg-paper/60 text-ink-soft'}`}>
                        <th scope="row" className="px-4 py-3 font-normal max-md:col-span-2 max-md:p-0">
                          <span className="block font-medium text-ink">
                            {u.name}
                            {isMe && <span className="ml-1 text-ink-soft">(you)</span>}
                          </span>
                          <span className="block break-words text-ink-soft">{u.email}</span>
                        </th>
                        <td className="px-4 py-3 max-md:p-0" data-testid="role">{ROLE_LABELS[u.role]}</td>
                        <td className="px-4 py-3 max-md:p-0"><StatusBadge user={u} /></td>
                        <td className="px-4 py-3 whitespace-nowrap tabular-nums max-md:col-span-2 max-md:p-0 max-md:text-ink-soft">
                          <span className="md:hidden">Last sign-in: </span>
                          {formatUtc(u.lastSignInAt)}
                        </td>
                        <td className="px-4 py-3 max-md:col-span-2 max-md:p-0 max-md:empty:hidden">
                          {canUpdate && !isMe && (
                            <div className="flex flex-wrap gap-2 md:justify-end">
                              {u.active && u.invited && (
                                <Button
                                  variant="quiet"
                                  className="px-2 py-1"
                                  busy={resend.isPending && resend.variables === u.id}
                                  onClick={() => resend.mutate(u.id, { onSuccess: () => setMessage(`A new invitation was sent to ${u.email}.`) })}
                                >
                                  Resend invitation
                                </Button>
                              )}
                              <Button
                                variant="secondary"
                                className="px-3 py-1"
                                aria-label={`Change role of ${u.name}`}
                                onClick={() => setPending({ kind: 'role', user: u, role: u.role })}
                              >
                                Change role
                              </Button>
                              {u.active ? (
                                <Button
                                  variant="danger-outline"
                                  className="px-3 py-1"
                                  aria-label={`Deactivate ${u.name}`}
                                  onClick={() => setPending({ kind: 'deactivate', user: u })}
                                >
                                  Deactivate
                                </Button>
                              ) : (
                                <Button
                                  variant="secondary"
                                  className="px-3 py-1"
                                  aria-label={`Reactivate ${u.name}`}
                                  onClick={() => setPending({ kind: 'reactivate', user: u })}
                                >
                                  Reactivate
                                </Button>
                              )}
                            </div>
                          )}
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
          )}
        </section>
      </div>

      <ConfirmDialog
        open={pending?.kind === 'role'}
        title={pending ? `Change the role of ${pending.user.name}` : ''}
        confirmLabel="Change role"
        confirmDisabled={pending?.kind === 'role' && pending.role === pending.user.role}
        busy={update.isPending}
        error={update.error}
        onConfirm={confirm}
        onCancel={close}
      >
        {pending?.kind === 'role' && (
          <>
            <p>
              Currently <strong>{ROLE_LABELS[pending.user.role]}</strong>. The new role decides what they can see and do from their next
              request on.
            </p>
            <SelectField
              label="New role"
              value={pending.role}
              onChange={(e) => setPending({ ...pending, role: e.target.value as Role })}
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </SelectField>
          </>
        )}
      </ConfirmDialog>
      <ConfirmDialog
        open={pending?.kind === 'deactivate'}
        title={pending ? `Deactivate ${pending.user.name}?` : ''}
        confirmLabel="Deactivate"
        tone="danger"
        busy={update.isPending}
        error={update.error}
        onConfirm={confirm}
        onCancel={close}
      >
        <p>They are signed out at once and cannot sign in until an administrator reactivates the account. Their past work stays on record.</p>
      </ConfirmDialog>
      <ConfirmDialog
        open={pending?.kind === 'reactivate'}
        title={pending ? `Reactivate ${pending.user.name}?` : ''}
        confirmLabel="Reactivate"
        busy={update.isPending}
        error={update.error}
        onConfirm={confirm}
        onCancel={close}
      >
        <p>They will be able to sign in again with their existing password, in the role {pending ? ROLE_LABELS[pending.user.role] : ''}.</p>
      </ConfirmDialog>
    </div>
  );
}
