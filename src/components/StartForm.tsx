// The "start a …" card of a list page (a bulletin about an object, a release from an approved bulletin version):
// heading, a line on what the new draft starts from, the fields in one row with the submit button, and the
// server's refusal as a notice when it names no field (field errors show at their fields, given by the caller).
import type { ReactNode } from 'react';
import { fieldErrors } from '../api/client';
import { Button, Card, Notice, errorMessage } from './ui';

export function StartForm({
  heading,
  intro,
  gridClassName,
  onSubmit,
  submitLabel,
  busy,
  canSubmit,
  error,
  note,
  children,
}: {
  heading: string;
  intro: ReactNode;
  /** The row's grid columns from the small breakpoint on, e.g. "sm:grid-cols-[1fr_2fr_auto]" (fields, then the button). */
  gridClassName: string;
  onSubmit: () => void;
  submitLabel: string;
  busy: boolean;
  canSubmit: boolean;
  /** The create mutation's error (null when there is none). */
  error: unknown;
  /** Shown under the form (e.g. why nothing can be chosen yet). */
  note?: ReactNode;
  children: ReactNode;
}) {
  return (
    <Card>
      <h2 className="text-lg font-semibold">{heading}</h2>
      <p className="mt-1 text-sm text-ink-soft">{intro}</p>
      <form
        className={`mt-4 grid gap-4 ${gridClassName} sm:items-end`}
        onSubmit={(e) => {
          e.preventDefault();
          onSubmit();
        }}
      >
        {children}
        <Button type="submit" busy={busy} disabled={!canSubmit}>
          {submitLabel}
        </Button>
      </form>
      {note}
      {error != null && Object.keys(fieldErrors(error)).length === 0 && (
        <Notice tone="error" className="mt-3">
          {errorMessage(error)}
        </Notice>
      )}
    </Card>
  );
}
