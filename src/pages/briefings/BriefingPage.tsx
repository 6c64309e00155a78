// One briefing: the bulletin version as sent (frozen text and figures), its PDF, and acknowledging receipt.
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { formatUtc } from '../../../shared/format';
import { briefingPdfUrl, useAcknowledgeBriefing, useBriefing } from '../../api/briefings';
import { DocumentView } from '../../editor/BulletinEditor';
import { useFrozenFigureSource } from '../../editor/sources';
import { Button, buttonClass, Card, ErrorState, LoadingState, Notice, PageHeader, errorMessage } from '../../components/ui';

export function BriefingPage() {
  const id = Number(useParams().id);
  const q = useBriefing(id);
  const ack = useAcknowledgeBriefing(id);
  const [comment, setComment] = useState('');
  const source = useFrozenFigureSource(q.data?.figures ?? []);
  if (q.isPending) return <LoadingState label="Loading the briefing…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const b = q.data;
  return (
    <div>
      <title>{`${b.bulletinNumber} v${b.version} · Briefing · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to="/briefings">← Briefings</Link>
      </p>
      <PageHeader
        title={`${b.bulletinNumber} version ${b.version}: ${b.title}`}
        intro={
          <p>
            {b.objectDesignation} · sent {formatUtc(b.sentAt, { seconds: false })}
            {b.sentBy && ` by ${b.sentBy.name}`}
          </p>
        }
        actions={
          <a href={briefingPdfUrl(b.id)} download className={buttonClass('secondary', 'no-underline')}>
            Download PDF
          </a>
        }
      />
      <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="rounded-lg border border-rule bg-white px-6 py-5">
          <DocumentView document={b.document} source={source} />
        </div>
        <aside>
          <Card className="!p-4" data-testid="acknowledge-card">
            <h2 className="text-base font-semibold">Acknowledge receipt</h2>
            {b.acknowledgedAt ? (
              <Notice tone="success" className="mt-3">
                You acknowledged this briefing on {formatUtc(b.acknowledgedAt, { seconds: false })}.
                {b.acknowledgeComment && <span className="mt-1 block">“{b.acknowledgeComment}”</span>}
              </Notice>
            ) : (
              <form
                className="mt-3 space-y-3"
                onSubmit={(e) => {
                  e.preventDefault();
                  ack.mutate(comment);
                }}
              >
                <p className="text-sm text-ink-soft">Tell the office you have received and read this version. They see who has and who has not.</p>
                <div>
                  <label htmlFor="ack-comment" className="mb-1 block text-sm font-medium">
                    Note to the office (optional)
                  </label>
                  <textarea id="ack-comment" rows={3} className="block w-full rounded-md border border-rule p-2 text-sm" value={comment} onChange={(e) => setComment(e.target.value)} />
                </div>
                {ack.isError && <Notice tone="error">{errorMessage(ack.error)}</Notice>}
                <Button type="submit" busy={ack.isPending} className="w-full">
                  Acknowledge receipt
                </Button>
              </form>
            )}
            <p className="mt-4 text-xs text-ink-soft break-all">SHA-256 {b.sha256}</p>
          </Card>
        </aside>
      </div>
    </div>
  );
}
