/**
 * Lockstep batch integration (server/engine/assess/batch.ts) against one-object propagation
 * (server/engine/dynamics: propagate, findCloseApproaches) on the same initial states.
 *
 * Why the tolerances: the batch and the single-object run are the same integrator (IAS15, Rein & Spiegel 2015,
 * PRS23 step rule) on different step sequences (the closest clone sets the batch's step; two fixed
 * predictor-corrector iterations instead of iterating to convergence). Their difference is therefore of the order
 * of the integrator's own truncation error at the chosen epsilon, which we measure against an epsilon = 1e-12 run:
 *  - at epsilon = 1e-11 both runs are converged to ~1e-4 km over 3 years (measured 1.6e-4 and 4.5e-4 km here), so
 *    batch and single must agree within 1e-3 km (METHODS.md §4.5 reports <= 7e-5 km after 20 years at 1e-10 for
 *    the prototype);
 *  - at the Monte Carlo default epsilon = 1e-9 the single-object run itself is off by ~0.1-0.5 km after 3 years
 *    (measured), so we require the batch's error to be no worse than 3x the single-object error + 0.01 km
 *    (batching must not degrade the accuracy the integrator has; 0.5 km is irrelevant next to a 6378 km radius).
 * Orbits are invented (tests/unit/engine-mc-cases.ts).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { integrateBatch } from '../../server/engine/assess/batch';
import { AU_KM, RADIUS_KM } from '../../server/engine/constants';
import { findCloseApproaches, propagate } from '../../server/engine/dynamics';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import type { Vec3 } from '../../server/engine/vec';
import { neaCase, type NeaCase } from './engine-mc-cases';

const T0 = 10957.5; // 2030-01-01 12:00 TDB
const T1 = T0 + 3 * 365.25;
const ENC = T0 + 1.5 * 365.25 + 20;
let eph: ChebyshevEphemeris;
let far: NeaCase; // passes ~200,000 km from the Earth mid-run

const distKm = (a: ArrayLike<number>, b: ArrayLike<number>) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]) * AU_KM;

/** B clones: the nominal plus offsets of (i - B/2) * stepKm along x, y, z in turn. */
function clones(c: NeaCase, B: number, stepKm: number) {
  const x = new Float64Array(3 * B), v = new Float64Array(3 * B);
  for (let i = 0; i < B; i++) {
    for (let k = 0; k < 3; k++) {
      x[3 * i + k] = c.positionAu[k] + (k === i % 3 ? ((i - B / 2) * stepKm) / AU_KM : 0);
      v[3 * i + k] = c.velocityAuD[k];
    }
  }
  const at = (i: number) => ({ r: [x[3 * i], x[3 * i + 1], x[3 * i + 2]] as Vec3, v: [v[3 * i], v[3 * i + 1], v[3 * i + 2]] as Vec3 });
  return { x, v, at };
}

beforeAll(() => {
  eph = ChebyshevEphemeris.build(T0 - 1, T1 + 1);
  far = neaCase(eph, { startTdbDays: T0, encounterTdbDays: ENC, missKm: 200_000, a: 1.5, e: 0.4, incDeg: 10 });
});

describe('integrateBatch vs propagate (same initial states)', () => {
  it('agrees within 1e-3 km after 3 years at epsilon = 1e-11, with the same close approaches', () => {
    const B = 8;
    const { x, v, at } = clones(far, B, 100);
    const res = integrateBatch({ ephemeris: eph, fromTdbDays: T0, untilTdbDays: T1, positionsAu: x, velocitiesAuD: v, bodies: ['earth'], maxAu: 0.05, tolerance: 1e-11 });
    expect(res.clones).toHaveLength(B);
    let worst = 0;
    for (let i = 0; i < B; i++) {
      const s = propagate({ positionAu: at(i).r, velocityAuD: at(i).v, fromTdbDays: T0, toTdbDays: T1, model: 'n-body', ephemeris: eph, tolerance: 1e-11 });
      const d = distKm(s.positionAu, res.clones[i].positionAu);
      worst = Math.max(worst, d);
      expect(d).toBeLessThan(1e-3);
      expect(res.clones[i].impact).toBeNull();
      const ca = findCloseApproaches({ positionAu: at(i).r, velocityAuD: at(i).v, fromTdbDays: T0, untilTdbDays: T1, bodies: ['earth'], maxAu: 0.05, ephemeris: eph, tolerance: 1e-11 });
      const mine = res.clones[i].approaches;
      expect(mine.length).toBe(ca.length);
      expect(ca.length).toBeGreaterThan(0);
      for (let j = 0; j < ca.length; j++) {
        // Brent refinement tolerance is 1e-6 d (0.086 s) in both.
        expect(Math.abs(mine[j].tdbDays - ca[j].tdbDays) * 86400).toBeLessThan(0.2);
        expect(Math.abs(mine[j].distanceKm - ca[j].distanceKm)).toBeLessThan(1e-3);
        expect(Math.abs(mine[j].bPlane!.xiKm - ca[j].bPlane!.xiKm)).toBeLessThan(1e-2);
        expect(Math.abs(mine[j].bPlane!.zetaKm - ca[j].bPlane!.zetaKm)).toBeLessThan(1e-2);
      }
    }
    console.log(`batch vs single at epsilon 1e-11 after 3 years: max ${worst.toExponential(2)} km; ${res.steps} lockstep steps`);
  });

  it('at the Monte Carlo default epsilon = 1e-9 the batch is no less accurate than one-object propagation', () => {
    const B = 6;
    const { x, v, at } = clones(far, B, 300);
    const res = integrateBatch({ ephemeris: eph, fromTdbDays: T0, untilTdbDays: T1, positionsAu: x, velocitiesAuD: v, bodies: ['earth'], maxAu: 0.05 });
    for (let i = 0; i < B; i++) {
      const ref = propagate({ positionAu: at(i).r, velocityAuD: at(i).v, fromTdbDays: T0, toTdbDays: T1, model: 'n-body', ephemeris: eph, tolerance: 1e-12 });
      const single = propagate({ positionAu: at(i).r, velocityAuD: at(i).v, fromTdbDays: T0, toTdbDays: T1, model: 'n-body', ephemeris: eph, tolerance: 1e-9 });
      const eSingle = distKm(single.positionAu, ref.positionAu);
      const eBatch = distKm(res.clones[i].positionAu, ref.positionAu);
      expect(eBatch).toBeLessThan(3 * eSingle + 0.01);
      console.log(`clone ${i}: error after 3 years at epsilon 1e-9: batch ${eBatch.toFixed(3)} km, single ${eSingle.toFixed(3)} km`);
    }
  });

  it('the per-step screen of the monitors loses no approach: misses just inside and just outside maxAu, Earth and Moon', () => {
    // Screened monitors (batch.ts) skip a body while a lower bound of the distance over the step exceeds 1.1 maxAu;
    // minima at 0.045 AU must still be found and those at 0.055 AU must not, exactly as one-object findCloseApproaches
    // (which scans every step) finds them. Invented geometry: neaCase misses along two perpendicular directions.
    const maxAu = 0.05;
    const misses = [0.045, 0.055, 0.049, 0.03].map((au) => au * AU_KM);
    const cs = misses.map((m, k) => neaCase(eph, { startTdbDays: T0, encounterTdbDays: ENC, missKm: m, a: 1.5, e: 0.4, incDeg: 10, offsetAngleRad: (k * Math.PI) / 2 }));
    const x = Float64Array.from(cs.flatMap((c) => c.positionAu)), v = Float64Array.from(cs.flatMap((c) => c.velocityAuD));
    const res = integrateBatch({ ephemeris: eph, fromTdbDays: T0, untilTdbDays: T1, positionsAu: x, velocitiesAuD: v, bodies: ['earth', 'moon'], maxAu, tolerance: 1e-11 });
    let found = 0;
    cs.forEach((c, i) => {
      const ca = findCloseApproaches({ positionAu: c.positionAu, velocityAuD: c.velocityAuD, fromTdbDays: T0, untilTdbDays: T1, bodies: ['earth', 'moon'], maxAu, ephemeris: eph, tolerance: 1e-11 });
      const mine = res.clones[i].approaches;
      expect(mine.map((a) => a.body)).toEqual(ca.map((a) => a.body));
      for (let j = 0; j < ca.length; j++) {
        expect(Math.abs(mine[j].tdbDays - ca[j].tdbDays) * 86400).toBeLessThan(0.2);
        expect(Math.abs(mine[j].distanceKm - ca[j].distanceKm)).toBeLessThan(1e-2);
      }
      const earth = mine.filter((a) => a.body === 'earth' && !a.windowEdge);
      // The constructed minimum near ENC is reported exactly when its distance is below maxAu.
      const near = earth.filter((a) => Math.abs(a.tdbDays - ENC) < 10);
      expect(near.length).toBe(misses[i] < maxAu * AU_KM ? 1 : 0);
      found += near.length;
    });
    expect(found).toBe(3);
  });

  it('a clone aimed at the Earth stops at the surface at the same time as propagate(); the batch goes on', () => {
    const T = T0 + 120;
    const hitCase = neaCase(eph, { startTdbDays: T0 + 100, encounterTdbDays: T, missKm: 2000, a: 1.5, e: 0.4, incDeg: 10, leadDays: 2 });
    const missCase = neaCase(eph, { startTdbDays: T0 + 100, encounterTdbDays: T, missKm: 30_000, a: 1.5, e: 0.4, incDeg: 10, leadDays: 2 });
    const x = Float64Array.from([...missCase.positionAu, ...hitCase.positionAu, ...missCase.positionAu]);
    const v = Float64Array.from([...missCase.velocityAuD, ...hitCase.velocityAuD, ...missCase.velocityAuD]);
    x[6] += 50 / AU_KM;
    const until = T0 + 200;
    const res = integrateBatch({ ephemeris: eph, fromTdbDays: T0 + 100, untilTdbDays: until, positionsAu: x, velocitiesAuD: v, bodies: ['earth'], maxAu: 0.05 });
    const single = propagate({ positionAu: hitCase.positionAu, velocityAuD: hitCase.velocityAuD, fromTdbDays: T0 + 100, toTdbDays: until, model: 'n-body', ephemeris: eph });
    expect(single.impact?.body).toBe('earth');
    const hit = res.clones[1];
    expect(hit.impact?.body).toBe('earth');
    expect(Math.abs(hit.impact!.tdbDays - single.impact!.tdbDays) * 86400).toBeLessThan(0.01);
    expect(hit.endTdbDays).toBe(hit.impact!.tdbDays);
    const last = hit.approaches[hit.approaches.length - 1];
    expect(last.impact).toBe(true);
    expect(Math.abs(last.distanceKm - RADIUS_KM.earth)).toBeLessThan(0.01);
    // The others went on to the end, past the Earth, each with one recorded approach well outside the surface.
    for (const i of [0, 2]) {
      expect(res.clones[i].impact).toBeNull();
      expect(res.clones[i].endTdbDays).toBe(until);
      expect(res.clones[i].approaches.filter((a) => !a.windowEdge).length).toBe(1);
      expect(res.clones[i].approaches[0].distanceKm).toBeGreaterThan(20_000);
      const s = propagate({ positionAu: [x[3 * i], x[3 * i + 1], x[3 * i + 2]], velocityAuD: [v[3 * i], v[3 * i + 1], v[3 * i + 2]], fromTdbDays: T0 + 100, toTdbDays: until, model: 'n-body', ephemeris: eph });
      expect(distKm(s.positionAu, res.clones[i].positionAu)).toBeLessThan(1);
    }
  });
});
