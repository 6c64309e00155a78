// Create a user: by default an invitation e-mail with a one-time link, or with a first password.
import { useState, type FormEvent } from 'react';
import { ROLES, ROLE_LABELS, type Role } from '../../../shared/roles';
import { fieldErrors } from '../../api/client';
import { useCreateUser } from '../../api/users';
import { Button, Card, Notice, SelectField, TextField, errorMessage } from '../../components/ui';

type Mode = 'invite' | 'password';

export function UserCreateForm() {
  const create = useCreateUser();
  const [name, setName] = useState('');
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('analyst');
  const [mode, setMode] = useState<Mode>('invite');
  const [password, setPassword] = useState('');
  const [done, setDone] = useState<{ email: string; mode: Mode } | null>(null);

  const errors = fieldErrors(create.error);

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    setDone(null);
    create.mutate(
      { name, email, role, ...(mode === 'password' ? { password } : {}) },
      {
        onSuccess: () => {
          setDone({ email, mode });
          setName('');
          setEmail('');
          setPassword('');
        },
      },
    );
  };

  return (
    <Card id="new-user" aria-labelledby="new-user-heading" className="scroll-mt-6">
      <h2 id="new-user-heading" className="text-lg font-bold">
        Add a user
      </h2>
      <form onSubmit={onSubmit} className="mt-4 space-y-4" noValidate>
        {done && (
          <Notice tone="success">
            {done.mode === 'invite'
              ? `Invitation sent to ${done.email}. The link in it is valid for 7 days.`
              : `Account created for ${done.email}. Tell them their first password through a separate channel.`}
          </Notice>
        )}
        {create.isError && Object.keys(errors).length === 0 && <Notice tone="error">{errorMessage(create.error)}</Notice>}
        <div className="grid gap-4 md:grid-cols-3">
          <TextField label="Full name" name="name" autoComplete="off" value={name} onChange={(e) => setName(e.target.value)} error={errors.name} />
          <TextField
            label="E-mail address"
            name="email"
            type="email"
            autoComplete="off"
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={errors.email}
          />
          <SelectField label="Role" name="role" value={role} onChange={(e) => setRole(e.target.value as Role)} error={errors.role}>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </SelectField>
        </div>
        <fieldset>
          <legend className="mb-2 text-sm font-medium">How they get access</legend>
          <div className="flex flex-col gap-2 sm:flex-row sm:gap-6">
            <label className="flex items-center gap-2 text-sm">
              <input type="radio" name="mode" value="invite" checked={mode === 'invite'} onChange={() => setMode('invite')} className="size-4 accent-accent-700" />
              Send an invitation e-mail
            </label>
            <label className="flex items-center gap-2 text-sm">
              <input type="radio" name="mode" value="password" checked={mode === 'password'} onChange={() => setMode('password')} className="size-4 accent-accent-700" />
              Set a first password now
            </label>
          </div>
        </fieldset>
        {mode === 'password' && (
          <TextField
            label="First password"
            name="password"
            type="password"
            autoComplete="new-password"
            hint="At least 12 characters. They can change it on their account page."
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            error={errors.password}
            className="max-w-sm"
          />
        )}
        <Button type="submit" busy={create.isPending}>
          {mode === 'invite' ? 'Send invitation' : 'Create user'}
        </Button>
      </form>
    </Card>
  );
}
