// The runs of one object (object page): newest first with live status, and the start-run form for those allowed.
import { Link } from 'react-router';
import type { SolutionSummary } from '../../../shared/schemas/objects';
import { useObjectRuns } from '../../api/runs';
import { useAppAbility } from '../../auth/useAppAbility';
import { ErrorState, LoadingState } from '../../components/ui';
import { formatUtc } from '../objects/format';
import { RunStatusBadge, progressText } from './RunStatus';
import { StartRunForm } from './StartRunForm';

function RunList({ objectId }: { objectId: number }) {
  const runs = useObjectRuns(objectId);
  if (runs.isPending) return <LoadingState label="Loading runs…" />;
  if (runs.isError) return <ErrorState error={runs.error} onRetry={() => runs.refetch()} />;
  if (runs.data.length === 0) return <p className="text-ink-soft">No run yet.</p>;
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-white">
      <table className="w-full min-w-[44rem] text-left text-sm">
        <thead className="bg-accent-50">
          <tr>
            <th scope="col" className="px-3 py-2">Run</th>
            <th scope="col" className="px-3 py-2">Version</th>
            <th scope="col" className="px-3 py-2">Methods</th>
            <th scope="col" className="px-3 py-2">Window end</th>
            <th scope="col" className="px-3 py-2">Status</th>
            <th scope="col" className="px-3 py-2">Requested</th>
          </tr>
        </thead>
        <tbody>
          {runs.data.map((r) => (
            <tr key={r.id} className="border-t border-rule tabular-nums" data-testid={`run-row-${r.id}`}>
              <td className="px-3 py-2 font-semibold"><Link to={`/runs/${r.id}`}>#{r.id}</Link></td>
              <td className="px-3 py-2">v{r.solutionVersion}</td>
              <td className="px-3 py-2">{r.options.methods.join(', ')}{r.options.methods.includes('mc') ? ` (${r.options.clones} clones)` : ''}</td>
              <td className="px-3 py-2">{r.options.until}</td>
              <td className="px-3 py-2"><RunStatusBadge status={r.status} /> <span className="text-ink-soft">{progressText(r)}</span></td>
              <td className="px-3 py-2">{formatUtc(r.createdAt)}{r.createdBy ? ` · ${r.createdBy.name}` : ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function ObjectRuns({ objectId, solutions }: { objectId: number; solutions: SolutionSummary[] }) {
  const ability = useAppAbility();
  if (!ability.can('read', 'Run')) return null;
  return (
    <section aria-labelledby="runs-heading" className="space-y-4">
      <h2 id="runs-heading" className="text-lg font-semibold">Assessment runs</h2>
      <RunList objectId={objectId} />
      {ability.can('create', 'Run') && <StartRunForm solutions={solutions} />}
    </section>
  );
}
