// One locked version: the frozen text and figures, the sign-off, the SHA-256 of its canonical JSON, its PDF, and
// readable differences from an earlier version (text lines and figures).
import { Link, useParams, useSearchParams } from 'react-router';
import { FIGURE_QUANTITY_LABELS } from '../../../shared/bulletins/document';
import type { FigureDiff, VersionDiff } from '../../../shared/schemas/bulletins';
import { formatUtc } from '../../../shared/format';
import { useVersion, useVersions, versionPdfUrl } from '../../api/bulletins';
import { DocumentView } from '../../editor/BulletinEditor';
import { useFrozenFigureSource } from '../../editor/sources';
import { buttonClass, Card, ErrorState, LoadingState, PageHeader, SelectField } from '../../components/ui';
import { BulletinStateBadge } from './BulletinState';

const CHANGE_LABELS: Record<FigureDiff['change'], string> = {
  added: 'added',
  removed: 'removed',
  changed: 'value changed',
  rebound: 'bound to another run',
  unchanged: 'unchanged',
};

function DiffView({ diff }: { diff: VersionDiff }) {
  const changedFigures = diff.figures.filter((f) => f.change !== 'unchanged');
  return (
    <div className="space-y-5" data-testid="version-diff">
      {diff.title && (
        <p className="text-sm">
          Title: <del className="bg-danger-50 text-danger-700">{diff.title.before}</del> → <ins className="bg-ok-50 text-ok-700 no-underline">{diff.title.after}</ins>
        </p>
      )}
      <div>
        <h3 className="mb-2 text-sm font-semibold">Figures</h3>
        {changedFigures.length === 0 ? (
          <p className="text-sm text-ink-soft">No figure changed ({diff.figures.length} unchanged).</p>
        ) : (
          <table className="w-full text-left text-sm">
            <thead className="text-xs text-ink-soft">
              <tr>
                <th scope="col" className="py-1 pr-3 font-medium">Figure</th>
                <th scope="col" className="py-1 pr-3 font-medium">Change</th>
                <th scope="col" className="py-1 pr-3 font-medium">Version {diff.against}</th>
                <th scope="col" className="py-1 font-medium">This version</th>
              </tr>
            </thead>
            <tbody>
              {changedFigures.map((f, i) => (
                <tr key={i} className="border-t border-rule align-top">
                  <td className="py-1.5 pr-3">{FIGURE_QUANTITY_LABELS[f.quantity]}</td>
                  <td className="py-1.5 pr-3 text-ink-soft">{CHANGE_LABELS[f.change]}</td>
                  <td className="py-1.5 pr-3 font-serif tabular-nums">
                    {f.before ? (
                      <>
                        <span className="bg-danger-50 text-danger-700">{f.before.text}</span>
                        <span className="block font-sans text-xs text-ink-soft">run #{f.before.runId}</span>
                      </>
                    ) : (
                      '—'
                    )}
                  </td>
                  <td className="py-1.5 font-serif tabular-nums">
                    {f.after ? (
                      <>
                        <span className="bg-ok-50 text-ok-700">{f.after.text}</span>
                        <span className="block font-sans text-xs text-ink-soft">run #{f.after.runId}</span>
                      </>
                    ) : (
                      '—'
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </div>
      <div>
        <h3 className="mb-2 text-sm font-semibold">Text</h3>
        <div className="rounded-md border border-rule bg-white p-3 font-serif text-sm leading-relaxed">
          {diff.text.every((op) => op.op === 'equal') ? (
            <p className="font-sans text-ink-soft">The text is the same.</p>
          ) : (
            diff.text.map((op, i) =>
              op.op === 'equal' ? (
                <p key={i} className="text-ink-soft whitespace-pre-wrap">{op.text}</p>
              ) : op.op === 'insert' ? (
                <p key={i} className="border-l-4 border-ok-700 bg-ok-50 pl-2 whitespace-pre-wrap text-ok-700">
                  <span className="sr-only">Added: </span>
                  {op.text}
                </p>
              ) : (
                <p key={i} className="border-l-4 border-danger-700 bg-danger-50 pl-2 whitespace-pre-wrap text-danger-700 line-through">
                  <span className="sr-only">Removed: </span>
                  {op.text}
                </p>
              ),
            )
          )}
        </div>
      </div>
    </div>
  );
}

export function VersionPage() {
  const params = useParams();
  const id = Number(params.id);
  const version = Number(params.version);
  const [search, setSearch] = useSearchParams();
  const against = search.get('against') ? Number(search.get('against')) : null;
  const q = useVersion(id, version, against);
  const versions = useVersions(id);
  const source = useFrozenFigureSource(q.data?.figures ?? []);
  if (q.isPending) return <LoadingState label="Loading the version…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const v = q.data;
  const status = versions.data?.find((x) => x.version === version)?.status ?? v.status;
  const earlier = (versions.data ?? []).filter((x) => x.version < version);
  return (
    <div>
      <title>{`${v.number} v${v.version} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/bulletins/${id}`}>← {v.number}</Link>
      </p>
      <PageHeader
        title={`${v.number} version ${v.version}: ${v.title}`}
        intro={
          <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <BulletinStateBadge state={status} />
            <span>About {v.objectDesignation}</span>
            <span>· approved {formatUtc(v.signOff.approvedAt, { seconds: false })}</span>
          </p>
        }
        actions={
          <a href={versionPdfUrl(id, version)} download className={buttonClass('primary', 'no-underline hover:text-white')}>
            Download PDF
          </a>
        }
      />
      <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <div className="rounded-lg border border-rule bg-white px-6 py-5">
          <DocumentView document={v.document} source={source} />
        </div>
        <aside className="space-y-4 text-sm">
          <Card className="!p-4">
            <h2 className="text-base font-semibold">Sign-off</h2>
            <dl className="mt-2 space-y-1">
              <dt className="text-ink-soft">Author</dt>
              <dd>{v.author?.name ?? '—'}</dd>
              <dt className="text-ink-soft">Reviewer</dt>
              <dd>{v.signOff.reviewer.name}</dd>
              <dt className="text-ink-soft">Figures confirmed</dt>
              <dd>
                {v.signOff.confirmedFigures.length} of {v.figures.length}
              </dd>
              {v.signOff.comment && (
                <>
                  <dt className="text-ink-soft">Comment</dt>
                  <dd>“{v.signOff.comment}”</dd>
                </>
              )}
              {v.staleReason && (
                <>
                  <dt className="text-ink-soft">Submitted with out-of-date figures because</dt>
                  <dd>{v.staleReason}</dd>
                </>
              )}
            </dl>
          </Card>
          <Card className="!p-4">
            <h2 className="text-base font-semibold">Integrity</h2>
            <p className="mt-2 text-ink-soft">SHA-256 of the version's canonical JSON:</p>
            <code className="mt-1 block font-mono text-xs break-all" data-testid="version-sha256">
              {v.sha256}
            </code>
            <p className="mt-2 text-ink-soft">Runs: {v.runIds.map((r) => `#${r}`).join(', ') || '—'}</p>
          </Card>
        </aside>
      </div>
      {(v.diff || earlier.length > 0) && (
        <section aria-labelledby="diff-heading" className="mt-10">
          <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
            <h2 id="diff-heading" className="text-lg font-semibold">
              Differences{v.diff ? ` from version ${v.diff.against}` : ''}
            </h2>
            {earlier.length > 1 && (
              <SelectField
                label="Compare with"
                className="w-48"
                value={v.diff?.against ?? ''}
                onChange={(e) => setSearch(e.target.value ? { against: e.target.value } : {})}
              >
                {earlier.map((x) => (
                  <option key={x.version} value={x.version}>
                    Version {x.version}
                  </option>
                ))}
              </SelectField>
            )}
          </div>
          {v.diff ? <DiffView diff={v.diff} /> : <p className="text-ink-soft">This is the first version.</p>}
        </section>
      )}
    </div>
  );
}
