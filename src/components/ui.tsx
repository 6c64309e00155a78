// Small shared building blocks: buttons, labelled fields, notices, loading and error states.
import { useId, type ButtonHTMLAttributes, type HTMLAttributes, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes } from 'react';
import { ApiError } from '../api/client';

type ButtonVariant = 'primary' | 'secondary' | 'danger' | 'danger-outline' | 'quiet';

const buttonBase =
  'inline-flex items-center justify-center gap-2 rounded-md px-4 py-2 text-sm font-medium transition-colors ' +
  'disabled:cursor-not-allowed disabled:opacity-60';
const buttonVariants: Record<ButtonVariant, string> = {
  primary: 'bg-accent-700 text-white hover:bg-accent-800 shadow-sm',
  secondary: 'border border-rule bg-white text-ink hover:bg-accent-50',
  danger: 'bg-danger-700 text-white hover:bg-red-900 shadow-sm',
  'danger-outline': 'border border-danger-200 bg-white text-danger-700 hover:bg-danger-50',
  quiet: 'text-accent-700 hover:bg-accent-50',
};

export function buttonClass(variant: ButtonVariant = 'primary', extra = ''): string {
  return `${buttonBase} ${buttonVariants[variant]} ${extra}`;
}

export function Button({
  variant = 'primary',
  busy = false,
  className = '',
  children,
  ...rest
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: ButtonVariant; busy?: boolean }) {
  return (
    <button type="button" {...rest} disabled={rest.disabled || busy} aria-busy={busy || undefined} className={buttonClass(variant, className)}>
      {busy && <Spinner />}
      {children}
    </button>
  );
}

export function Spinner({ className = '' }: { className?: string }) {
  return (
    <span
      aria-hidden="true"
      className={`inline-block size-4 animate-spin rounded-full border-2 border-current border-r-transparent ${className}`}
    />
  );
}

const inputClass =
  'block h-10 w-full rounded-md border border-rule bg-white px-3 py-2 text-base text-ink shadow-xs ' +
  'placeholder:text-ink-soft/60 focus:border-accent-600 aria-[invalid=true]:border-danger-700';

type FieldProps = { label: string; hint?: ReactNode; error?: string };

export function TextField({ label, hint, error, id, className = '', ...rest }: FieldProps & InputHTMLAttributes<HTMLInputElement>) {
  const autoId = useId();
  const inputId = id ?? autoId;
  const hintId = hint ? `${inputId}-hint` : undefined;
  const errorId = error ? `${inputId}-error` : undefined;
  return (
    <div className={className}>
      <label htmlFor={inputId} className="mb-1 block text-sm font-medium text-ink">
        {label}
      </label>
      <input
        id={inputId}
        className={inputClass}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        {...rest}
      />
      {hint && (
        <p id={hintId} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="mt-1 text-sm font-medium text-danger-700">
          {error}
        </p>
      )}
    </div>
  );
}

export function SelectField({
  label,
  hint,
  error,
  id,
  className = '',
  children,
  ...rest
}: FieldProps & SelectHTMLAttributes<HTMLSelectElement>) {
  const autoId = useId();
  const selectId = id ?? autoId;
  const hintId = hint ? `${selectId}-hint` : undefined;
  const errorId = error ? `${selectId}-error` : undefined;
  return (
    <div className={className}>
      <label htmlFor={selectId} className="mb-1 block text-sm font-medium text-ink">
        {label}
      </label>
      <select
        id={selectId}
        className={inputClass}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        {...rest}
      >
        {children}
      </select>
      {hint && (
        <p id={hintId} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="mt-1 text-sm font-medium text-danger-700">
          {error}
        </p>
      )}
    </div>
  );
}

type NoticeTone = 'error' | 'success' | 'info' | 'caution';
const noticeTones: Record<NoticeTone, string> = {
  error: 'border-danger-200 bg-danger-50 text-danger-700',
  success: 'border-ok-700/30 bg-ok-50 text-ok-700',
  info: 'border-accent-100 bg-accent-50 text-accent-800',
  caution: 'border-signal-200 bg-signal-50 text-signal-700',
};

/** A message box. Errors are announced at once (role=alert), others politely (role=status). */
export function Notice({ tone = 'info', title, children, className = '' }: { tone?: NoticeTone; title?: string; children?: ReactNode; className?: string }) {
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-md border px-4 py-3 text-sm ${noticeTones[tone]} ${className}`}>
      {title && <p className="font-semibold">{title}</p>}
      {children && <div className={title ? 'mt-1' : ''}>{children}</div>}
    </div>
  );
}

export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}

export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" className="flex items-center gap-3 py-8 text-ink-soft">
      <Spinner className="text-accent-600" />
      <span>{label}</span>
    </div>
  );
}

export function ErrorState({ error, onRetry, title = 'This page could not be loaded' }: { error: unknown; onRetry?: () => void; title?: string }) {
  return (
    <Notice tone="error" title={title} className="my-4">
      <p>{errorMessage(error)}</p>
      {onRetry && (
        <Button variant="secondary" className="mt-3" onClick={onRetry}>
          Try again
        </Button>
      )}
    </Notice>
  );
}

export function PageHeader({ title, intro, actions }: { title: string; intro?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-8 flex flex-wrap items-end justify-between gap-4 border-b border-rule pb-5">
      <div className="max-w-2xl">
        <h1 className="text-2xl font-bold tracking-tight sm:text-3xl">{title}</h1>
        {intro && <div className="mt-2 text-ink-soft">{intro}</div>}
      </div>
      {actions && <div className="flex gap-2">{actions}</div>}
    </div>
  );
}

export function Card({ children, className = '', ...rest }: { children: ReactNode; className?: string } & HTMLAttributes<HTMLElement>) {
  return (
    <section className={`rounded-lg border border-rule bg-white p-5 shadow-xs sm:p-6 ${className}`} {...rest}>
      {children}
    </section>
  );
}
