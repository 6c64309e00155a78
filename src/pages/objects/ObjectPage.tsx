// One tracked object: its details (name, notes, watch status), its solution versions, adding a version,
// and choosing two versions to compare.
import { useState } from 'react';
import { Link, useNavigate, useParams, useSearchParams } from 'react-router';
import { SOLUTION_SOURCE_LABELS, TRACKED_OBJECT_KIND_LABELS, type SolutionSummary } from '../../../shared/schemas/objects';
import { useObject, useSolutions, useUpdateObject } from '../../api/objects';
import { useAppAbility } from '../../auth/useAppAbility';
import { Button, Card, ErrorState, LoadingState, Notice, PageHeader, errorMessage } from '../../components/ui';
import { formatNumber, formatUtc } from './format';
import { formatUnboundSignificance } from '../../../shared/format';
import { SolutionDetail } from './SolutionDetail';
import { UploadSolutionForm } from './UploadSolutionForm';
import { ObjectRuns } from '../runs/ObjectRuns';
import { ObjectOdLinks } from '../fits/ObjectOdLinks';

function NotesEditor({ id, notes }: { id: number; notes: string }) {
  const update = useUpdateObject(id);
  const [text, setText] = useState(notes);
  return (
    <div>
      <label htmlFor="object-notes" className="mb-1 block text-sm font-medium">Notes</label>
      <textarea id="object-notes" rows={3} className="block w-full rounded-md border border-rule p-2 text-sm" value={text} onChange={(e) => setText(e.target.value)} />
      <Button variant="secondary" className="mt-2" busy={update.isPending} disabled={text === notes} onClick={() => update.mutate({ notes: text })}>
        Save notes
      </Button>
      {update.isError && <Notice tone="error" className="mt-2">{errorMessage(update.error)}</Notice>}
    </div>
  );
}

function VersionsTable({ objectId, solutions, onShow }: { objectId: number; solutions: SolutionSummary[]; onShow: (version: number) => void }) {
  const navigate = useNavigate();
  const [picked, setPicked] = useState<number[]>([]);
  const toggle = (v: number) => setPicked((p) => (p.includes(v) ? p.filter((x) => x !== v) : [...p, v].slice(-2)));
  const [a, b] = [...picked].sort((x, y) => x - y);
  return (
    <section aria-labelledby="versions-heading">
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <h2 id="versions-heading" className="text-lg font-semibold">Solution versions</h2>
        <Button variant="secondary" disabled={picked.length !== 2} onClick={() => navigate(`/objects/${objectId}/compare?a=${a}&b=${b}`)}>
          Compare the two ticked versions
        </Button>
      </div>
      {solutions.length === 0 ? (
        <p className="text-ink-soft">No solution yet.</p>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-rule bg-white">
          <table className="w-full min-w-[52rem] text-left text-sm">
            <thead className="bg-accent-50">
              <tr>
                <th scope="col" className="px-3 py-2"><span className="sr-only">Compare</span></th>
                <th scope="col" className="px-3 py-2">Version</th>
                <th scope="col" className="px-3 py-2">Source</th>
                <th scope="col" className="px-3 py-2">Epoch (UTC)</th>
                <th scope="col" className="px-3 py-2">Arc, obs., RMS</th>
                <th scope="col" className="px-3 py-2">Force model</th>
                <th scope="col" className="px-3 py-2">e ± 1σ</th>
                <th scope="col" className="px-3 py-2">Unbound significance</th>
                <th scope="col" className="px-3 py-2">Added</th>
              </tr>
            </thead>
            <tbody>
              {solutions.map((s) => (
                <tr key={s.id} className="border-t border-rule tabular-nums" data-testid={`version-row-${s.version}`}>
                  <td className="px-3 py-2">
                    <input type="checkbox" aria-label={`Compare version ${s.version}`} checked={picked.includes(s.version)} onChange={() => toggle(s.version)} />
                  </td>
                  <td className="px-3 py-2 font-semibold">
                    <button type="button" className="text-accent-700 underline" onClick={() => onShow(s.version)} aria-label={`Show version ${s.version}`}>
                      v{s.version}
                    </button>
                  </td>
                  <td className="px-3 py-2">{SOLUTION_SOURCE_LABELS[s.sourceKind]}{s.fileName ? ` · ${s.fileName}` : ''}</td>
                  <td className="px-3 py-2">{formatUtc(s.epochUtc)}</td>
                  <td className="px-3 py-2">
                    {/* rounded for display: a version adopted from a fit carries the full-precision arc and RMS */}
                    {s.observationArcDays === null ? '—' : Number(s.observationArcDays.toFixed(2))} d · {s.observationCount ?? '—'} ·{' '}
                    {s.fitRmsArcsec === null ? '—' : Number(s.fitRmsArcsec.toPrecision(3))}″
                  </td>
                  <td className="px-3 py-2">{s.forceModel === 'gravity-only' ? 'Gravity only' : `With ${s.nonGravTerms.join(', ')}`}</td>
                  <td className="px-3 py-2">
                    {formatNumber(s.classification.eccentricity, 7)} {s.classification.eccentricitySigma !== null ? `± ${formatNumber(s.classification.eccentricitySigma, 2)}` : ''}
                  </td>
                  <td className="px-3 py-2">{formatUnboundSignificance(s.classification.unboundSignificance)}</td>
                  <td className="px-3 py-2">{formatUtc(s.createdAt)}{s.createdBy ? ` · ${s.createdBy.name}` : ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

export function ObjectPage() {
  const id = Number(useParams().id);
  const ability = useAppAbility();
  const object = useObject(id);
  const solutions = useSolutions(id);
  const update = useUpdateObject(id);
  const [added, setAdded] = useState<number | null>(null);
  // ?version=N opens that version (links from an adopted orbit fit land here)
  const [search] = useSearchParams();
  const [shown, setShown] = useState<number | null>(() => (Number(search.get('version')) > 0 ? Number(search.get('version')) : null));
  if (object.isPending) return <LoadingState label="Loading the object…" />;
  if (object.isError) return <ErrorState error={object.error} onRetry={() => object.refetch()} />;
  const o = object.data;
  const canEdit = ability.can('update', 'TrackedObject');
  return (
    <div>
      <title>{`${o.designation} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to="/objects">← All objects</Link>
      </p>
      <PageHeader
        title={o.name ? `${o.designation} (${o.name})` : o.designation}
        intro={<p>{TRACKED_OBJECT_KIND_LABELS[o.kind]} · {o.solutionCount} solution version{o.solutionCount === 1 ? '' : 's'} · {o.watch ? 'on the watch list' : 'not watched'}</p>}
        actions={
          canEdit ? (
            <Button variant="secondary" busy={update.isPending} onClick={() => update.mutate({ watch: !o.watch })}>
              {o.watch ? 'Stop watching' : 'Watch'}
            </Button>
          ) : undefined
        }
      />
      <div className="space-y-8">
        {canEdit ? <NotesEditor key={o.notes} id={id} notes={o.notes} /> : o.notes && <p className="whitespace-pre-wrap">{o.notes}</p>}
        {added !== null && <Notice tone="success">Version {added} was added.</Notice>}
        {solutions.isPending ? (
          <LoadingState label="Loading versions…" />
        ) : solutions.isError ? (
          <ErrorState error={solutions.error} onRetry={() => solutions.refetch()} />
        ) : (
          <VersionsTable objectId={id} solutions={solutions.data} onShow={setShown} />
        )}
        {shown !== null && <SolutionDetail key={shown} objectId={id} version={shown} onClose={() => setShown(null)} />}
        <ObjectOdLinks objectId={id} />
        {/* keyed on the newest version so the start-run form picks up a version added meanwhile (e.g. an adopted fit) */}
        {solutions.data && <ObjectRuns key={solutions.data[0]?.id ?? 0} objectId={id} solutions={solutions.data} />}
        {ability.can('create', 'Solution') && <UploadSolutionForm objectId={id} onDone={setAdded} />}
      </div>
    </div>
  );
}
