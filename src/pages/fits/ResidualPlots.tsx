// Residual plots of a fit job: the gravity-only and the non-gravitational fit side by side (same time axis, same
// vertical scale, same station colours, so a trend left by the gravity-only fit stands out), or one at a time.
// Drawn by the shared SVG renderer (shared/plots/residuals.ts), which also serves downloads.
import { useState } from 'react';
import type { OrbitDeterminationResult, Residual } from '../../../shared/schemas/od';
import { residualPoints, residualRangeArcsec, residualsSvg } from '../../../shared/plots';
import { downloadBlob } from '../../components/results/download';
import { FIT_LABELS } from './format';

type View = 'both' | 'gravity-only' | 'non-gravitational';

export function ResidualPlots({ result, excluded, fileStem }: { result: OrbitDeterminationResult; excluded?: (r: Residual) => boolean; fileStem: string }) {
  const fits = [result.gravityOnly, ...(result.nonGrav ? [result.nonGrav] : [])];
  const [view, setView] = useState<View>(result.nonGrav ? 'both' : 'gravity-only');
  const [errorBars, setErrorBars] = useState(false);
  const [zoomUsed, setZoomUsed] = useState(true);
  const [means, setMeans] = useState(true);
  const shown = fits.filter((f) => view === 'both' || f.label === view);

  const common = (() => {
    const all = fits.flatMap((f) => f.residuals);
    const points = residualPoints(all, excluded);
    const times = points.map((p) => p.timeMs);
    const t0 = Math.min(...times), t1 = Math.max(...times);
    const pad = Math.max((t1 - t0) * 0.02, 43_200_000);
    return {
      stations: [...new Set(all.map((r) => r.stn))],
      timeRangeMs: [t0 - pad, t1 + pad] as [number, number],
      // zoomed: the range of the points the fits used (rejected outliers then show as edge markers)
      yMaxArcsec: residualRangeArcsec(points, { errorBars, statuses: zoomUsed ? ['used'] : undefined }),
    };
  })();

  const svgs = shown.map((f) => ({
    label: f.label,
    svg: residualsSvg(f.residuals, {
      width: view === 'both' ? 600 : 900,
      height: view === 'both' ? 520 : 520,
      title: `${FIT_LABELS[f.label]}: RMS ${f.rmsArcsec.toFixed(3)}″, normalised ${f.rmsNormalized.toFixed(3)}`,
      errorBars,
      nightMeans: means,
      excluded,
      stations: common.stations,
      timeRangeMs: common.timeRangeMs,
      yMaxArcsec: common.yMaxArcsec,
    }),
  }));

  return (
    <section aria-labelledby="residual-plots-heading">
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <h2 id="residual-plots-heading" className="text-lg font-semibold">Residuals against time</h2>
        <div className="flex flex-wrap items-center gap-4 text-sm">
          {result.nonGrav && (
            <div role="group" aria-label="Which fit to plot" className="inline-flex overflow-hidden rounded-md border border-rule">
              {(['both', 'gravity-only', 'non-gravitational'] as const).map((v) => (
                <button
                  key={v}
                  type="button"
                  aria-pressed={view === v}
                  onClick={() => setView(v)}
                  className={`px-3 py-1.5 ${view === v ? 'bg-accent-700 text-white' : 'bg-white hover:bg-accent-50'}`}
                >
                  {v === 'both' ? 'Side by side' : FIT_LABELS[v]}
                </button>
              ))}
            </div>
          )}
          <label className="inline-flex items-center gap-2">
            <input type="checkbox" checked={errorBars} onChange={(e) => setErrorBars(e.target.checked)} /> ±1σ error bars
          </label>
          <label className="inline-flex items-center gap-2">
            <input type="checkbox" checked={means} onChange={(e) => setMeans(e.target.checked)} /> Nightly means
          </label>
          <label className="inline-flex items-center gap-2">
            <input type="checkbox" checked={zoomUsed} onChange={(e) => setZoomUsed(e.target.checked)} /> Scale to the used points
          </label>
        </div>
      </div>
      <div className={`grid gap-4 ${svgs.length > 1 ? 'xl:grid-cols-2' : ''}`}>
        {svgs.map(({ label, svg }) => (
          <figure key={label} className="rounded-lg border border-rule bg-white p-2" data-testid={`residual-plot-${label}`}>
            {/* Built by our own renderer from numbers, every text escaped (shared/plots/svg.ts esc()). */}
            <div className="[&>svg]:h-auto [&>svg]:w-full" dangerouslySetInnerHTML={{ __html: svg }} />
            <figcaption className="flex flex-wrap items-center justify-between gap-2 px-2 pb-1 text-xs text-ink-soft">
              <span>
                Observed − computed, arcsec; RA residuals multiplied by cos(Dec).{fits.length > 1 ? ' Both fits share the time axis, vertical scale and station colours.' : ''}
                {zoomUsed ? ' Scaled to the used points: triangles on an edge are points beyond it.' : ''}
              </span>
              <button type="button" className="text-accent-700 underline" onClick={() => downloadBlob(`${fileStem}-${label}-residuals.svg`, new Blob([svg], { type: 'image/svg+xml' }))}>
                Download SVG
              </button>
            </figcaption>
          </figure>
        ))}
      </div>
    </section>
  );
}
