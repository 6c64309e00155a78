// A liaison's briefing inbox: every bulletin version sent to them, newest first, with whether they acknowledged it.
import { Link } from 'react-router';
import { formatUtc } from '../../../shared/format';
import { useBriefings } from '../../api/briefings';
import { ErrorState, LoadingState, PageHeader } from '../../components/ui';

export function BriefingsPage() {
  const q = useBriefings();
  const open = q.data?.filter((b) => !b.acknowledgedAt).length ?? 0;
  return (
    <div>
      <title>Briefings · Tocsin</title>
      <PageHeader
        title="Briefings"
        intro={q.isSuccess ? (open > 0 ? `${open} briefing${open === 1 ? '' : 's'} waiting for your acknowledgement.` : 'You have acknowledged every briefing.') : 'Bulletins the office has sent to you.'}
      />
      {q.isPending && <LoadingState label="Loading your briefings…" />}
      {q.isError && <ErrorState error={q.error} onRetry={() => q.refetch()} />}
      {q.isSuccess &&
        (q.data.length === 0 ? (
          <p className="text-ink-soft">Nothing has been sent to you yet.</p>
        ) : (
          <ul className="divide-y divide-rule rounded-lg border border-rule bg-white">
            {q.data.map((b) => (
              <li key={b.id} className="flex flex-wrap items-center gap-x-4 gap-y-1 px-4 py-3" data-testid={`briefing-${b.id}`}>
                <span aria-hidden="true" className={`size-2.5 rounded-full ${b.acknowledgedAt ? 'bg-rule' : 'bg-signal-700'}`} />
                <div className="min-w-0 flex-1">
                  <Link to={`/briefings/${b.id}`} className={`font-serif ${b.acknowledgedAt ? '' : 'font-bold'}`}>
                    {b.bulletinNumber} v{b.version}: {b.title}
                  </Link>
                  <p className="text-sm text-ink-soft">
                    {b.objectDesignation} · sent {formatUtc(b.sentAt, { seconds: false })}
                    {b.sentBy && ` by ${b.sentBy.name}`}
                  </p>
                </div>
                <span className={`text-sm ${b.acknowledgedAt ? 'text-ok-700' : 'font-medium text-signal-700'}`}>
                  {b.acknowledgedAt ? `Acknowledged ${formatUtc(b.acknowledgedAt, { seconds: false })}` : 'Not acknowledged'}
                </span>
              </li>
            ))}
          </ul>
        ))}
    </div>
  );
}
