import { useState, type FormEvent } from 'react';
import { ROLE_LABELS } from '../../../shared/roles';
import { useChangePassword } from '../../api/account';
import { fieldErrors } from '../../api/client';
import { useAuth } from '../../auth/AuthProvider';
import { Button, Card, Notice, PageHeader, TextField, errorMessage } from '../../components/ui';

const MIN_PASSWORD = 12;

export function AccountPage() {
  const { user } = useAuth();
  const change = useChangePassword();
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const [confirm, setConfirm] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});

  if (!user) return null;
  const serverErrors = fieldErrors(change.error);
  const errors = { ...serverErrors, ...localErrors };

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const errs: Record<string, string> = {};
    if (!currentPassword) errs.currentPassword = 'Enter your current password';
    if (newPassword.length < MIN_PASSWORD) errs.newPassword = `Use at least ${MIN_PASSWORD} characters`;
    if (confirm !== newPassword) errs.confirm = 'The two new passwords differ';
    setLocalErrors(errs);
    if (Object.keys(errs).length) return;
    change.mutate(
      { currentPassword, newPassword },
      {
        onSuccess: () => {
          setCurrent('');
          setNew('');
          setConfirm('');
        },
      },
    );
  };

  return (
    <div>
      <title>Account · Tocsin</title>
      <PageHeader title="Your account" />
      <div className="grid gap-6 lg:grid-cols-[18rem_1fr] lg:items-start">
        <Card aria-labelledby="profile-heading">
          <h2 id="profile-heading" className="text-lg font-bold">
            Profile
          </h2>
          <dl className="mt-4 space-y-3 text-sm">
            <div>
              <dt className="text-ink-soft">Name</dt>
              <dd className="font-medium">{user.name}</dd>
            </div>
            <div>
              <dt className="text-ink-soft">E-mail</dt>
              <dd className="font-medium break-words">{user.email}</dd>
            </div>
            <div>
              <dt className="text-ink-soft">Role</dt>
              <dd className="font-medium">{ROLE_LABELS[user.role]}</dd>
            </div>
          </dl>
          <p className="mt-4 text-xs text-ink-soft">Name and role are set by your office's administrator.</p>
        </Card>
        <Card aria-labelledby="password-heading" className="max-w-xl">
          <h2 id="password-heading" className="text-lg font-bold">
            Change password
          </h2>
          <form onSubmit={onSubmit} className="mt-4 space-y-4" noValidate>
            {change.isSuccess && <Notice tone="success">Your password has been changed.</Notice>}
            {change.isError && Object.keys(serverErrors).length === 0 && <Notice tone="error">{errorMessage(change.error)}</Notice>}
            <input type="text" name="username" autoComplete="username" value={user.email} readOnly hidden />
            <TextField
              label="Current password"
              type="password"
              autoComplete="current-password"
              value={currentPassword}
              onChange={(e) => setCurrent(e.target.value)}
              error={errors.currentPassword}
            />
            <TextField
              label="New password"
              type="password"
              autoComplete="new-password"
              hint={`At least ${MIN_PASSWORD} characters. A few unrelated words make a strong, memorable password.`}
              value={newPassword}
              onChange={(e) => setNew(e.target.value)}
              error={errors.newPassword}
            />
            <TextField
              label="Repeat the new password"
              type="password"
              autoComplete="new-password"
              value={confirm}
              onChange={(e) => setConfirm(e.target.value)}
              error={errors.confirm}
            />
            <Button type="submit" busy={change.isPending}>
              Change password
            </Button>
          </form>
        </Card>
      </div>
    </div>
  );
}
