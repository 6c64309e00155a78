/**
 * Micro-benchmark of the ephemeris: ns per "all nine bodies" position evaluation from the Chebyshev cache
 * (ChebyshevEphemeris.positionsInto) and from the full series (VSOP87B + ELP/MPP02), medians of several runs,
 * side by side; plus the cache build cost. Run: npx tsx bench/ephemeris.ts
 * Prints figures only; it is not a test.
 */
import {
  ChebyshevEphemeris,
  EPHEMERIS_BODIES,
  moonGeocentricStateInto,
  seriesStateInto,
} from '../../server/engine/ephemeris';
import { seriesPositionInto } from '../../server/engine/ephemeris/series';

const RUNS = 7;
const start = 9131.5; // 2025-01-01
const years = 20;
const end = start + years * 365.25;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const t0 = performance.now();
const eph = ChebyshevEphemeris.build(start, end);
const buildMs = performance.now() - t0;

const out = new Float64Array(27);
const st = new Float64Array(6);
let sink = 0;

function timeCache(): number {
  const n = 1_000_000;
  const a = performance.now();
  for (let k = 0; k < n; k++) {
    eph.positionsInto(start + ((k * 7.123) % (end - start)), out);
    sink += out[6];
  }
  return ((performance.now() - a) * 1e6) / n;
}

function timeSeriesPositions(): number {
  const n = 60;
  const a = performance.now();
  for (let k = 0; k < n; k++) {
    const t = start + k * 17.3;
    for (let i = 0; i < EPHEMERIS_BODIES.length; i++) {
      const b = EPHEMERIS_BODIES[i];
      if (b === 'moon') moonGeocentricStateInto(t, st, false);
      else seriesPositionInto(b, t, st);
      sink += st[0];
    }
  }
  return ((performance.now() - a) * 1e6) / n;
}

function timeSeriesStates(): number {
  const n = 30;
  const a = performance.now();
  for (let k = 0; k < n; k++) {
    const t = start + k * 17.3;
    for (const b of EPHEMERIS_BODIES) {
      seriesStateInto(b, t, st);
      sink += st[3];
    }
  }
  return ((performance.now() - a) * 1e6) / n;
}

// warm-up
timeCache();
timeSeriesPositions();
timeSeriesStates();

const cache: number[] = [];
const series: number[] = [];
const seriesFull: number[] = [];
for (let r = 0; r < RUNS; r++) {
  cache.push(timeCache());
  series.push(timeSeriesPositions());
  seriesFull.push(timeSeriesStates());
}

console.log(`Ephemeris benchmark (Node ${process.version}), all nine bodies per call, medians of ${RUNS} runs`);
console.log('');
console.log('                                        ns per call     runs (ns)');
console.log(`Chebyshev cache positionsInto        ${median(cache).toFixed(0).padStart(12)}     ${cache.map((x) => x.toFixed(0)).join(', ')}`);
console.log(`Series positions (VSOP87B + ELP)     ${median(series).toFixed(0).padStart(12)}     ${series.map((x) => x.toFixed(0)).join(', ')}`);
console.log(`Series states (positions+velocities) ${median(seriesFull).toFixed(0).padStart(12)}     ${seriesFull.map((x) => x.toFixed(0)).join(', ')}`);
console.log(`Speed-up cache vs series positions   ${(median(series) / median(cache)).toFixed(0).padStart(12)} x`);
console.log('');
console.log(
  `Cache build over ${years} years: ${(buildMs / 1000).toFixed(2)} s (${(buildMs / years).toFixed(0)} ms per year), ` +
    `${(eph.byteLength / 1048576).toFixed(2)} MiB of coefficients`,
);
if (!Number.isFinite(sink)) console.log('(sink)');
