// Two solution versions side by side: elements and their 1-sigma, non-gravitational parameters, the unbound
// significance, and σ(b)/σ(a) per element, so a widened uncertainty is visible at a glance.
import { Link, useParams, useSearchParams } from 'react-router';
import type { CompareRow, SolutionSummary } from '../../../shared/schemas/objects';
import { useCompare } from '../../api/objects';
import { ErrorState, LoadingState, Notice, PageHeader } from '../../components/ui';
import { formatNumber, formatRatio, formatSigma, formatUtc } from './format';
import { formatUnboundSignificance } from '../../../shared/format';

function ratioClass(r: number | null): string {
  if (r === null) return 'text-ink-soft';
  if (r > 1.1) return 'bg-signal-50 font-semibold text-signal-700';
  if (r < 1 / 1.1) return 'bg-ok-50 font-semibold text-ok-700';
  return '';
}

function Rows({ rows, title }: { rows: CompareRow[]; title: string }) {
  return (
    <tbody>
      <tr>
        <th colSpan={6} scope="colgroup" className="bg-accent-50 px-3 py-2 text-left">{title}</th>
      </tr>
      {rows.map((r) => (
        <tr key={r.key} className="border-t border-rule tabular-nums" data-testid={`compare-row-${r.key}`}>
          <th scope="row" className="px-3 py-2 text-left font-medium">
            {r.label} {r.unit && <span className="text-ink-soft">[{r.unit}]</span>}
          </th>
          <td className="px-3 py-2">{formatNumber(r.a.value, 9)}</td>
          <td className="px-3 py-2">{formatSigma(r.a.sigma)}</td>
          <td className="px-3 py-2">{formatNumber(r.b.value, 9)}</td>
          <td className="px-3 py-2">{formatSigma(r.b.sigma)}</td>
          <td className={`px-3 py-2 ${ratioClass(r.sigmaRatio)}`}>
            {formatRatio(r.sigmaRatio)}
            {r.sigmaRatio !== null && r.sigmaRatio > 1.1 && <span className="sr-only"> (uncertainty widened)</span>}
          </td>
        </tr>
      ))}
    </tbody>
  );
}

function describe(s: SolutionSummary): string {
  return `v${s.version} · ${s.forceModel === 'gravity-only' ? 'gravity only' : `with ${s.nonGravTerms.join(', ')}`} · epoch ${formatUtc(s.epochUtc)}`;
}

export function ComparePage() {
  const id = Number(useParams().id);
  const [params] = useSearchParams();
  const a = Number(params.get('a')) || null;
  const b = Number(params.get('b')) || null;
  const cmp = useCompare(id, a, b);
  if (a === null || b === null || a === b) return <Notice tone="error">Choose two different versions to compare.</Notice>;
  if (cmp.isPending) return <LoadingState label="Comparing…" />;
  if (cmp.isError) return <ErrorState error={cmp.error} onRetry={() => cmp.refetch()} />;
  const c = cmp.data;
  const S = (s: SolutionSummary) => formatUnboundSignificance(s.classification.unboundSignificance);
  return (
    <div>
      <title>{`Compare v${a} and v${b} · Tocsin`}</title>
      <p className="mb-2 text-sm">
        <Link to={`/objects/${id}`}>← Back to the object</Link>
      </p>
      <PageHeader title={`Version ${a} against version ${b}`} intro={<p>{describe(c.a)}<br />{describe(c.b)}</p>} />
      {c.summary.widened.length > 0 && (
        <Notice tone="caution" title="The uncertainty widened" className="mb-4">
          σ grew from v{a} to v{b} for {c.summary.widened.join(', ')}
          {c.summary.meanSigmaRatio !== null && ` (geometric mean ratio ${formatRatio(c.summary.meanSigmaRatio)})`}.
          {c.b.nonGravTerms.length > c.a.nonGravTerms.length && ' Version ' + b + ' adds non-gravitational terms: a better fit with more free parameters usually widens the uncertainty.'}
        </Notice>
      )}
      <div className="overflow-x-auto rounded-lg border border-rule bg-white">
        <table className="w-full min-w-[48rem] text-sm">
          <thead>
            <tr className="text-left">
              <th scope="col" className="px-3 py-2">Quantity</th>
              <th scope="col" className="px-3 py-2">v{a}</th>
              <th scope="col" className="px-3 py-2">1σ</th>
              <th scope="col" className="px-3 py-2">v{b}</th>
              <th scope="col" className="px-3 py-2">1σ</th>
              <th scope="col" className="px-3 py-2">σ ratio v{b}/v{a}</th>
            </tr>
          </thead>
          <Rows rows={c.elements} title="Osculating elements (J2000 ecliptic)" />
          <Rows rows={c.nonGrav} title="Non-gravitational parameters" />
          <tbody>
            <tr className="border-t border-rule tabular-nums">
              <th scope="row" className="px-3 py-2 text-left font-medium">Unbound significance (e − 1)/σe</th>
              <td className="px-3 py-2" colSpan={2}>{S(c.a)}</td>
              <td className="px-3 py-2" colSpan={2}>{S(c.b)}</td>
              <td />
            </tr>
          </tbody>
        </table>
      </div>
      <p className="mt-4 text-sm text-ink-soft">{c.method}</p>
    </div>
  );
}
