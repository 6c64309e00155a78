/**
 * Orbit-determination benchmark (`npm run bench:od`): prints figures, asserts nothing (issue 8).
 *
 * Cases (synthetic arcs from synthesizeAdesPsv, 0.4" noise, two invented test sites, read back with parseAdesPsv):
 *  - 'short'  8 nights x 3 over 28 days (24 observations), gravity-only;
 *  - 'long'   60 nights x 3 over 300 days (180 observations, 2 planted outliers), gravity-only + A1, A2;
 *  - 'large'  400 nights x 5 over 1000 days (2000 observations, 3 planted outliers; 5 a night, so the nightly
 *             de-weighting applies), gravity-only + A1, A2 — how the fit scales with the arc;
 *  - 'demo'   the demo arc of HSO-26-U1 (server/db/demo/hso-26-u1.psv) when present, + A1, A2.
 * Per case (OD_BENCH_REPS repetitions, median): wall time of determineOrbit without and with the 20-year encounter
 * search, CPU time of the process over the same call (the machine is shared: CPU time is the load-independent
 * figure), differential-correction iterations, and milliseconds per iteration (fit time / iterations of both fits,
 * outlier passes included). Last line: one JSON object with the per-case figures.
 */
import { existsSync, readFileSync } from 'node:fs';
import { fitSettingsSchema, observatoryFileSchema, type Observatory, type OpticalObservation } from '../../shared/schemas/od';
import { parseAdesPsv } from '../../server/engine/od/ades';
import { determineOrbit } from '../../server/engine/od/fit';
import { nightTimes, syntheticPsv, testOrbit } from '../helpers/odSynthetic';

const REPS = Number(process.env.OD_BENCH_REPS ?? 3);
const SITES: Observatory[] = [
  { code: 'TQA', name: 'Test site A', longitudeDeg: 10, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 45, heightM: 500 },
  { code: 'TQB', name: 'Test site B', longitudeDeg: 250, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -30, heightM: 2000 },
];
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

function synthetic(nights: number, per: number, span: number, outliers: number[]): OpticalObservation[] {
  const psv = syntheticPsv({
    designation: 'BENCH-1',
    orbit: testOrbit(),
    observatories: SITES,
    timesTdbDays: nightTimes(nights, per, span),
    noiseArcsec: 0.4,
    seed: 1,
    outliers: outliers.map((index) => ({ index, offsetArcsec: 8 })),
  });
  return parseAdesPsv(psv).observations;
}

type Case = { name: string; observations: OpticalObservation[]; observatories: Observatory[]; terms: ('a1' | 'a2')[] };
const cases: Case[] = [
  { name: 'short', observations: synthetic(8, 3, 28, []), observatories: SITES, terms: [] },
  { name: 'long', observations: synthetic(60, 3, 300, [20, 101]), observatories: SITES, terms: ['a1', 'a2'] },
  { name: 'large', observations: synthetic(400, 5, 1000, [50, 777, 1500]), observatories: SITES, terms: ['a1', 'a2'] },
];
const DEMO_PSV = 'server/db/demo/hso-26-u1.psv';
const DEMO_OBS = 'server/db/demo/hspdo-observatories.json';
if (existsSync(DEMO_PSV) && existsSync(DEMO_OBS)) {
  cases.push({
    name: 'demo',
    observations: parseAdesPsv(readFileSync(DEMO_PSV, 'utf8')).observations,
    observatories: observatoryFileSchema.parse(JSON.parse(readFileSync(DEMO_OBS, 'utf8'))).observatories,
    terms: ['a1', 'a2'],
  });
}

const summary: Record<string, unknown> = {};
for (const c of cases) {
  const settings = fitSettingsSchema.parse({ nonGravTerms: c.terms });
  const wall: number[] = [];
  const cpu: number[] = [];
  const wallEnc: number[] = [];
  let iterations = 0;
  for (let rep = 0; rep < REPS; rep++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    const r = determineOrbit({ observations: c.observations, observatories: c.observatories, settings }, { skipEncounter: true });
    wall.push(performance.now() - t0);
    const du = process.cpuUsage(c0);
    cpu.push((du.user + du.system) / 1000);
    iterations = r.gravityOnly.iterations.length + (r.nonGrav?.iterations.length ?? 0);
    const t1 = performance.now();
    determineOrbit({ observations: c.observations, observatories: c.observatories, settings });
    wallEnc.push(performance.now() - t1);
  }
  const fig = {
    observations: c.observations.length,
    nonGravTerms: c.terms,
    fitWallMs: Math.round(median(wall)),
    fitCpuMs: Math.round(median(cpu)),
    iterations,
    msPerIteration: Math.round((median(wall) / Math.max(1, iterations)) * 10) / 10,
    withEncounterWallMs: Math.round(median(wallEnc)),
  };
  summary[c.name] = fig;
  console.log(`${c.name.padEnd(6)} ${String(fig.observations).padStart(4)} obs  fit ${fig.fitWallMs} ms (CPU ${fig.fitCpuMs} ms), ${fig.iterations} iterations, ${fig.msPerIteration} ms/iteration; with the encounter search ${fig.withEncounterWallMs} ms`);
}
console.log(JSON.stringify({ reps: REPS, cases: summary }));
