// The encounter table of a run: one row per nominal close approach (and per Monte Carlo / LOV window without
// one), with dates in UTC and TDB, distances in the chosen unit, the impact probability with its interval or bound
// and the method that gave it, Palermo, Torino and the energy range. Every row says its run and solution version.
import { Fragment } from 'react';
import type { AssessmentResult } from '../../../shared/schemas/assessment';
import {
  formatDistance,
  formatDistanceRange,
  formatEnergyRange,
  formatExp,
  formatJd,
  formatPalermo,
  formatUpperBound,
  formatSigmaSeconds,
  formatSpeedKmS,
  formatTdbJd,
  formatTorino,
  formatUtc,
  type DistanceUnit,
} from '../../../shared/format';
import { encounterRows, type EncounterRow, type ResultSource } from '../../../shared/results/table';

const th = 'px-3 py-2 align-bottom font-semibold';

/** "46 Mt (14–74 Mt)" as two lines: the nominal value, then the range. */
function energyLines(text: string) {
  const i = text.indexOf(' (');
  if (i < 0) return text;
  return (
    <>
      {text.slice(0, i)}
      <br />
      <span className="text-ink-soft whitespace-nowrap">{text.slice(i + 1)}</span>
    </>
  );
}

/**
 * Every method's figure side by side, each as unbreakable pieces (so "8.2e-2" never wraps at its hyphen), or null
 * when only the rated method ran.
 */
function allMethods(r: EncounterRow): string[][] | null {
  const parts: string[][] = [];
  if (r.ipLinear !== null) parts.push([`linear ${formatExp(r.ipLinear)}`]);
  if (r.ipLov !== null) parts.push([`LOV ${formatExp(r.ipLov)}`]);
  if (r.ipMonteCarloSamples !== null) {
    const n = `(${r.ipMonteCarloHits ?? 0} hit${r.ipMonteCarloHits === 1 ? '' : 's'} in ${r.ipMonteCarloSamples.toLocaleString('en-GB')})`;
    if (r.ipMonteCarlo !== null) {
      const ci = r.ipMonteCarloCi95;
      parts.push([`MC ${formatExp(r.ipMonteCarlo)}`, ...(ci ? [`(95%: ${formatExp(ci[0])}–${formatExp(ci[1])})`] : []), n]);
    } else {
      parts.push([`MC ${formatUpperBound(r.ipMonteCarloUpperBound95)}`, n]);
    }
  }
  return parts.length > 1 || (parts.length === 1 && r.ipMethod === null) ? parts : null;
}

function bodyName(b: string) {
  return b.charAt(0).toUpperCase() + b.slice(1);
}

export function EncounterTable({
  result,
  source,
  unit,
  selected,
  onSelect,
}: {
  result: AssessmentResult;
  source: ResultSource;
  unit: DistanceUnit;
  selected: number | null;
  onSelect(index: number): void;
}) {
  const rows = encounterRows(result);
  if (rows.length === 0) {
    const maxAu = typeof result.provenance.maxAu === 'number' ? result.provenance.maxAu : null;
    return (
      <p className="text-ink-soft" data-testid="no-approaches">
        No close approach{result.provenance.bodies ? ` to ${result.provenance.bodies.map(bodyName).join(', ')}` : ''} within the reporting distance
        {maxAu !== null ? ` (${maxAu} au = ${formatDistance(maxAu * 149_597_870.7, 'km')})` : ''} in this window (run #{source.runId}, solution v{source.solutionVersion}).
      </p>
    );
  }
  const from = `run #${source.runId}, ${source.objectDesignation} solution v${source.solutionVersion}`;
  return (
    <div>
    <div className="relative overflow-x-auto rounded-lg border border-rule bg-white">
      <table className="w-full min-w-[52rem] text-left text-sm" data-testid="encounter-table">
        <caption className="sr-only">Close approaches of run #{source.runId}, {source.objectDesignation} solution v{source.solutionVersion}</caption>
        <thead className="bg-accent-50">
          <tr>
            <th scope="col" className={th}>Date (UTC)<br /><span className="font-normal text-ink-soft">TDB</span></th>
            <th scope="col" className={th}>Body</th>
            <th scope="col" className={th}>Nominal distance</th>
            <th scope="col" className={th}>3σ range</th>
            <th scope="col" className={th}>Rel. speed<br /><span className="font-normal text-ink-soft">v∞</span></th>
            <th scope="col" className={`${th} min-w-[13rem]`}>Impact probability<br /><span className="font-normal text-ink-soft">95% interval · method</span></th>
            <th scope="col" className={th}>Palermo</th>
            <th scope="col" className={th}>Torino</th>
            <th scope="col" className={th}>Energy (range)</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => {
            const isSel = r.kind === 'approach' && selected === r.index;
            const src = `${from}; ${r.ipMethod ?? 'no method'}`;
            return (
              <tr
                key={`${r.kind}-${r.index}`}
                data-testid={`encounter-row-${r.kind}-${r.index}`}
                className={`border-t border-rule align-top tabular-nums ${isSel ? 'bg-accent-50' : ''}`}
              >
                <td className="px-3 py-2 whitespace-nowrap">
                  {formatUtc(r.utc)}
                  {r.utcPredicted && <sup title="Predicted UTC: assumes no leap second after the last one announced">†</sup>}
                  <br />
                  <span className="text-ink-soft" title={formatJd(r.epochTdbJd)}>{formatTdbJd(r.epochTdbJd)}</span>
                  {r.timeSigmaSeconds !== null && (
                    <>
                      <br />
                      <span className="text-xs text-ink-soft" title="1σ of the encounter time, linear method">{formatSigmaSeconds(r.timeSigmaSeconds)} (1σ)</span>
                    </>
                  )}
                </td>
                <td className="px-3 py-2">
                  {bodyName(r.body)}
                  {r.kind === 'approach' && <br />}
                  {r.kind === 'approach' && (
                    <button
                      type="button"
                      className={`mt-1 rounded border px-2 py-0.5 text-xs ${isSel ? 'border-accent-700 bg-accent-700 text-white' : 'border-rule hover:bg-accent-50'}`}
                      aria-pressed={isSel}
                      onClick={() => onSelect(r.index)}
                    >
                      {isSel ? 'Plotted' : 'Plot'}
                      <span className="sr-only"> the {bodyName(r.body)} approach of {formatUtc(r.utc, { seconds: false })}</span>
                    </button>
                  )}
                  {r.kind === 'window' && <><br /><span className="text-xs text-ink-soft">sampled window, no nominal approach</span></>}
                </td>
                <td className="px-3 py-2 whitespace-nowrap" title={`${r.distanceKm?.toFixed(1)} km (${from})`}>
                  {formatDistance(r.distanceKm, unit)}
                  {r.kind === 'window' && <><br /><span className="text-xs text-ink-soft">median of the clones</span></>}
                  {r.impact && <><br /><span className="rounded bg-danger-50 px-1 text-xs font-semibold text-danger-700">nominal orbit impacts</span></>}
                  {r.windowEdge && <><br /><span className="text-xs text-signal-700" title="The distance is smallest at an end of the window: the closest approach may lie outside it">at the window edge</span></>}
                </td>
                <td className="px-3 py-2 whitespace-nowrap">{formatDistanceRange(r.distance3SigmaKm, unit)}</td>
                <td className="px-3 py-2 whitespace-nowrap">
                  {formatSpeedKmS(r.relativeSpeedKmS)}
                  <br />
                  <span className="text-ink-soft">v∞ {formatSpeedKmS(r.vInfinityKmS)}</span>
                </td>
                <td className="px-3 py-2" title={src} data-testid="ip-cell">
                  <span className="font-medium">{r.ipText}</span>
                  {r.ipOdds && <span className="text-ink-soft"> · {r.ipOdds}</span>}
                  <br />
                  <span className="text-xs text-ink-soft">
                    {r.ipMethod ?? 'not computed'}
                    {r.ipMethodDetail ? ` (${r.ipMethodDetail})` : ''}
                  </span>
                  {allMethods(r) && (
                    <>
                      <br />
                      <span className="text-xs text-ink-soft">
                        all methods:
                        {allMethods(r)!.map((m, i) => (
                          <span key={i} className="block">
                            {m.map((piece, k) => (
                              <Fragment key={k}>
                                {k > 0 ? ' ' : ''}
                                <span className="whitespace-nowrap">{piece}</span>
                              </Fragment>
                            ))}
                          </span>
                        ))}
                      </span>
                    </>
                  )}
                  {r.methodFlags.length > 0 && (
                    <ul className="mt-1 list-disc pl-4 text-xs text-signal-700">
                      {r.methodFlags.map((f, i) => <li key={i}>{f}</li>)}
                    </ul>
                  )}
                </td>
                <td className="px-3 py-2" title={`Palermo from ${src}`}>{formatPalermo(r.palermo)}</td>
                <td className="px-3 py-2" title={`Torino from ${src}`}>{formatTorino(r.torino)}</td>
                <td className="px-3 py-2">{energyLines(formatEnergyRange(r.energyMt))}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
    <p className="mt-1 text-xs text-ink-soft" data-testid="encounter-source">
          From {from} (solution SHA-256 {source.inputSha256.slice(0, 12)}…), {source.engineVersion ?? 'engine version not recorded'}; methods run: {source.methods.join(', ')}.
          {rows.some((r) => r.utcPredicted) && <>† UTC of a future date assumes no further leap seconds (TDB is exact). </>}
          3σ range: closest distance over the linear 3σ b-plane ellipse (0 when it contains the planet's centre). Energy range: envelope of the diameter, albedo and density brackets.
    </p>
    </div>
  );
}
