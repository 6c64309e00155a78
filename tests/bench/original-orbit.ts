/**
 * Original-orbit benchmark (`npx tsx tests/bench/original-orbit.ts`): prints figures, asserts nothing.
 *  1. What the original-orbit step (server/engine/od/originalOrbit.ts) adds to the demo fit of HSO-26-U1
 *     (server/db/demo/hso-26-u1.psv, A1, A2, inverse-square; encounter search skipped in both): the first fit of the
 *     process (the ephemeris back to ~1990 is built then: cold) and the median of ORIGINAL_BENCH_REPS later ones
 *     (warm: the ephemeris cache keeps its granules), wall and process CPU time, and the ratio.
 *  2. The barycentric 1/a at 50, 100 and 250 AU for the demo fits, a near-parabolic orbit (q 1.5 AU, e 0.99995) and a
 *     26.6 km/s hyperbola: how far the original 1/a still moves beyond the chosen R_ORIGINAL_AU, and the cost.
 */
import { readFileSync } from 'node:fs';
import { fitSettingsSchema, observatoryFileSchema } from '../../shared/schemas/od';
import { GM_AU3_D2 } from '../../server/engine/constants';
import { parseAdesPsv } from '../../server/engine/od/ades';
import { determineOrbit } from '../../server/engine/od/fit';
import { originalOrbit, R_ORIGINAL_AU } from '../../server/engine/od/originalOrbit';
import { elementsToState } from '../../server/engine/twobody/elements';
import type { Vec3 } from '../../server/engine/vec';

const REPS = Number(process.env.ORIGINAL_BENCH_REPS ?? 5);
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};
const observations = parseAdesPsv(readFileSync('server/db/demo/hso-26-u1.psv', 'utf8')).observations;
const observatories = observatoryFileSchema.parse(JSON.parse(readFileSync('server/db/demo/hspdo-observatories.json', 'utf8'))).observatories;
const settings = fitSettingsSchema.parse({ nonGravTerms: ['a1', 'a2'], nonGravLaw: 'inverse-square' });

function timed(skipOriginalOrbit: boolean, skipEncounter = true) {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = determineOrbit({ observations, observatories, settings }, { skipEncounter, skipOriginalOrbit });
  const wall = performance.now() - t0;
  const du = process.cpuUsage(c0);
  return { r, wall, cpu: (du.user + du.system) / 1000 };
}

timed(true); // warm the fit's own ephemeris span and the JIT, so the cold figure below is the back-propagation's
const cold = timed(false);
const without: number[] = [], withOo: number[] = [], cpuWithout: number[] = [], cpuWith: number[] = [];
for (let i = 0; i < REPS; i++) {
  const a = timed(true);
  const b = timed(false);
  without.push(a.wall); cpuWithout.push(a.cpu);
  withOo.push(b.wall); cpuWith.push(b.cpu);
}
const w0 = median(without), w1 = median(withOo);
console.log(`demo fit (${observations.length} obs, A1 A2), ${REPS} reps: without original orbit ${w0.toFixed(0)} ms (CPU ${median(cpuWithout).toFixed(0)}), ` +
  `with ${w1.toFixed(0)} ms (CPU ${median(cpuWith).toFixed(0)}): the step adds ${(w1 - w0).toFixed(0)} ms warm = ${((w1 - w0) / w0 * 100).toFixed(0)}% of the fit, ratio ${(w1 / w0).toFixed(2)}; ` +
  `first fit of the process (cold ephemeris) ${cold.wall.toFixed(0)} ms (CPU ${cold.cpu.toFixed(0)})`);

// the whole job as the fit worker runs it (20-year encounter search on)
const fullWithout: number[] = [], fullWith: number[] = [];
timed(true, false);
for (let i = 0; i < REPS; i++) {
  fullWithout.push(timed(true, false).wall);
  fullWith.push(timed(false, false).wall);
}
const f0 = median(fullWithout), f1 = median(fullWith);
console.log(`whole demo job with the encounter search, ${REPS} reps: without original orbit ${f0.toFixed(0)} ms, with ${f1.toFixed(0)} ms: ` +
  `the step is ${((f1 - f0) / f1 * 100).toFixed(0)}% of the job, ratio ${(f1 / f0).toFixed(2)}`);

const D = Math.PI / 180;
const cases: { name: string; epoch: number; r: Vec3; v: Vec3; nonGrav: Parameters<typeof originalOrbit>[0]['nonGrav'] }[] = [];
for (const f of [cold.r.gravityOnly, cold.r.nonGrav!]) cases.push({ name: `demo ${f.label}`, epoch: f.epochTdbDays, r: f.positionAu, v: f.velocityAuD, nonGrav: f.nonGrav });
for (const [name, el] of [
  ['near-parabolic q 1.5 e 0.99995', { q: 1.5, e: 0.99995, i: 40 * D, node: 80 * D, argPeri: 130 * D, trueAnomaly: -60 * D }],
  ['hyperbola q 0.25 e 1.2 (26.6 km/s)', { q: 0.25, e: 1.2, i: 122 * D, node: 24 * D, argPeri: 241 * D, trueAnomaly: -30 * D }],
] as const) {
  const s = elementsToState(el, GM_AU3_D2.sun);
  cases.push({ name, epoch: 9800, r: s.r, v: s.v, nonGrav: null });
}
for (const c of cases) {
  const out = [50, 100, 250].map((distanceAu) => {
    const t0 = performance.now();
    const o = originalOrbit({ epochTdbDays: c.epoch, positionAu: c.r, velocityAuD: c.v, nonGrav: c.nonGrav, distanceAu });
    return { distanceAu, invA: o.inverseSemiMajorAxisPerAu, years: o.yearsBack, stop: o.stop, ms: performance.now() - t0 };
  });
  const ref = out.find((o) => o.distanceAu === R_ORIGINAL_AU)!.invA;
  console.log(`${c.name}: ` + out.map((o) => `${o.distanceAu} AU ${o.invA.toExponential(8)} (Δ vs ${R_ORIGINAL_AU} AU ${(o.invA - ref).toExponential(1)}; ${o.stop === 'distance' ? '' : `stopped: ${o.stop}, `}${o.years.toFixed(0)} yr, ${o.ms.toFixed(0)} ms nominal run)`).join('; '));
}
