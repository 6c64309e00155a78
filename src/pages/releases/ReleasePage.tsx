// One press release: the wording (edited with autosave by its author while a draft, read by others), the standing
// public caution, the plain-language statements and the figures copied from the bulletin version, the workflow
// actions the shared table, the user's ability and the server allow (submit, review, schedule in the user's time
// zone, reschedule, take off the schedule, amend, cancel), the publication record and the history.
import { useRef, useState } from 'react';
import { Link, useParams } from 'react-router';
import type { AppAbility } from '../../../shared/abilities';
import { availableReleaseActions, findReleaseTransition, RELEASE_ACTION_LABELS, RELEASE_STATE_LABELS, type ReleaseAction } from '../../../shared/releases/workflow';
import type { Role } from '../../../shared/roles';
import { findRoute } from '../../../shared/routes';
import type { Release } from '../../../shared/schemas/releases';
import { formatUtc } from '../../../shared/format';
import { useRelease, useReleaseTransition, useReleaseVersion } from '../../api/releases';
import { useAuth } from '../../auth/AuthProvider';
import { useAppAbility } from '../../auth/useAppAbility';
import { ConfirmDialog } from '../../components/ConfirmDialog';
import { DocumentView } from '../../editor/BulletinEditor';
import { useFrozenFigureSource } from '../../editor/sources';
import { Button, ErrorState, LoadingState, Notice, PageHeader } from '../../components/ui';
import { ReleaseDraft, type ReleaseDraftHandle } from './ReleaseDraft';
import { CopiedFigures, PlainLanguagePanel, PublicationPanel, PublicCaution, ReleaseStateBadge, SourceLine } from './ReleaseParts';
import { ScheduleDialog } from './ScheduleDialog';

/** Whether the user's ability allows the API call behind an action (the route table names the ability it needs). */
function routeAllows(ability: AppAbility, id: number): boolean {
  const route = findRoute('POST', `/api/releases/${id}/transitions`);
  return !!route && ability.can(route.action, route.subject);
}

/** Which actions to offer: the shared workflow table for this role and author, the CASL ability, and the server's answer. */
function actionsFor(r: Release, user: { id: number; role: Role } | null, ability: AppAbility): ReleaseAction[] {
  if (!user || !routeAllows(ability, r.id)) return [];
  return availableReleaseActions(r.state, user.role, user.id, r.author?.id ?? -1).filter((a) => r.allowedActions.includes(a));
}

const DIALOG_TEXT: Partial<Record<ReleaseAction, string>> = {
  submit: 'A reviewer other than you checks the public wording against the bulletin version and approves it. You cannot edit it while it is in review.',
  approve: 'Approving locks this wording as a version. Communications staff can then schedule its publication.',
  request_changes: 'The draft goes back to its author with your comment.',
  revise: 'The draft returns to editing with the reviewer’s comments.',
  amend: 'A new draft of the wording starts from the approved one; the approved version stays as it is until the new one is approved.',
  unschedule: 'The release goes back to approved and is not published; the embargo stays in force until it is scheduled again.',
  cancel: 'The release is cancelled and never published. This cannot be undone.',
};

function ActionDialog({ release, action, onClose, prepare }: { release: Release; action: ReleaseAction | null; onClose: () => void; prepare: () => Promise<boolean> }) {
  const transition = useReleaseTransition(release.id);
  const [comment, setComment] = useState('');
  const [saveError, setSaveError] = useState<string | null>(null);
  const required = action ? !!findReleaseTransition(release.state, action)?.commentRequired : false;
  const close = () => {
    transition.reset();
    setComment('');
    setSaveError(null);
    onClose();
  };
  return (
    <ConfirmDialog
      open={action !== null}
      title={action ? RELEASE_ACTION_LABELS[action] : ''}
      confirmLabel={action ? RELEASE_ACTION_LABELS[action] : 'OK'}
      tone={action === 'cancel' ? 'danger' : 'primary'}
      busy={transition.isPending}
      confirmDisabled={required && !comment.trim()}
      error={transition.error ?? (saveError ? new Error(saveError) : null)}
      onCancel={close}
      onConfirm={async () => {
        if (!action) return;
        if (action === 'submit' && !(await prepare())) return setSaveError('The latest changes could not be saved; resolve that first.');
        transition.mutate({ action, comment: comment.trim() || undefined }, { onSuccess: close });
      }}
    >
      {action && DIALOG_TEXT[action] && <p>{DIALOG_TEXT[action]}</p>}
      <div>
        <label htmlFor="release-action-comment" className="mb-1 block font-medium text-ink">
          Comment{required ? '' : ' (optional)'}
        </label>
        <textarea
          id="release-action-comment"
          rows={3}
          className="block w-full rounded-md border border-rule p-2 text-sm text-ink"
          value={comment}
          onChange={(e) => setComment(e.target.value)}
          required={required}
        />
      </div>
    </ConfirmDialog>
  );
}

function ReadOnlyWording({ release }: { release: Release }) {
  const source = useFrozenFigureSource(release.figures);
  return (
    <article className="rounded-lg border border-rule bg-white px-6 py-5" data-testid="release-wording">
      <h2 className="font-serif text-xl font-bold">{release.title}</h2>
      {release.summary && <p className="mt-2 font-serif text-ink-soft">{release.summary}</p>}
      <div className="mt-3">
        <DocumentView document={release.document} source={source} />
      </div>
    </article>
  );
}

/** While a new version of the wording is drafted, the approved one stays as it is: shown folded, with its hash. */
function ApprovedVersion({ release }: { release: Release }) {
  const q = useReleaseVersion(release.id, release.latestVersion);
  const source = useFrozenFigureSource(q.data?.figures ?? []);
  if (!q.data) return null;
  const v = q.data;
  return (
    <details className="rounded-lg border border-rule bg-white px-5 py-3" data-testid="approved-version">
      <summary className="cursor-pointer text-sm font-medium">
        Approved version {v.version} ({v.reviewer ? `approved by ${v.reviewer.name}, ` : ''}
        {formatUtc(v.approvedAt, { seconds: false })}) · <code className="text-xs">{v.sha256.slice(0, 12)}…</code>
      </summary>
      <div className="mt-3">
        <h3 className="font-serif text-lg font-bold">{v.title}</h3>
        {v.summary && <p className="mt-1 font-serif text-ink-soft">{v.summary}</p>}
        <DocumentView document={v.document} source={source} />
      </div>
    </details>
  );
}

function History({ release }: { release: Release }) {
  if (release.events.length === 0) return null;
  return (
    <section aria-labelledby="release-history-heading">
      <h2 id="release-history-heading" className="mb-3 text-lg font-semibold">
        History
      </h2>
      <ol className="space-y-2 border-l-2 border-rule pl-4 text-sm">
        {[...release.events].reverse().map((e) => (
          <li key={e.id}>
            <span className="font-medium">{e.action in RELEASE_ACTION_LABELS ? RELEASE_ACTION_LABELS[e.action as ReleaseAction] : e.action}</span>
            {e.toState && <span className="text-ink-soft"> → {RELEASE_STATE_LABELS[e.toState]}</span>}
            {e.version !== null && <span className="text-ink-soft"> · v{e.version}</span>}
            {e.publishAt && <span className="text-ink-soft"> · for {formatUtc(e.publishAt)}</span>}
            <span className="text-ink-soft">
              {' '}
              · {e.actor?.name ?? 'scheduler'} · {formatUtc(e.createdAt)}
            </span>
            {e.comment && <p className="mt-0.5 text-ink-soft">“{e.comment}”</p>}
          </li>
        ))}
      </ol>
    </section>
  );
}

export function ReleasePage() {
  const id = Number(useParams().id);
  const q = useRelease(id);
  const ability = useAppAbility();
  const { user } = useAuth();
  const draftRef = useRef<ReleaseDraftHandle | null>(null);
  const [dialog, setDialog] = useState<ReleaseAction | null>(null);
  if (q.isPending) return <LoadingState label="Loading the release…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const r = q.data;
  const actions = actionsFor(r, user, ability);
  const editable = r.state === 'draft' && ability.can('update', 'Release') && r.author?.id === user?.id;
  const scheduleAction = actions.includes('schedule') ? 'schedule' : actions.includes('reschedule') ? 'reschedule' : null;
  const other = actions.filter((a) => a !== 'schedule' && a !== 'reschedule');
  const versionLabel =
    r.state === 'draft' || r.state === 'in_review' || r.state === 'changes_requested'
      ? `drafting version ${r.draftVersion}, revision ${r.revision}`
      : r.latestVersion !== null
        ? `version ${r.latestVersion}`
        : '';

  return (
    <div>
      <title>{`${r.number} · ${r.title} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to="/releases">← Releases</Link>
      </p>
      <PageHeader
        title={`${r.number}: ${r.title}`}
        intro={
          <>
            <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
              <ReleaseStateBadge state={r.state} />
              {r.author && <span>by {r.author.name}</span>}
              {versionLabel && <span>· {versionLabel}</span>}
            </p>
            <p className="mt-1 text-sm">
              <SourceLine source={r.source} />
            </p>
          </>
        }
        actions={
          <>
            {scheduleAction && <Button onClick={() => setDialog(scheduleAction)}>{scheduleAction === 'schedule' ? 'Schedule publication…' : 'Reschedule…'}</Button>}
            {other.map((a) => (
              <Button key={a} variant={a === 'cancel' ? 'danger-outline' : a === 'submit' || a === 'approve' ? 'primary' : 'secondary'} onClick={() => setDialog(a)}>
                {RELEASE_ACTION_LABELS[a]}
              </Button>
            ))}
          </>
        }
      />
      <div className="space-y-6">
        <PublicCaution text={r.plainLanguage.caution} />
        {r.state === 'changes_requested' && (
          <Notice tone="caution" title="Changes requested">
            {[...r.events].reverse().find((e) => e.action === 'request_changes')?.comment ?? 'See the history below.'}
          </Notice>
        )}
        {r.state === 'cancelled' && <Notice tone="error" title="Cancelled">This release was cancelled and is never published.</Notice>}
        <PublicationPanel state={r.state} publication={r.publication} />
        {editable ? (
          <ReleaseDraft key={`${r.id}-${r.draftVersion}`} release={r} handle={draftRef} />
        ) : (
          <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(16rem,1fr)]">
            <ReadOnlyWording release={r} />
            <CopiedFigures figures={r.figures} source={r.source} />
          </div>
        )}
        {r.latestVersion !== null && (r.state === 'draft' || r.state === 'in_review' || r.state === 'changes_requested') && <ApprovedVersion release={r} />}
        <PlainLanguagePanel plain={r.plainLanguage} />
        <History release={r} />
      </div>
      <ActionDialog
        release={r}
        action={dialog && dialog !== 'schedule' && dialog !== 'reschedule' ? dialog : null}
        onClose={() => setDialog(null)}
        prepare={() => draftRef.current?.flush() ?? Promise.resolve(true)}
      />
      {scheduleAction && <ScheduleDialog key={scheduleAction} release={r} action={scheduleAction} open={dialog === scheduleAction} onClose={() => setDialog(null)} />}
    </div>
  );
}
