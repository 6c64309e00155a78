/**
 * Monte Carlo through the piscina worker pool (server/engine/jobs): workers run the TypeScript entry through tsx.
 * Issue 4 items 3, 5 and 10: identical results for a given seed with 1 and 2 workers (and in-process); progress
 * events monotonic and ending at the total; cancellation through an AbortSignal stops the run and the pool; the
 * workers receive the run's ephemeris cache as shared memory and get the same numbers from it.
 * Synthetic invented orbit (tests/unit/engine-mc-cases.ts): an Earth encounter 60 days after the epoch with a
 * capture-disk-sized spread, so that the windows contain hits and misses.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { runMonteCarlo, type McOptions } from '../../server/engine/assess/montecarlo';
import type { McProgress, OrbitSolution } from '../../server/engine/assess/types';
import { AU_KM, DAY_S } from '../../server/engine/constants';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import { neaCase, type NeaCase } from './engine-mc-cases';

const T0 = 10957.5;
const UNTIL = T0 + 90;
let eph: ChebyshevEphemeris;
let c: NeaCase;

function solution(): OrbitSolution {
  const sr = 5000 / AU_KM, sv = (1e-4 * DAY_S) / AU_KM;
  return {
    designation: 'TEST-POOL',
    name: null,
    epochTdbDays: T0,
    epochTdbJd: T0 + 2451545,
    positionAu: c.positionAu,
    velocityAuD: c.velocityAuD,
    covariance: {
      parameters: ['x', 'y', 'z', 'vx', 'vy', 'vz'],
      // a correlated covariance (x-y correlation 0.5) to exercise the full Cholesky factor
      matrix: [0, 1, 2, 3, 4, 5].map((i) => [0, 1, 2, 3, 4, 5].map((j) => {
        const s = (k: number) => (k < 3 ? sr : sv);
        if (i === j) return s(i) ** 2;
        if ((i === 0 && j === 1) || (i === 1 && j === 0)) return 0.5 * sr * sr;
        return 0;
      })),
    },
    nonGrav: null,
    hMagnitude: null,
    albedo: null,
    kind: 'unknown',
    notes: [],
    source: { format: 'tocsin-json', inputSha256: '0'.repeat(64), epochText: 'test', timeScale: 'TDB' },
  } as OrbitSolution;
}

const opts = (workers: number, clones: number): McOptions => ({
  untilTdbDays: UNTIL, methods: ['mc'], clones, seed: 424242, bodies: ['earth', 'moon'], maxAu: 0.05, analysisTdbDays: T0, workers, ephemeris: eph, batchSize: 64,
});

/** The result without run-time figures (wall time, worker count). */
const strip = (r: Awaited<ReturnType<typeof runMonteCarlo>>) => ({ ...r, wallSeconds: 0, workers: 0, method: '' });

beforeAll(() => {
  eph = ChebyshevEphemeris.build(T0 - 1, UNTIL + 1);
  c = neaCase(eph, { startTdbDays: T0, encounterTdbDays: T0 + 60, missKm: 7000, a: 1.5, e: 0.4, incDeg: 10, leadDays: 2 });
});

describe('ephemeris cache shared with the workers', () => {
  it('exportShared puts the coefficients in a SharedArrayBuffer and fromData returns the same numbers', () => {
    const d = eph.exportShared();
    expect(d.coeffs.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(eph.exportShared()).toBe(d); // copied once per ephemeris
    // A structured clone (what postMessage does) shares the memory rather than copying it.
    const posted = structuredClone(d);
    expect(posted.coeffs.buffer).toBeInstanceOf(SharedArrayBuffer);
    const copy = ChebyshevEphemeris.fromData(posted);
    const a = new Float64Array(27), b = new Float64Array(27), sa = new Float64Array(6), sb = new Float64Array(6);
    for (let t = T0 - 1; t <= UNTIL + 1; t += 3.7) {
      eph.positionsInto(t, a);
      copy.positionsInto(t, b);
      expect(Array.from(b)).toEqual(Array.from(a));
      for (const body of [2, 3, 4]) {
        eph.stateInto(body, t, sa);
        copy.stateInto(body, t, sb);
        expect(Array.from(sb)).toEqual(Array.from(sa));
      }
    }
    expect(() => ChebyshevEphemeris.fromData({ ...posted, degree: posted.degree.slice(1) })).toThrow(/inconsistent/);
  });
});

describe('Monte Carlo worker pool', () => {
  it('gives identical results for a seed with 1 worker, 2 workers and in-process; progress is monotonic and ends at the total', async () => {
    const N = 320; // 5 tasks of 64
    const events: McProgress[][] = [[], [], []];
    const runs = [];
    let i = 0;
    for (const w of [1, 2, 0]) {
      const ev = events[i++];
      runs.push(await runMonteCarlo(solution(), opts(w, N), { onProgress: (p) => ev.push(p) }));
    }
    const [one, two, inproc] = runs;
    expect(one.windows.length).toBeGreaterThan(0);
    const earth = one.windows.find((w) => w.body === 'earth')!;
    expect(earth.hits).toBeGreaterThan(0);
    expect(earth.hits).toBeLessThan(N);
    expect(strip(two)).toEqual(strip(one));
    expect(strip(inproc)).toEqual(strip(one));
    expect(one.workers).toBe(1);
    expect(two.workers).toBe(2);
    for (const ev of events) {
      expect(ev[0].done).toBe(0);
      for (let k = 1; k < ev.length; k++) {
        expect(ev[k].done).toBeGreaterThan(ev[k - 1].done);
        expect(ev[k].total).toBe(N);
        expect(ev[k].rateClonesPerS).toBeGreaterThan(0);
      }
      const last = ev[ev.length - 1];
      expect(last.done).toBe(N);
      expect(last.etaS).toBe(0);
      expect(ev.length).toBe(1 + 5);
    }
    console.log(`earth window: ${earth.impactProbability.phrase}; wall 1 worker ${one.wallSeconds.toFixed(1)} s, 2 workers ${two.wallSeconds.toFixed(1)} s, in-process ${inproc.wallSeconds.toFixed(1)} s`);
  });

  it('cancellation through an AbortSignal stops the run and rejects with an AbortError', async () => {
    const ac = new AbortController();
    const events: McProgress[] = [];
    const t0 = performance.now();
    const big = { ...opts(2, 64 * 200), untilTdbDays: T0 + 85 };
    const run = runMonteCarlo(solution(), big, {
      signal: ac.signal,
      onProgress: (p) => {
        events.push(p);
        if (p.done > 0) ac.abort();
      },
    });
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
    const s = (performance.now() - t0) / 1000;
    const maxDone = Math.max(...events.map((e) => e.done));
    expect(maxDone).toBeGreaterThan(0);
    expect(maxDone).toBeLessThan(64 * 200);
    // 200 tasks would take minutes; the abort ends the run within seconds of the first completed task.
    expect(s).toBeLessThan(40);
    console.log(`cancelled after ${maxDone} of ${64 * 200} clones, ${s.toFixed(1)} s`);
  });

  it('an already-aborted signal refuses to start', async () => {
    const ac = new AbortController();
    ac.abort();
    await expect(runMonteCarlo(solution(), opts(1, 64), { signal: ac.signal })).rejects.toMatchObject({ name: 'AbortError' });
  });
});
