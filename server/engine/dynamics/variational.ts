/**
 * State transition matrix from the variational equations, integrated with the orbit on the same step sequence
 * (METHODS.md §4.4 item 5, §6.2; Montenbruck & Gill 2000 ch. 7 [M]).
 *
 *   Phi(t, t0) = dx(t)/dx(t0),  dPhi/dt = A Phi,  A = [[0, I], [G, da/dv]],  Phi(t0) = I
 *   S(t) = dx(t)/dp (non-gravitational A1..A3),   dS/dt = A S + [0; da/dp],   S(t0) = 0
 *
 * Written in second-order form for the IAS15 integrator, which steps N "particles" on one time grid: particle 0
 * is the orbit, particle 1+k is column k of [Phi | S] with "position" dr_k = d r/d q_k and "velocity"
 * dv_k = d v/d q_k, and its "acceleration" is
 *   d''r_k = G dr_k + (da/dv) dv_k (+ da/dp_k for a parameter column).
 * The IAS15 step control takes the minimum time-scale over all particles, so the orbit and its partials share
 * one step sequence; the encounter step cap is computed from the orbit alone.
 *
 * Partials of the acceleration:
 * - point masses, analytic: G = sum_j mu_j (3 d_j d_j^T / d_j^5 - I / d_j^3), d_j = r - r_j, j over the Sun and
 *   the perturbers of forces.ts (the indirect term does not depend on r, METHODS.md §6.2);
 * - the Sun's 1PN term and the non-gravitational acceleration: central finite differences of those terms alone,
 *   steps 1e-5 |r| and 1e-5 |v| (both terms vary on the scale of r and v; truncation ~1e-10 relative of terms that
 *   are themselves <= 1e-7 of the solar term, so the error in A is ~1e-17 relative);
 * - da/dA_i = g(r) (r^, t^, n^)_i, exact (the MSY acceleration is linear in A_i, nongrav.ts).
 */
import { C_AU_D, GM_AU3_D2 } from '../constants';
import { addNonGravInto } from './nongrav';
import { makeForceModel } from './propagate';
import { Ias15 } from './ias15';
import { defaultEphemeris } from './ephemeris-source';
import { NBodyForce, PERTURBER_GM_AU3_D2 } from './forces';
import type { DynamicsModel, ForceModel, NonGravParams, PlanetEphemeris, Vec3 } from './types';

const MU_SUN = GM_AU3_D2.sun;
const C2 = C_AU_D * C_AU_D;

export type SensitivityParameter = 'a1' | 'a2' | 'a3';

/** Adds mu (3 d d^T / d^5 - I / d^3) to the row-major 3x3 g. */
function addPointMassGradient(mu: number, dx: number, dy: number, dz: number, g: Float64Array): void {
  const d2 = dx * dx + dy * dy + dz * dz;
  const d = Math.sqrt(d2);
  const inv3 = mu / (d2 * d);
  const inv5 = (3 * inv3) / d2;
  g[0] += inv5 * dx * dx - inv3; g[1] += inv5 * dx * dy; g[2] += inv5 * dx * dz;
  g[3] += inv5 * dy * dx; g[4] += inv5 * dy * dy - inv3; g[5] += inv5 * dy * dz;
  g[6] += inv5 * dz * dx; g[7] += inv5 * dz * dy; g[8] += inv5 * dz * dz - inv3;
}

/**
 * ForceModel over 1 + 6 + np particles (orbit, then the columns of [Phi | S]) wrapping the orbit's force model.
 */
export class VariationalForce implements ForceModel {
  evaluations = 0;
  readonly columns: number;
  private readonly g = new Float64Array(9);
  private readonly gv = new Float64Array(9);
  private readonly ex = new Float64Array(3);
  private readonly exP = new Float64Array(3);
  private readonly exM = new Float64Array(3);
  private readonly rr = new Float64Array(3);
  private readonly vv = new Float64Array(3);
  private readonly dp: Float64Array;
  private readonly unit = new Float64Array(3);

  constructor(
    readonly inner: ForceModel,
    readonly model: DynamicsModel,
    readonly nonGrav: NonGravParams | null,
    readonly relativity: boolean,
    readonly parameters: readonly SensitivityParameter[],
  ) {
    this.columns = 6 + parameters.length;
    this.dp = new Float64Array(3 * parameters.length);
    if (parameters.length > 0 && !nonGrav) throw new Error('non-grav sensitivities need the non-grav law');
  }

  /** GR + non-grav acceleration of one state (only the terms whose partials are taken by differences). */
  private extra(r: Float64Array, v: Float64Array, out: Float64Array): void {
    out[0] = 0; out[1] = 0; out[2] = 0;
    if (this.model !== 'n-body') return;
    if (this.relativity) {
      const rx = r[0], ry = r[1], rz = r[2], vx = v[0], vy = v[1], vz = v[2];
      const r2 = rx * rx + ry * ry + rz * rz;
      const rn = Math.sqrt(r2);
      const v2 = vx * vx + vy * vy + vz * vz;
      const rv = rx * vx + ry * vy + rz * vz;
      const f = MU_SUN / (C2 * r2 * rn);
      const cr = (4 * MU_SUN) / rn - v2;
      out[0] += f * (cr * rx + 4 * rv * vx);
      out[1] += f * (cr * ry + 4 * rv * vy);
      out[2] += f * (cr * rz + 4 * rv * vz);
    }
    const ng = this.nonGrav;
    if (ng && (ng.a1 !== 0 || ng.a2 !== 0 || ng.a3 !== 0)) addNonGravInto(ng.law, ng.a1, ng.a2, ng.a3, r, v, 0, out);
  }

  accelerations(t: number, x: Float64Array, v: Float64Array, out: Float64Array): void {
    this.evaluations++;
    this.inner.accelerations(t, x.subarray(0, 3), v.subarray(0, 3), out.subarray(0, 3));
    const g = this.g, gv = this.gv;
    g.fill(0);
    gv.fill(0);
    const rx = x[0], ry = x[1], rz = x[2];
    if (this.model === 'two-body') {
      addPointMassGradient(MU_SUN, rx, ry, rz, g);
    } else {
      addPointMassGradient(MU_SUN, rx, ry, rz, g);
      const p = (this.inner as NBodyForce).planetPositions(t);
      for (let j = 0; j < 9; j++) addPointMassGradient(PERTURBER_GM_AU3_D2[j], rx - p[3 * j], ry - p[3 * j + 1], rz - p[3 * j + 2], g);
      const hasNg = !!this.nonGrav && (this.nonGrav.a1 !== 0 || this.nonGrav.a2 !== 0 || this.nonGrav.a3 !== 0);
      if (this.relativity || hasNg) {
        // Central differences of the GR + non-grav terms with respect to r (into g) and v (into gv).
        const rr = this.rr, vv = this.vv;
        const hr = 1e-5 * Math.hypot(rx, ry, rz);
        const hv = 1e-5 * Math.hypot(v[0], v[1], v[2]);
        for (let c = 0; c < 6; c++) {
          const h = c < 3 ? hr : hv;
          for (let s = 0; s < 2; s++) {
            rr[0] = x[0]; rr[1] = x[1]; rr[2] = x[2];
            vv[0] = v[0]; vv[1] = v[1]; vv[2] = v[2];
            const d = s === 0 ? h : -h;
            if (c < 3) rr[c] += d;
            else vv[c - 3] += d;
            this.extra(rr, vv, s === 0 ? this.exP : this.exM);
          }
          const tgt = c < 3 ? g : gv;
          const col = c % 3;
          for (let i = 0; i < 3; i++) tgt[3 * i + col] += (this.exP[i] - this.exM[i]) / (2 * h);
        }
      }
      // da/dA_i = g(r) * unit direction (exact: the MSY acceleration is linear in A_i).
      if (this.parameters.length > 0) {
        const law = this.nonGrav!.law;
        for (let k = 0; k < this.parameters.length; k++) {
          const u = this.unit;
          u.fill(0);
          const which = this.parameters[k];
          addNonGravInto(law, which === 'a1' ? 1 : 0, which === 'a2' ? 1 : 0, which === 'a3' ? 1 : 0, x, v, 0, u);
          this.dp[3 * k] = u[0]; this.dp[3 * k + 1] = u[1]; this.dp[3 * k + 2] = u[2];
        }
      }
    }
    for (let k = 0; k < this.columns; k++) {
      const o = 3 * (k + 1);
      const dx = x[o], dy = x[o + 1], dz = x[o + 2];
      const du = v[o], dv = v[o + 1], dw = v[o + 2];
      for (let i = 0; i < 3; i++) {
        let a = g[3 * i] * dx + g[3 * i + 1] * dy + g[3 * i + 2] * dz;
        a += gv[3 * i] * du + gv[3 * i + 1] * dv + gv[3 * i + 2] * dw;
        if (k >= 6) a += this.dp[3 * (k - 6) + i];
        out[o + i] = a;
      }
    }
  }

  maxStepDays(t: number, x: Float64Array, v: Float64Array): number {
    return this.inner.maxStepDays(t, x.subarray(0, 3), v.subarray(0, 3));
  }
}

export type StmOptions = {
  positionAu: Vec3;
  velocityAuD: Vec3;
  fromTdbDays: number;
  /** Times at which the state and [Phi | S] are wanted, all on one side of fromTdbDays (any order). */
  outputTdbDays: readonly number[];
  model: DynamicsModel;
  ephemeris?: PlanetEphemeris;
  nonGrav?: NonGravParams | null;
  /** Non-grav parameters whose sensitivity columns are wanted (each needs nonGrav's law). */
  sensitivities?: readonly SensitivityParameter[];
  tolerance?: number;
  relativity?: boolean;
};

export type StmSample = {
  tdbDays: number;
  /** x, y, z (AU), vx, vy, vz (AU/d). */
  state: Float64Array;
  /** 6 x (6 + np) row-major: rows x..vz, columns x0..vz0 then the parameters. */
  phi: Float64Array;
  columns: number;
};

export type StmResult = { samples: StmSample[]; steps: number; forceEvaluations: number };

/**
 * Propagate the orbit with its state transition matrix (and non-grav sensitivities) to each output time
 * (dense output of the converged step polynomial, the same for every column).
 */
export function propagateWithStm(opts: StmOptions): StmResult {
  const from = opts.fromTdbDays;
  const params = opts.sensitivities ?? [];
  const outs = [...opts.outputTdbDays];
  if (outs.length === 0) return { samples: [], steps: 0, forceEvaluations: 0 };
  const dir = outs.some((t) => t > from) ? 1 : -1;
  if (outs.some((t) => (t - from) * dir < 0)) throw new RangeError('output times must all lie on one side of the start epoch');
  outs.sort((a, b) => (a - b) * dir);
  const last = outs[outs.length - 1];
  let eph = opts.ephemeris;
  if (opts.model === 'n-body') eph ??= defaultEphemeris(from, last);
  const relativity = opts.relativity ?? true;
  const nonGrav = opts.nonGrav ?? null;
  const inner = makeForceModel(opts.model, eph, nonGrav, relativity);
  const force = new VariationalForce(inner, opts.model, nonGrav, relativity, params);
  const cols = force.columns;
  const n = 1 + cols;
  const x0 = new Float64Array(3 * n);
  const v0 = new Float64Array(3 * n);
  x0.set(opts.positionAu, 0);
  v0.set(opts.velocityAuD, 0);
  for (let k = 0; k < 3; k++) x0[3 * (k + 1) + k] = 1; // d r / d r0 = I
  for (let k = 0; k < 3; k++) v0[3 * (k + 4) + k] = 1; // d v / d v0 = I
  const integ = new Ias15(force, n, { epsilon: opts.tolerance ?? 1e-9, controlParticles: 1 });
  integ.reset(from, x0, v0);

  const samples: StmSample[] = [];
  const buf = new Float64Array(6);
  const take = (t: number, fromState: boolean) => {
    const state = new Float64Array(6);
    const phi = new Float64Array(6 * cols);
    for (let p = 0; p < n; p++) {
      if (fromState) {
        for (let c = 0; c < 3; c++) {
          buf[c] = integ.x[3 * p + c];
          buf[3 + c] = integ.v[3 * p + c];
        }
      } else {
        integ.stateAt(t, buf, p);
      }
      if (p === 0) state.set(buf);
      else for (let i = 0; i < 6; i++) phi[i * cols + (p - 1)] = buf[i];
    }
    samples.push({ tdbDays: t, state, phi, columns: cols });
  };
  let i = 0;
  while (i < outs.length && outs[i] === from) take(outs[i++], true);
  let done = i >= outs.length;
  while (!done) {
    done = integ.step(last);
    const { t1 } = integ.lastStep;
    const end = done ? last : t1;
    while (i < outs.length && (outs[i] - end) * dir <= 0) take(outs[i++], false);
  }
  return { samples, steps: integ.steps, forceEvaluations: force.evaluations };
}
