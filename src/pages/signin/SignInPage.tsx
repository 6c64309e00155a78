import { useState, type FormEvent } from 'react';
import { Navigate, useNavigate, useSearchParams } from 'react-router';
import { useSignIn } from '../../api/session';
import { useAuth } from '../../auth/AuthProvider';
import { Button, Card, LoadingState, Notice, TextField, errorMessage } from '../../components/ui';

/** Only same-site paths are accepted as a return address (no open redirect). */
function safeNext(next: string | null): string {
  if (next && next.startsWith('/') && !next.startsWith('//') && !next.startsWith('/sign-in')) return next;
  return '/';
}

export function SignInPage() {
  const [params] = useSearchParams();
  const next = safeNext(params.get('next'));
  const { session, isLoading } = useAuth();
  const signIn = useSignIn();
  const navigate = useNavigate();
  const [email, setEmail] = useState(params.get('email') ?? '');
  const [password, setPassword] = useState('');
  const [missing, setMissing] = useState<{ email?: string; password?: string }>({});

  if (isLoading) return <LoadingState />;
  if (session && !signIn.isPending && !signIn.isSuccess) return <Navigate to={next} replace />;

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const m = { email: email.trim() ? undefined : 'Enter your e-mail address', password: password ? undefined : 'Enter your password' };
    setMissing(m);
    if (m.email || m.password) return;
    signIn.mutate({ email, password }, { onSuccess: () => navigate(next, { replace: true }) });
  };

  return (
    <div className="mx-auto grid max-w-4xl gap-10 md:grid-cols-[1fr_22rem] md:items-start">
      <title>Sign in · Tocsin</title>
      <div className="md:pt-4">
        <h1 className="text-3xl font-bold tracking-tight">Sign in to Tocsin</h1>
        <p className="mt-4 max-w-md text-lg leading-relaxed text-ink-soft">
          The working space of your planetary-defence office: orbit solutions turned into close-approach and
          impact-probability assessments, reviewed, and carried to officials and the public.
        </p>
        <p className="mt-4 max-w-md text-sm text-ink-soft">
          Accounts are created by your office's administrator. If you received an invitation, use the link in that
          e-mail to choose your password.
        </p>
      </div>
      <Card aria-labelledby="sign-in-heading">
        <h2 id="sign-in-heading" className="sr-only">
          Sign-in form
        </h2>
        <form onSubmit={onSubmit} className="space-y-4" noValidate>
          {signIn.isError && <Notice tone="error">{errorMessage(signIn.error)}</Notice>}
          <TextField
            label="E-mail address"
            type="email"
            name="email"
            autoComplete="username"
            required
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            error={missing.email}
          />
          <TextField
            label="Password"
            type="password"
            name="password"
            autoComplete="current-password"
            required
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            error={missing.password}
          />
          <Button type="submit" className="w-full" busy={signIn.isPending}>
            Sign in
          </Button>
        </form>
      </Card>
    </div>
  );
}
