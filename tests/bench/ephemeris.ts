/**
 * Micro-benchmark of the ephemeris: ns per "all nine bodies" position evaluation from the Chebyshev cache
 * (ChebyshevEphemeris.positionsInto) and from the full series (VSOP87B + ELP/MPP02), medians of several runs,
 * side by side; plus the cache build cost: CPU seconds per simulated year, per body, previous method (the series
 * evaluated at every node, referenceNodePositionsInto) against the chunk samplers the build now uses, medians of
 * BUILD_RUNS runs; the whole build without the memo and a rebuild served from the memo.
 * Run: npx tsx tests/bench/ephemeris.ts   Prints figures only; it is not a test.
 */
import {
  ChebyshevEphemeris,
  EPHEMERIS_BODIES,
  moonGeocentricStateInto,
  seriesStateInto,
} from '../../server/engine/ephemeris';
import { seriesPositionInto } from '../../server/engine/ephemeris/series';
import {
  CHUNK_GRANULES,
  chunkNodePositionsInto,
  fitGranulesInto,
  GRANULES,
  referenceNodePositionsInto,
} from '../../server/engine/ephemeris/chebyshev';

const RUNS = 7;
const start = 9131.5; // 2025-01-01
const years = 20;
const end = start + years * 365.25;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const t0 = performance.now();
const eph = ChebyshevEphemeris.build(start, end, { useMemo: false });
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

// ---- build cost per body: previous per-node method vs chunk samplers (CPU time of this process) ----
const BUILD_RUNS = 5;
const buildYears = 10;
const bStart = start;
const bEnd = bStart + buildYears * 365.25;

function cpuSeconds(f: () => void): number {
  const c0 = process.cpuUsage();
  f();
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1e6;
}

function granuleRange(i: number): [number, number] {
  const G = GRANULES[i].granuleDays;
  return [Math.floor(bStart / G), Math.max(Math.floor(bStart / G) + 1, Math.ceil(bEnd / G))];
}

function buildBodyPrevious(i: number): void {
  const n = GRANULES[i].degree + 1;
  const vals = new Float64Array(3 * n);
  const coeffs = new Float64Array(3 * n);
  const [g0, g1] = granuleRange(i);
  for (let g = g0; g < g1; g++) {
    referenceNodePositionsInto(i, g, vals);
    fitGranulesInto(i, vals, 1, coeffs, 0);
    sink += coeffs[0];
  }
}

function buildBodyChunked(i: number): void {
  const n = GRANULES[i].degree + 1;
  const vals = new Float64Array(3 * n * CHUNK_GRANULES);
  const coeffs = new Float64Array(3 * n * CHUNK_GRANULES);
  const [g0, g1] = granuleRange(i);
  for (let c = Math.floor(g0 / CHUNK_GRANULES); c * CHUNK_GRANULES < g1; c++) {
    chunkNodePositionsInto(i, c, vals);
    fitGranulesInto(i, vals, CHUNK_GRANULES, coeffs, 0);
    sink += coeffs[0];
  }
}

// warm-up (JIT and per-term tables)
for (let i = 0; i < 9; i++) {
  referenceNodePositionsInto(i, 100, new Float64Array(48));
  chunkNodePositionsInto(i, 10, new Float64Array(3 * 16 * CHUNK_GRANULES));
}

const prevPerBody: number[][] = EPHEMERIS_BODIES.map(() => []);
const fastPerBody: number[][] = EPHEMERIS_BODIES.map(() => []);
const fullNoMemo: number[] = [];
const fullFromMemo: number[] = [];
for (let r = 0; r < BUILD_RUNS; r++) {
  for (let i = 0; i < 9; i++) {
    prevPerBody[i].push(cpuSeconds(() => buildBodyPrevious(i)) / buildYears);
    fastPerBody[i].push(cpuSeconds(() => buildBodyChunked(i)) / buildYears);
  }
  fullNoMemo.push(cpuSeconds(() => ChebyshevEphemeris.build(bStart, bEnd, { useMemo: false })) / buildYears);
  ChebyshevEphemeris.clearGranuleMemo();
  ChebyshevEphemeris.build(bStart, bEnd);
  fullFromMemo.push(cpuSeconds(() => ChebyshevEphemeris.build(bStart, bEnd)) / buildYears);
}

console.log('');
console.log(`Cache build, CPU ms per simulated year (${buildYears}-year span from 2025), medians of ${BUILD_RUNS} runs`);
console.log('body        previous (per-node series)   now (chunk samplers)   speed-up');
let sumPrev = 0;
let sumFast = 0;
EPHEMERIS_BODIES.forEach((b, i) => {
  const p = median(prevPerBody[i]) * 1000;
  const f = median(fastPerBody[i]) * 1000;
  sumPrev += p;
  sumFast += f;
  console.log(`${b.padEnd(10)}  ${p.toFixed(1).padStart(24)}   ${f.toFixed(1).padStart(20)}   ${(p / f).toFixed(1).padStart(7)} x`);
});
console.log(`${'all nine'.padEnd(10)}  ${sumPrev.toFixed(1).padStart(24)}   ${sumFast.toFixed(1).padStart(20)}   ${(sumPrev / sumFast).toFixed(1).padStart(7)} x`);
console.log(
  `ChebyshevEphemeris.build, memo bypassed: ${(median(fullNoMemo) * 1000).toFixed(1)} ms/yr (runs ${fullNoMemo
    .map((x) => (x * 1000).toFixed(1))
    .join(', ')}); same span again from the memo: ${(median(fullFromMemo) * 1000).toFixed(2)} ms/yr`,
);
const memoStats = ChebyshevEphemeris.granuleMemoStats();
console.log(`Granule memo: ${memoStats.chunks} chunks, ${(memoStats.bytes / 1024).toFixed(0)} KiB for ${buildYears} years (limit ${(memoStats.limitBytes / 1048576).toFixed(0)} MiB)`);
if (!Number.isFinite(sink)) console.log('(sink)');
