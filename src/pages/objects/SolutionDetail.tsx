// One solution version: elements with 1-sigma, non-gravitational parameters, notes of the reader, the raw text.
import { useSolution } from '../../api/objects';
import { Card, ErrorState, LoadingState } from '../../components/ui';
import { formatNumber, formatSigma } from './format';
import { SOLUTION_SOURCE_LABELS } from '../../../shared/schemas/objects';

export function SolutionDetail({ objectId, version, onClose }: { objectId: number; version: number; onClose: () => void }) {
  const s = useSolution(objectId, version);
  return (
    <Card aria-labelledby="solution-detail-heading" data-testid={`solution-detail-${version}`}>
      <div className="mb-4 flex items-start justify-between gap-3">
        <h2 id="solution-detail-heading" className="text-lg font-semibold">Version {version}</h2>
        <button type="button" className="text-sm text-accent-700 underline" onClick={onClose}>
          Close
        </button>
      </div>
      {s.isPending ? (
        <LoadingState label="Loading the version…" />
      ) : s.isError ? (
        <ErrorState error={s.error} onRetry={() => s.refetch()} />
      ) : (
        <div className="space-y-4">
          <p className="text-sm text-ink-soft">
            SHA-256 of the input <span className="break-all font-mono">{s.data.inputSha256}</span>
            {s.data.remark && <> · {s.data.remark}</>}
          </p>
          <table className="w-full text-sm tabular-nums">
            <caption className="mb-2 text-left font-semibold">Osculating elements (J2000 ecliptic) at the epoch, and non-gravitational parameters</caption>
            <tbody>
              {[...s.data.elements, ...s.data.nonGrav].map((r) => (
                <tr key={r.key} className="border-t border-rule">
                  <th scope="row" className="py-1 pr-3 text-left font-medium">
                    {r.label} {r.unit && <span className="text-ink-soft">[{r.unit}]</span>}
                  </th>
                  <td className="py-1 pr-3">{formatNumber(r.value, 10)}</td>
                  <td className="py-1">{formatSigma(r.sigma)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {s.data.orbit.notes.length > 0 && (
            <ul className="list-disc pl-5 text-sm text-ink-soft">
              {s.data.orbit.notes.map((n, k) => (
                <li key={k}>{n}</li>
              ))}
            </ul>
          )}
          <details>
            <summary className="cursor-pointer text-sm font-medium">Input as received ({SOLUTION_SOURCE_LABELS[s.data.sourceKind]})</summary>
            <pre className="mt-2 max-h-96 overflow-auto rounded-md bg-accent-50 p-3 text-xs">
              {s.data.rawText.split(/\r\n|\r|\n/).map((line, k) => (
                <span key={k} className="block">
                  <span className="mr-3 inline-block w-8 select-none text-right text-ink-soft">{k + 1}</span>
                  {line}
                </span>
              ))}
            </pre>
          </details>
        </div>
      )}
    </Card>
  );
}
