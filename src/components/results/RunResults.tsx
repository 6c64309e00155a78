// The results section of a finished run: object-level figures, the encounter table with the unit switch, the
// b-plane and distance plots of the chosen approach, consequence ranges, engine notes, and exports (CSV/JSON of
// the tables, SVG/PNG of the plots rendered by the same shared renderers the server uses).
import { useMemo, useState } from 'react';
import type { Run } from '../../../shared/schemas/runs';
import { safeParseAssessment, type AssessmentResult } from '../../../shared/schemas/assessment';
import { formatPalermo, formatTdbJd, formatTorino, formatUtc, type DistanceUnit } from '../../../shared/format';
import { encounterCsv, resultTablesJson, type ResultSource } from '../../../shared/results/table';
import { bPlaneSvg, distanceSvg } from '../../../shared/plots';
import { Notice } from '../ui';
import { BPlanePlot } from '../plots/BPlanePlot';
import { DistancePlot } from '../plots/DistancePlot';
import { ConsequenceRanges } from './ConsequenceRanges';
import { EncounterTable } from './EncounterTable';
import { UnitSwitch } from './UnitSwitch';
import { downloadBlob, downloadText, fileSafe, svgToPng } from './download';

export function resultSource(run: Run, result: AssessmentResult): ResultSource {
  return {
    runId: run.id,
    objectDesignation: run.objectDesignation,
    solutionVersion: run.solutionVersion,
    inputSha256: run.inputSha256,
    engineVersion: result.provenance.engineVersion ?? null,
    methods: result.provenance.methods ?? run.options.methods,
  };
}

/** The approach shown first: the highest rated impact probability, else the closest. */
function defaultApproach(r: AssessmentResult): number | null {
  if (!r.approaches.length) return null;
  let best = 0;
  const score = (i: number) => {
    const a = r.approaches[i];
    const ip = a.impactProbability.linear ?? a.impactProbability.monteCarlo?.estimate ?? a.impactProbability.lov ?? 0;
    return [ip, -a.distanceKm] as const;
  };
  for (let i = 1; i < r.approaches.length; i++) {
    const [p, d] = score(i), [bp, bd] = score(best);
    if (p > bp || (p === bp && d > bd)) best = i;
  }
  return best;
}

const btn = 'rounded border border-rule bg-white px-2.5 py-1 text-sm hover:bg-accent-50';

export function RunResults({ run }: { run: Run }) {
  const parsed = useMemo(() => safeParseAssessment(run.result), [run.result]);
  const [unit, setUnit] = useState<DistanceUnit>('km');
  const [picked, setPicked] = useState<number | null>(null);
  const [exportError, setExportError] = useState<string | null>(null);
  if (!parsed.ok) {
    return <Notice tone="error" title="The engine's result could not be read">{parsed.error}. Download the JSON to inspect it.</Notice>;
  }
  const result = parsed.value;
  const source = resultSource(run, result);
  const selected = picked ?? defaultApproach(result);
  const base = `tocsin-run-${run.id}-${fileSafe(run.objectDesignation)}-v${run.solutionVersion}`;
  const caption = `Run #${run.id} · ${run.objectDesignation} solution v${run.solutionVersion} (SHA-256 ${run.inputSha256.slice(0, 12)}…) · methods ${source.methods.join(', ')} · ${source.engineVersion ?? 'engine'}`;
  const approach = selected !== null ? result.approaches[selected] : null;
  const svgOf = (kind: 'bplane' | 'distance') =>
    kind === 'bplane'
      ? bPlaneSvg(result, selected!, { unit: unit === 're' ? 're' : 'km', caption })
      : distanceSvg(result, selected!, { unit, caption });
  const exportPlot = async (kind: 'bplane' | 'distance', fmt: 'svg' | 'png') => {
    setExportError(null);
    const name = `${base}-${kind}-${approach!.utc.slice(0, 10)}.${fmt}`;
    try {
      if (fmt === 'svg') downloadText(name, 'image/svg+xml', svgOf(kind));
      else downloadBlob(name, await svgToPng(svgOf(kind)));
    } catch (e) {
      setExportError(e instanceof Error ? e.message : String(e));
    }
  };
  const cls = result.classification;

  return (
    <div className="space-y-6">
      <section aria-labelledby="encounters-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="encounters-heading" className="text-lg font-semibold">Close approaches</h2>
            <p className="text-sm text-ink-soft" data-testid="result-summary">
              Cumulative Palermo {formatPalermo(result.palermoCumulative)} · highest Torino {formatTorino(result.torinoMax)} · analysis date {formatUtc(result.analysisDateUtc, { seconds: false })}
              {result.provenance.windowTdbJd && <> · window {formatTdbJd(result.provenance.windowTdbJd[0]).slice(0, 10)} to {formatTdbJd(result.provenance.windowTdbJd[1]).slice(0, 10)} (TDB)</>}
              {' '}· run #{run.id}, {run.objectDesignation} solution v{run.solutionVersion}, each approach rated with the method named in its row
            </p>
          </div>
          <UnitSwitch value={unit} onChange={setUnit} />
        </div>
        {cls && !cls.bound && <Notice tone="caution" title="Unbound orbit">{cls.note.charAt(0).toUpperCase() + cls.note.slice(1)}{cls.unboundSignificance !== null ? ` (eccentricity ${cls.eccentricity.toFixed(4)}, ${cls.unboundSignificance.toFixed(1)}σ above 1).` : '.'}</Notice>}
        <EncounterTable result={result} source={source} unit={unit} selected={selected} onSelect={setPicked} />
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="text-ink-soft">Export the table:</span>
          <button type="button" className={btn} onClick={() => downloadText(`${base}-encounters.csv`, 'text/csv', encounterCsv(result, source))}>CSV</button>
          <button type="button" className={btn} onClick={() => downloadText(`${base}-tables.json`, 'application/json', JSON.stringify(resultTablesJson(result, source), null, 2))}>JSON</button>
        </div>
      </section>

      {approach && selected !== null && (
        <section aria-labelledby="plots-heading" className="space-y-4">
          <div className="flex flex-wrap items-end justify-between gap-3">
            <h2 id="plots-heading" className="text-lg font-semibold">
              Plots: {approach.body.charAt(0).toUpperCase() + approach.body.slice(1)} approach of {formatUtc(approach.utc, { seconds: false })}
            </h2>
            <div className="flex flex-wrap items-center gap-2 text-sm">
              <span className="text-ink-soft">Download:</span>
              <button type="button" className={btn} onClick={() => void exportPlot('bplane', 'svg')}>b-plane SVG</button>
              <button type="button" className={btn} onClick={() => void exportPlot('bplane', 'png')}>b-plane PNG</button>
              <button type="button" className={btn} onClick={() => void exportPlot('distance', 'svg')}>Distance SVG</button>
              <button type="button" className={btn} onClick={() => void exportPlot('distance', 'png')}>Distance PNG</button>
            </div>
          </div>
          {exportError && <Notice tone="error">{exportError}</Notice>}
          <div className="grid gap-6">
            <div className="rounded-lg border border-rule bg-white p-3">
              <h3 className="mb-2 font-semibold">b-plane</h3>
              <BPlanePlot result={result} approachIndex={selected} unit={unit === 're' ? 're' : 'km'} caption={caption} />
            </div>
            <div className="rounded-lg border border-rule bg-white p-3">
              <h3 className="mb-2 font-semibold">Distance against time</h3>
              <DistancePlot result={result} approachIndex={selected} unit={unit} caption={caption} />
            </div>
          </div>
        </section>
      )}

      <section aria-labelledby="consequences-heading" className="space-y-2">
        <h2 id="consequences-heading" className="text-lg font-semibold">Consequence ranges</h2>
        <ConsequenceRanges result={result} source={source} />
      </section>

      {(result.notes?.length ?? 0) > 0 && (
        <section aria-labelledby="notes-heading">
          <h2 id="notes-heading" className="mb-1 text-lg font-semibold">Engine notes</h2>
          <ul className="list-disc pl-5 text-sm text-ink-soft">{result.notes!.map((n, i) => <li key={i}>{n}</li>)}</ul>
        </section>
      )}
    </div>
  );
}
