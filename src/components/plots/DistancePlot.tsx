// Interactive distance-from-the-body plot around one approach (uPlot): nominal curve and 3-sigma band, in the
// chosen unit. Drag to zoom on time, double-click to reset. The series is derived from the run's linear data
// (shared/plots/distance.ts explains how); the method is printed under the plot.
import { useEffect, useMemo, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { AssessmentResult } from '../../../shared/schemas/assessment';
import { convertDistanceKm, DISTANCE_UNITS, type DistanceUnit } from '../../../shared/format';
import { distanceSeries, PLOT_COLORS as C } from '../../../shared/plots';

export function DistancePlot({ result, approachIndex, unit, caption }: { result: AssessmentResult; approachIndex: number; unit: DistanceUnit; caption: string }) {
  const series = useMemo(() => distanceSeries(result, approachIndex, { samples: 481 }), [result, approachIndex]);
  const ref = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const conv = (km: number) => convertDistanceKm(km, unit);
    const label = DISTANCE_UNITS[unit].label;
    const x = series.tHours;
    const nominal = series.nominalKm.map(conv);
    const low = series.lowKm ? series.lowKm.map(conv) : x.map(() => null);
    const high = series.highKm ? series.highKm.map(conv) : x.map(() => null);
    const surface = series.planetRadiusKm !== null ? x.map(() => conv(series.planetRadiusKm!)) : x.map(() => null);
    // km to the kilometre (the curves are not more precise than that); other units to 4 significant digits.
    const fmt = (v: number | null) => (v === null ? '—' : unit === 'km' || Math.abs(v) >= 1000 ? Math.round(v).toLocaleString('en-GB') : v.toPrecision(4));
    const width = Math.max(320, el.clientWidth);
    const opts: uPlot.Options = {
      width,
      height: 320,
      scales: { x: { time: false }, y: { range: (_u, _min, max) => [0, max * 1.05] } },
      cursor: { drag: { x: true, y: false } },
      legend: { live: true },
      series: [
        { label: 'hours from closest approach', value: (_u, v) => (v === null ? '—' : v.toFixed(2)) },
        { label: `3σ low (${label})`, stroke: C.sigma3, width: 1, value: (_u, v) => fmt(v) },
        { label: `3σ high (${label})`, stroke: C.sigma3, width: 1, value: (_u, v) => fmt(v) },
        { label: `nominal (${label})`, stroke: C.nominal, width: 2, value: (_u, v) => fmt(v) },
        { label: `${series.body.charAt(0).toUpperCase() + series.body.slice(1)} surface`, stroke: C.capture, width: 1, dash: [5, 3], value: (_u, v) => fmt(v) },
      ],
      // Start with the legend showing the values at the closest approach (0 h) instead of dashes.
      hooks: {
        ready: [
          (u) => {
            const mid = x.reduce((best, t, i) => (Math.abs(t) < Math.abs(x[best]) ? i : best), 0);
            u.setCursor({ left: u.valToPos(x[mid], 'x'), top: u.valToPos(nominal[mid], 'y') });
          },
        ],
      },
      bands: series.lowKm ? [{ series: [2, 1], fill: C.band }] : [],
      axes: [
        { label: `hours from the nominal closest approach (0 h = ${series.centreUtc.slice(0, 19).replace('T', ' ')} UTC)`, stroke: C.text },
        { label: `distance (${label})`, stroke: C.text, size: 80 },
      ],
    };
    const plot = new uPlot(opts, [x, low, high, nominal, surface] as uPlot.AlignedData, el);

    const ro = new ResizeObserver(() => plot.setSize({ width: Math.max(320, el.clientWidth), height: 320 }));
    ro.observe(el);
    return () => {
      ro.disconnect();
      plot.destroy();
    };
  }, [series, unit]);

  return (
    <figure className="space-y-1" data-testid="distance-plot">
      <div ref={ref} className="w-full" />
      <figcaption className="text-xs text-ink-soft">
        Distance from {series.body.charAt(0).toUpperCase() + series.body.slice(1)}'s centre: {series.method}. Drag to zoom on time, double-click to reset.
        <br />
        {caption}
      </figcaption>
    </figure>
  );
}
