/**
 * State transition matrix from the variational equations (dynamics/variational.ts) against central finite
 * differences of the propagators (METHODS.md §6.2: Phi_{:,k} ~ [x(x0 + h e_k) - x(x0 - h e_k)] / 2h, with the check
 * that halving h leaves it unchanged). References are independent of the variational code:
 *  - two-body: the universal-variable Kepler propagator (twobody/universal.ts, Curtis 2014 Alg. 3.3-3.4), tested
 *    elsewhere against CHECKS.md §1 worked examples;
 *  - n-body (Sun + planets + Moon + GR + non-grav): dynamics.propagate (plain IAS15 on one particle), including a
 *    passage 16,000 km from the Earth.
 */
import { describe, expect, it } from 'vitest';
import { GM_AU3_D2 } from '../../server/engine/constants';
import { propagate } from '../../server/engine/dynamics';
import { propagateWithStm } from '../../server/engine/dynamics/variational';
import { propagateKepler } from '../../server/engine/twobody/universal';
import type { Vec3 } from '../../server/engine/vec';
import { ENCOUNTER_TDB_DAYS, fixtureEphemeris, syntheticSolution } from './engine-assess-fixtures';

type Prop = (x: number[], ng?: [number, number, number]) => number[];

/** Central-difference column k with step h; parameter columns (k >= 6) perturb A_{k-6}. */
function fdColumn(prop: Prop, x0: number[], k: number, h: number, ng0: [number, number, number] = [0, 0, 0]): number[] {
  const p = [...x0], m = [...x0];
  const ngp: [number, number, number] = [...ng0], ngm: [number, number, number] = [...ng0];
  if (k < 6) { p[k] += h; m[k] -= h; } else { ngp[k - 6] += h; ngm[k - 6] -= h; }
  const a = prop(p, ngp), b = prop(m, ngm);
  return a.map((v, i) => (v - b[i]) / (2 * h));
}
const maxAbs = (v: number[]) => Math.max(...v.map(Math.abs));
const col = (phi: Float64Array, cols: number, k: number) => [0, 1, 2, 3, 4, 5].map((i) => phi[i * cols + k]);
const diff = (a: number[], b: number[]) => a.map((v, i) => v - b[i]);

describe('state transition matrix (METHODS.md §6.2)', () => {
  it('two-body: matches central differences of the universal-variable Kepler propagator', () => {
    const r0: Vec3 = [1.1, 0.3, 0.1], v0: Vec3 = [-0.004, 0.015, 0.002];
    const T = 400;
    const res = propagateWithStm({ positionAu: r0, velocityAuD: v0, fromTdbDays: 0, outputTdbDays: [T, 0], model: 'two-body', tolerance: 1e-10 });
    expect(res.samples.map((s) => s.tdbDays)).toEqual([0, T]);
    // Phi(t0, t0) = I
    const I = res.samples[0].phi;
    for (let i = 0; i < 6; i++) for (let j = 0; j < 6; j++) expect(I[i * 6 + j]).toBe(i === j ? 1 : 0);
    const s = res.samples[1];
    const kep: Prop = (x) => { const o = propagateKepler(x.slice(0, 3) as Vec3, x.slice(3) as Vec3, T, GM_AU3_D2.sun); return [...o.r, ...o.v]; };
    // nominal state equals Kepler
    expect(maxAbs(diff(Array.from(s.state), kep([...r0, ...v0])))).toBeLessThan(1e-11);
    for (let k = 0; k < 6; k++) {
      const h = k < 3 ? 1e-6 : 1e-8;
      const fd = fdColumn(kep, [...r0, ...v0], k, h);
      const fd2 = fdColumn(kep, [...r0, ...v0], k, h / 2);
      expect(maxAbs(diff(fd, fd2))).toBeLessThan(1e-6 * maxAbs(fd)); // halving h leaves it unchanged
      expect(maxAbs(diff(col(s.phi, 6, k), fd2))).toBeLessThan(1e-7 * maxAbs(fd2));
    }
  });

  it('n-body with GR and non-grav A1-A3: Phi and the A sensitivities match central differences of propagate(), through a 16,000 km Earth flyby', () => {
    const { solution } = syntheticSolution({ xiKm: 15910.8, zetaKm: -4171.2 });
    const eph = fixtureEphemeris();
    const ng0: [number, number, number] = [2e-12, -3e-13, 1e-13];
    const law = 'inverse-square' as const;
    const T = ENCOUNTER_TDB_DAYS + 2; // 2 days after the flyby
    const x0 = [...solution.positionAu, ...solution.velocityAuD];
    const t0 = performance.now();
    const res = propagateWithStm({
      positionAu: solution.positionAu, velocityAuD: solution.velocityAuD, fromTdbDays: solution.epochTdbDays, outputTdbDays: [T],
      model: 'n-body', ephemeris: eph, nonGrav: { a1: ng0[0], a2: ng0[1], a3: ng0[2], law }, sensitivities: ['a1', 'a2', 'a3'],
    });
    const stmSeconds = (performance.now() - t0) / 1000;
    const s = res.samples[0];
    expect(s.columns).toBe(9);
    const prop: Prop = (x, ng = ng0) => {
      const o = propagate({ positionAu: x.slice(0, 3) as Vec3, velocityAuD: x.slice(3) as Vec3, fromTdbDays: solution.epochTdbDays, toTdbDays: T,
        model: 'n-body', ephemeris: eph, nonGrav: { a1: ng[0], a2: ng[1], a3: ng[2], law } });
      expect(o.impact).toBeNull();
      return [...o.positionAu, ...o.velocityAuD];
    };
    // the orbit integrated alongside its partials is the orbit integrated alone
    expect(maxAbs(diff(Array.from(s.state.subarray(0, 3)), prop(x0).slice(0, 3)))).toBeLessThan(1e-12);
    const worst: number[] = [];
    for (let k = 0; k < 9; k++) {
      const h = k < 3 ? 1e-8 : k < 6 ? 1e-10 : 1e-12;
      const fd = fdColumn(prop, x0, k, h, ng0);
      const fd2 = fdColumn(prop, x0, k, h / 2, ng0);
      const scale = maxAbs(fd2);
      expect(maxAbs(diff(fd, fd2))).toBeLessThan(1e-4 * scale); // METHODS 6.2: halving h leaves it unchanged
      worst.push(maxAbs(diff(col(s.phi, 9, k), fd2)) / scale);
    }
    // measured: worst relative difference printed for the report
    console.log(`STM vs FD through the flyby: worst relative column difference ${Math.max(...worst).toExponential(2)}; STM run ${stmSeconds.toFixed(2)} s`);
    for (const w of worst) expect(w).toBeLessThan(1e-5);
  });
});
