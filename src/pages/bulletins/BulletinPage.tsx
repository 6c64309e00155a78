// One bulletin: the draft (edited with autosave by its author, read by others), the workflow actions the shared
// table and the user's ability allow, the reviewer's sign-off, the locked versions with their PDFs, distribution,
// and the history of what happened.
import { useRef, useState } from 'react';
import { Link, useParams } from 'react-router';
import { availableActions, BULLETIN_ACTION_LABELS, BULLETIN_STATE_LABELS, type BulletinAction } from '../../../shared/bulletins/workflow';
import type { AppAbility } from '../../../shared/abilities';
import type { Role } from '../../../shared/roles';
import type { Bulletin } from '../../../shared/schemas/bulletins';
import { formatUtc } from '../../../shared/format';
import { useBulletin, useVersions, versionPdfUrl } from '../../api/bulletins';
import { useAuth } from '../../auth/AuthProvider';
import { useAppAbility } from '../../auth/useAppAbility';
import { DocumentView } from '../../editor/BulletinEditor';
import { useLiveFigureSource } from '../../editor/sources';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader } from '../../components/ui';
import { SimpleActionDialog, SubmitDialog } from './ActionDialogs';
import { BulletinStateBadge } from './BulletinState';
import { DistributeDialog, DistributionsSection } from './DistributionPanel';
import { DraftEditor, type DraftHandle } from './DraftEditor';
import { ReviewPanel } from './ReviewPanel';

/** Which actions to offer: the shared workflow table for this role and author, the CASL ability, and the server's answer. */
function actionsFor(b: Bulletin, user: { id: number; role: Role } | null, ability: AppAbility): BulletinAction[] {
  if (!user) return [];
  const fromTable = availableActions(b.state, user.role, user.id, b.author?.id ?? -1);
  // distribution goes through POST /api/distributions, every other action through POST .../transitions
  const permitted = (a: BulletinAction) => (a === 'distribute' ? ability.can('create', 'Distribution') : ability.can('transition', 'Bulletin'));
  return fromTable.filter((a) => b.allowedActions.includes(a) && permitted(a));
}

function ReadOnlyDraft({ bulletin }: { bulletin: Bulletin }) {
  const source = useLiveFigureSource(bulletin.objectId, bulletin.figures, false);
  return (
    <div className="rounded-lg border border-rule bg-white px-6 py-5">
      <h2 className="mb-3 font-serif text-xl font-bold">{bulletin.title}</h2>
      <DocumentView document={bulletin.document} source={source} />
    </div>
  );
}

function VersionsSection({ bulletin }: { bulletin: Bulletin }) {
  const versions = useVersions(bulletin.id);
  if (!versions.data || versions.data.length === 0) return null;
  return (
    <section aria-labelledby="versions-heading">
      <h2 id="versions-heading" className="mb-3 text-lg font-semibold">
        Approved versions
      </h2>
      <ul className="divide-y divide-rule rounded-lg border border-rule bg-white">
        {versions.data.map((v) => (
          <li key={v.version} className="flex flex-wrap items-center gap-x-4 gap-y-1 px-4 py-3 text-sm" data-testid={`version-${v.version}`}>
            <Link to={`/bulletins/${bulletin.id}/versions/${v.version}`} className="font-medium">
              Version {v.version}
            </Link>
            <BulletinStateBadge state={v.status} />
            <span className="text-ink-soft">
              approved {formatUtc(v.approvedAt, { seconds: false })}
              {v.reviewer && ` by ${v.reviewer.name}`}
            </span>
            <code className="text-xs text-ink-soft" title={`SHA-256 ${v.sha256}`}>
              {v.sha256.slice(0, 12)}…
            </code>
            <a href={versionPdfUrl(bulletin.id, v.version)} download className="ml-auto">
              PDF of version {v.version}
            </a>
          </li>
        ))}
      </ul>
    </section>
  );
}

/** Workflow actions by their table label; the service's own events (creation, saves) in plain words. */
function eventLabel(action: string): string {
  if (action in BULLETIN_ACTION_LABELS) return BULLETIN_ACTION_LABELS[action as BulletinAction];
  const own: Record<string, string> = { create: 'Created', supersede: 'Superseded', acknowledge: 'Acknowledged' };
  return own[action] ?? action.replace(/_/g, ' ');
}

function History({ bulletin }: { bulletin: Bulletin }) {
  if (bulletin.events.length === 0) return null;
  return (
    <section aria-labelledby="history-heading">
      <h2 id="history-heading" className="mb-3 text-lg font-semibold">
        History
      </h2>
      <ol className="space-y-2 border-l-2 border-rule pl-4 text-sm">
        {[...bulletin.events].reverse().map((e) => (
          <li key={e.id}>
            <span className="font-medium">{eventLabel(e.action)}</span>
            {e.toState && <span className="text-ink-soft"> → {BULLETIN_STATE_LABELS[e.toState]}</span>}
            {e.version !== null && <span className="text-ink-soft"> · v{e.version}</span>}
            <span className="text-ink-soft">
              {' '}
              · {e.actor?.name ?? 'system'} · {formatUtc(e.createdAt, { seconds: false })}
            </span>
            {e.comment && <p className="mt-0.5 text-ink-soft">“{e.comment}”</p>}
          </li>
        ))}
      </ol>
    </section>
  );
}

export function BulletinPage() {
  const id = Number(useParams().id);
  const q = useBulletin(id);
  const ability = useAppAbility();
  const { user } = useAuth();
  const draftRef = useRef<DraftHandle | null>(null);
  const [dialog, setDialog] = useState<BulletinAction | null>(null);
  if (q.isPending) return <LoadingState label="Loading the bulletin…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const b = q.data;
  const actions = actionsFor(b, user, ability);
  const editable = b.state === 'draft' && ability.can('update', 'Bulletin') && b.author?.id === user?.id;
  const reviewing = actions.includes('approve') || actions.includes('request_changes');
  const simple = actions.filter((a) => a === 'revise' || a === 'amend' || a === 'withdraw');
  const version = b.latestVersion;

  return (
    <div>
      <title>{`${b.number} · ${b.title} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to="/bulletins">← Bulletins</Link>
      </p>
      <PageHeader
        title={`${b.number}: ${b.title}`}
        intro={
          <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <BulletinStateBadge state={b.state} />
            <span>
              About{' '}
              {ability.can('read', 'TrackedObject') ? <Link to={`/objects/${b.objectId}`}>{b.objectDesignation}</Link> : b.objectDesignation}
            </span>
            {b.author && <span>· by {b.author.name}</span>}
            <span>
              · {b.state === 'approved' || b.state === 'distributed' || b.state === 'superseded' ? `version ${b.latestVersion}` : `drafting version ${b.draftVersion}, revision ${b.revision}`}
            </span>
          </p>
        }
        actions={
          <>
            {actions.includes('submit') && <Button onClick={() => setDialog('submit')}>Submit for review</Button>}
            {actions.includes('distribute') && version !== null && <Button onClick={() => setDialog('distribute')}>Distribute…</Button>}
            {simple.map((a) => (
              <Button key={a} variant={a === 'withdraw' ? 'danger-outline' : 'secondary'} onClick={() => setDialog(a)}>
                {BULLETIN_ACTION_LABELS[a]}
              </Button>
            ))}
          </>
        }
      />
      <div className="space-y-8">
        {b.state === 'changes_requested' && (
          <Notice tone="caution" title="Changes requested">
            {[...b.events].reverse().find((e) => e.action === 'request_changes')?.comment ?? 'See the history below.'}
          </Notice>
        )}
        {b.staleFigureCount > 0 && b.state === 'draft' && editable && (
          <Notice tone="caution" title={`${b.staleFigureCount} figure${b.staleFigureCount === 1 ? ' is' : 's are'} out of date`}>
            A newer run of {b.objectDesignation} exists. Each such figure shows the newer value beside it; use "Rebind" to take it.
          </Notice>
        )}
        {editable ? <DraftEditor key={b.id} bulletin={b} handle={draftRef} /> : <ReadOnlyDraft bulletin={b} />}
        {reviewing && <ReviewPanel bulletin={b} canApprove={actions.includes('approve')} canRequestChanges={actions.includes('request_changes')} />}
        <VersionsSection bulletin={b} />
        {ability.can('read', 'Distribution') && <DistributionsSection bulletinId={b.id} />}
        <History bulletin={b} />
      </div>
      <SubmitDialog bulletin={b} open={dialog === 'submit'} onClose={() => setDialog(null)} prepare={() => draftRef.current?.flush() ?? Promise.resolve(true)} />
      <SimpleActionDialog bulletin={b} action={dialog === 'revise' || dialog === 'amend' || dialog === 'withdraw' ? dialog : null} onClose={() => setDialog(null)} />
      {version !== null && <DistributeDialog bulletinId={b.id} version={version} open={dialog === 'distribute'} onClose={() => setDialog(null)} />}
    </div>
  );
}
