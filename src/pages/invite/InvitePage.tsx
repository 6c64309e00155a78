import { useState, type FormEvent, type ReactNode } from 'react';
import { Link, useParams } from 'react-router';
import { ApiError, fieldErrors } from '../../api/client';
import { useAcceptInvitation, useInvitation } from '../../api/invitations';
import { Button, Card, ErrorState, LoadingState, Notice, TextField, buttonClass, errorMessage } from '../../components/ui';

const MIN_PASSWORD = 12;

export function InvitePage() {
  const { token = '' } = useParams();
  const invitation = useInvitation(token);
  const accept = useAcceptInvitation(token);
  const [password, setPassword] = useState('');
  const [confirm, setConfirm] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});

  const shell = (body: ReactNode) => (
    <div className="mx-auto max-w-lg">
      <title>Accept invitation · Tocsin</title>
      <h1 className="text-3xl font-bold tracking-tight">Join Tocsin</h1>
      <div className="mt-6">{body}</div>
    </div>
  );

  if (invitation.isPending) return shell(<LoadingState label="Checking your invitation…" />);
  if (invitation.isError) {
    const e = invitation.error;
    if (e instanceof ApiError && (e.status === 404 || e.status === 400)) {
      return shell(
        <Notice tone="error" title="This invitation link cannot be used">
          <p>It may have expired (links are valid for 7 days), been used already, or been copied incompletely.</p>
          <p className="mt-2">Ask your office's administrator to send a new invitation.</p>
        </Notice>,
      );
    }
    return shell(<ErrorState error={e} onRetry={() => void invitation.refetch()} />);
  }

  if (accept.isSuccess) {
    return shell(
      <Notice tone="success" title="Your password is set">
        <p>You can now sign in with {invitation.data.email}.</p>
        <Link to={`/sign-in?email=${encodeURIComponent(invitation.data.email)}`} className={buttonClass('primary', 'mt-3 no-underline hover:text-white')}>
          Go to sign-in
        </Link>
      </Notice>,
    );
  }

  const serverErrors = fieldErrors(accept.error);
  const errors = { ...serverErrors, ...localErrors };
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const errs: Record<string, string> = {};
    if (password.length < MIN_PASSWORD) errs.password = `Use at least ${MIN_PASSWORD} characters`;
    if (confirm !== password) errs.confirm = 'The two passwords differ';
    setLocalErrors(errs);
    if (Object.keys(errs).length === 0) accept.mutate({ password });
  };

  return shell(
    <Card>
      <p className="text-ink">
        Welcome, <strong>{invitation.data.name}</strong>. Choose a password for <strong className="break-words">{invitation.data.email}</strong>.
      </p>
      <form onSubmit={onSubmit} className="mt-5 space-y-4" noValidate>
        {accept.isError && Object.keys(serverErrors).length === 0 && <Notice tone="error">{errorMessage(accept.error)}</Notice>}
        <input type="text" name="username" autoComplete="username" value={invitation.data.email} readOnly hidden />
        <TextField
          label="Password"
          type="password"
          autoComplete="new-password"
          hint={`At least ${MIN_PASSWORD} characters.`}
          value={password}
          onChange={(e) => setPassword(e.target.value)}
          error={errors.password}
        />
        <TextField
          label="Repeat the password"
          type="password"
          autoComplete="new-password"
          value={confirm}
          onChange={(e) => setConfirm(e.target.value)}
          error={errors.confirm}
        />
        <Button type="submit" busy={accept.isPending}>
          Set password
        </Button>
      </form>
    </Card>,
  );
}
