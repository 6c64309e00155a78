/**
 * IAS15-style integrator: 15th-order Gauss–Radau predictor–corrector for r'' = F(t, r, r')
 * (Everhart 1985; Rein & Spiegel 2015, MNRAS 446, 1424) with the step-size criterion of
 * Pham, Rein & Spiegel (2024) (REBOUND's default "PRS23"; METHODS.md §4.4–4.5: the classic rule
 * stalled in deep encounters).
 *
 * One module behind a small interface (reset, step, dense output), state = Float64Array of N
 * particles (3N positions, 3N velocities) sharing one time grid, so a lockstep batch of clones
 * can use the same class (one force call per substep for all clones).
 *
 * Time is kept as (epoch, offset) with a Kahan-compensated offset sum (METHODS.md §4.5, §11);
 * positions and velocities are updated with compensated summation as in IAS15.
 * Works forward and backward in time (signed step).
 */
import type { ForceModel } from './types';

/** Gauss–Radau spacings on [0, 1] (h_0 = 0 plus the 7 interior nodes; Everhart 1985, as used in IAS15). */
export const RADAU_NODES: readonly number[] = [
  0.0, 0.0562625605369221464656521910318, 0.18024069173689236498757994278,
  0.352624717113169637373907769648, 0.547153626330555383001448554766, 0.734210177215410531523210605558,
  0.88532094683909576809035977103, 0.977520613561287501891174488626,
];

/**
 * Acceleration over the step, s in [0,1]: a(s) = a0 + sum_{j=0..6} b_j s^{j+1}
 *   = a0 + sum_{m=0..6} g_m N_m(s),  N_m(s) = s prod_{i=1..m} (s - h_i)  (Newton form).
 * C[j][m] = coefficient of s^{j+1} in N_m (b = C g); D = C^-1 (g = D b). Computed once from the nodes.
 */
const C: number[][] = [];
const D: number[][] = [];
/** RR[n][i] = h_n - h_i (divided-difference denominators). */
const RR: number[][] = [];
(function initCoefficients() {
  const h = RADAU_NODES;
  for (let j = 0; j < 7; j++) {
    C.push(new Array(7).fill(0));
    D.push(new Array(7).fill(0));
  }
  for (let m = 0; m < 7; m++) {
    // p(s) = prod_{i=1..m} (s - h_i), coefficients p[k] of s^k.
    let p = [1];
    for (let i = 1; i <= m; i++) {
      const q = new Array(p.length + 1).fill(0);
      for (let k = 0; k < p.length; k++) {
        q[k + 1] += p[k];
        q[k] -= h[i] * p[k];
      }
      p = q;
    }
    for (let j = 0; j <= m; j++) C[j][m] = p[j];
  }
  // Invert the unit upper-triangular C column by column.
  for (let m = 0; m < 7; m++) {
    for (let j = m; j >= 0; j--) {
      let s = j === m ? 1 : 0;
      for (let k = j + 1; k <= m; k++) s -= C[j][k] * D[k][m];
      D[j][m] = s; // C[j][j] = 1
    }
  }
  for (let n = 0; n < 8; n++) {
    RR.push([]);
    for (let i = 0; i < n; i++) RR[n].push(h[n] - h[i]);
  }
})();

/*
 * Flat constant tables for the inner loops (Float64Array, no nested arrays, no divisions in the loops):
 *  CF[j*7 + m] = C[j][m];  DF[m*7 + j] = D[m][j];  RINV[n*8 + i] = 1 / (h_n - h_i);
 *  PX[n*7 + j] = h_n^(j+1) / ((j+2)(j+3)) and PV[n*7 + j] = h_n^(j+1) / (j+2): the position and velocity
 *  predictor weights of b_j at node n (x(s) = x0 + s dt v0 + (s dt)^2 [a0/2 + sum_j b_j s^(j+1)/((j+2)(j+3))],
 *  v(s) = v0 + s dt [a0 + sum_j b_j s^(j+1)/(j+2)]); XF, VF the same at s = 1.
 */
const CF = new Float64Array(49);
const DF = new Float64Array(49);
const RINV = new Float64Array(64);
const PX = new Float64Array(56);
const PV = new Float64Array(56);
const XF = new Float64Array(7);
const VF = new Float64Array(7);
(function initFlat() {
  for (let j = 0; j < 7; j++) {
    for (let m = 0; m < 7; m++) {
      CF[j * 7 + m] = C[j][m];
      DF[m * 7 + j] = D[m][j];
    }
    XF[j] = 1 / ((j + 2) * (j + 3));
    VF[j] = 1 / (j + 2);
  }
  for (let n = 1; n < 8; n++) {
    for (let i = 0; i < n; i++) RINV[n * 8 + i] = 1 / RR[n][i];
    const s = RADAU_NODES[n];
    let p = s;
    for (let j = 0; j < 7; j++) {
      PX[n * 7 + j] = p * XF[j];
      PV[n * 7 + j] = p * VF[j];
      p *= s;
    }
  }
})();

export type Ias15Options = {
  /** Precision parameter epsilon (REBOUND default 1e-9; METHODS.md §4.4). */
  epsilon?: number;
  /** Fixed number of predictor–corrector iterations per step (batches); default adaptive (converge to 1e-16, max 12). */
  fixedIterations?: number;
  /** Smallest |step| in days before giving up (step collapse guard). */
  minStepDays?: number;
  /**
   * Only the first `controlParticles` particles set the step size (default: all). Variational particles (partials
   * that start at zero) must not, as in REBOUND where variational particles do not enter the step criterion.
   */
  controlParticles?: number;
};

const SAFETY = 0.25;

export class StepCollapseError extends Error {}

/**
 * Storage: positions, velocities, accelerations as Float64Array(3N); the seven b, g, e coefficients of every
 * coordinate k as ONE Float64Array(7·3N) with the seven coefficients of a coordinate side by side (index 7k + j),
 * so each inner loop touches one contiguous block per coordinate. Nothing is allocated per step.
 */
export class Ias15 {
  readonly n3: number;
  /** Current positions and velocities (3N each). */
  readonly x: Float64Array;
  readonly v: Float64Array;
  /** Steps accepted and rejected so far. */
  steps = 0;
  rejected = 0;
  readonly epsilon: number;

  private readonly a: Float64Array;
  private aValid = false;
  private readonly csx: Float64Array;
  private readonly csv: Float64Array;
  private readonly b: Float64Array;
  private readonly g: Float64Array;
  private e: Float64Array;
  /** b and e of the last accepted step (br is also the dense output's polynomial); e and er swap at each accept. */
  private readonly br: Float64Array;
  private e2: Float64Array;
  private readonly xs: Float64Array;
  private readonly vs: Float64Array;
  private readonly at: Float64Array;
  // Last accepted step, for dense output: start state, acceleration (b is br).
  private readonly dx0: Float64Array;
  private readonly dv0: Float64Array;
  private readonly da0: Float64Array;
  private dStartOffset = 0;
  private dDt = 0;
  private hasStep = false;
  private readonly stepOut = { t0: 0, t1: 0 };

  private epoch = 0;
  private offset = 0;
  private offsetComp = 0;
  private dt = 0;
  private dtLastSuccess = 0;
  private readonly fixedIterations: number;
  private readonly minStep: number;
  private readonly controlN3: number;

  constructor(
    readonly force: ForceModel,
    particles: number,
    opts: Ias15Options = {},
  ) {
    const n3 = 3 * particles;
    this.n3 = n3;
    this.epsilon = opts.epsilon ?? 1e-9;
    this.fixedIterations = opts.fixedIterations ?? 0;
    this.minStep = opts.minStepDays ?? 1e-9;
    this.controlN3 = 3 * Math.min(particles, opts.controlParticles ?? particles);
    const mk = () => new Float64Array(n3);
    const mk7 = () => new Float64Array(7 * n3);
    this.x = mk(); this.v = mk(); this.a = mk(); this.csx = mk(); this.csv = mk();
    this.b = mk7(); this.g = mk7(); this.e = mk7(); this.br = mk7(); this.e2 = mk7();
    this.xs = mk(); this.vs = mk(); this.at = mk();
    this.dx0 = mk(); this.dv0 = mk(); this.da0 = mk();
  }

  /** Start from (x, v) at tdbDays. dtDays: first trial step (signed or unsigned; sign set by the target). */
  reset(tdbDays: number, x: ArrayLike<number>, v: ArrayLike<number>, dtDays = 0): void {
    this.epoch = tdbDays;
    this.offset = 0;
    this.offsetComp = 0;
    for (let k = 0; k < this.n3; k++) {
      this.x[k] = x[k]; this.v[k] = v[k]; this.csx[k] = 0; this.csv[k] = 0;
    }
    this.b.fill(0); this.g.fill(0); this.e.fill(0); this.br.fill(0); this.e2.fill(0);
    this.aValid = false;
    this.hasStep = false;
    this.dt = dtDays;
    this.dtLastSuccess = 0;
  }

  /**
   * Replace the state of one particle (batches: a clone that has stopped, e.g. at an impact, is parked and no
   * longer evolves). Clears that particle's compensation terms and acceleration polynomial so that the next
   * step starts afresh for it; the other particles are untouched.
   */
  resetParticle(particle: number, x: ArrayLike<number>, v: ArrayLike<number>): void {
    for (let c = 0; c < 3; c++) {
      const k = 3 * particle + c;
      this.x[k] = x[c]; this.v[k] = v[c]; this.csx[k] = 0; this.csv[k] = 0;
      this.b.fill(0, 7 * k, 7 * k + 7); this.g.fill(0, 7 * k, 7 * k + 7); this.e.fill(0, 7 * k, 7 * k + 7);
      this.br.fill(0, 7 * k, 7 * k + 7); this.e2.fill(0, 7 * k, 7 * k + 7);
    }
    this.aValid = false;
  }

  /** Current time, tdbDays. */
  get tdbDays(): number {
    return this.epoch + this.offset;
  }

  /** Last accepted step: [start, end] in tdbDays. The returned object is reused by the next call. */
  get lastStep(): { t0: number; t1: number } {
    const t0 = this.epoch + this.dStartOffset;
    this.stepOut.t0 = t0;
    this.stepOut.t1 = t0 + this.dDt;
    return this.stepOut;
  }

  /** The trial size of the next step (signed days). */
  get nextStepDays(): number {
    return this.dt;
  }

  /** Positions (3N) at the start of the last accepted step. */
  get stepStartPositions(): Float64Array {
    return this.dx0;
  }

  /** Velocities (3N) at the start of the last accepted step. */
  get stepStartVelocities(): Float64Array {
    return this.dv0;
  }

  private initialStep(sign: number): number {
    // Orbital time-scale guess: a few per cent of |r|/|v| of the fastest particle, refined by the controller.
    let best = Infinity;
    for (let o = 0; o < this.controlN3; o += 3) {
      const r = Math.hypot(this.x[o], this.x[o + 1], this.x[o + 2]);
      const s = Math.hypot(this.v[o], this.v[o + 1], this.v[o + 2]);
      if (s > 0) best = Math.min(best, (0.01 * r) / s);
    }
    if (!isFinite(best) || best <= 0) best = 0.1;
    return sign * best;
  }

  /** Predicted positions and velocities at node n of a step of dt from (x, v, a, b) into (xs, vs). */
  private predict(n: number, dt: number): void {
    const n3 = this.n3, x = this.x, v = this.v, a = this.a, b = this.b, xs = this.xs, vs = this.vs;
    const sdt = RADAU_NODES[n] * dt;
    const sdt2 = sdt * sdt;
    const o = n * 7;
    const px0 = PX[o], px1 = PX[o + 1], px2 = PX[o + 2], px3 = PX[o + 3], px4 = PX[o + 4], px5 = PX[o + 5], px6 = PX[o + 6];
    const pv0 = PV[o], pv1 = PV[o + 1], pv2 = PV[o + 2], pv3 = PV[o + 3], pv4 = PV[o + 4], pv5 = PV[o + 5], pv6 = PV[o + 6];
    for (let k = 0, q = 0; k < n3; k++, q += 7) {
      const b0 = b[q], b1 = b[q + 1], b2 = b[q + 2], b3 = b[q + 3], b4 = b[q + 4], b5 = b[q + 5], b6 = b[q + 6];
      const ak = a[k];
      xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + b0 * px0 + b1 * px1 + b2 * px2 + b3 * px3 + b4 * px4 + b5 * px5 + b6 * px6);
      vs[k] = v[k] + sdt * (ak + b0 * pv0 + b1 * pv1 + b2 * pv2 + b3 * pv3 + b4 * pv4 + b5 * pv5 + b6 * pv6);
    }
  }

  /**
   * Corrector at node n (1..7) from the accelerations `at`: new g_{n-1} by divided differences, b updated by the
   * change; for n < 7 also the predicted state at node n + 1 into (xs, vs) (predict() fused into this pass).
   * Returns max |change of g_6| / max |at| at n = 7 when `measure` (adaptive iterations), else 0.
   */
  private correct(n: number, measure: boolean, dt: number): number {
    const n3 = this.n3, a = this.a, at = this.at, g = this.g, b = this.b;
    const x = this.x, v = this.v, xs = this.xs, vs = this.vs;
    const m = n - 1;
    // Nodes 1..6: the predictor of node n + 1 is fused into the same pass (uses the b just updated).
    const nn = n < 7 ? n + 1 : 7;
    const sdt = RADAU_NODES[nn] * dt;
    const sdt2 = sdt * sdt;
    const o = nn * 7;
    const px0 = PX[o], px1 = PX[o + 1], px2 = PX[o + 2], px3 = PX[o + 3], px4 = PX[o + 4], px5 = PX[o + 5], px6 = PX[o + 6];
    const pv0 = PV[o], pv1 = PV[o + 1], pv2 = PV[o + 2], pv3 = PV[o + 3], pv4 = PV[o + 4], pv5 = PV[o + 5], pv6 = PV[o + 6];
    const ro = n * 8;
    const r0 = RINV[ro];
    let maxDelta = 0, maxA = 0;
    switch (m) {
      case 0: {
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = (at[k] - a[k]) * r0;
          const d = gm - g[q];
          g[q] = gm;
          b[q] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      case 1: {
        const r1 = RINV[ro + 1];
        const c01 = CF[1];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = ((at[k] - a[k]) * r0 - g[q]) * r1;
          const d = gm - g[q + 1];
          g[q + 1] = gm;
          b[q] += c01 * d;
          b[q + 1] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      case 2: {
        const r1 = RINV[ro + 1], r2 = RINV[ro + 2];
        const c02 = CF[2], c12 = CF[9];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = (((at[k] - a[k]) * r0 - g[q]) * r1 - g[q + 1]) * r2;
          const d = gm - g[q + 2];
          g[q + 2] = gm;
          b[q] += c02 * d;
          b[q + 1] += c12 * d;
          b[q + 2] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      case 3: {
        const r1 = RINV[ro + 1], r2 = RINV[ro + 2], r3 = RINV[ro + 3];
        const c03 = CF[3], c13 = CF[10], c23 = CF[17];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = ((((at[k] - a[k]) * r0 - g[q]) * r1 - g[q + 1]) * r2 - g[q + 2]) * r3;
          const d = gm - g[q + 3];
          g[q + 3] = gm;
          b[q] += c03 * d;
          b[q + 1] += c13 * d;
          b[q + 2] += c23 * d;
          b[q + 3] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      case 4: {
        const r1 = RINV[ro + 1], r2 = RINV[ro + 2], r3 = RINV[ro + 3], r4 = RINV[ro + 4];
        const c04 = CF[4], c14 = CF[11], c24 = CF[18], c34 = CF[25];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = (((((at[k] - a[k]) * r0 - g[q]) * r1 - g[q + 1]) * r2 - g[q + 2]) * r3 - g[q + 3]) * r4;
          const d = gm - g[q + 4];
          g[q + 4] = gm;
          b[q] += c04 * d;
          b[q + 1] += c14 * d;
          b[q + 2] += c24 * d;
          b[q + 3] += c34 * d;
          b[q + 4] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      case 5: {
        const r1 = RINV[ro + 1], r2 = RINV[ro + 2], r3 = RINV[ro + 3], r4 = RINV[ro + 4], r5 = RINV[ro + 5];
        const c05 = CF[5], c15 = CF[12], c25 = CF[19], c35 = CF[26], c45 = CF[33];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = ((((((at[k] - a[k]) * r0 - g[q]) * r1 - g[q + 1]) * r2 - g[q + 2]) * r3 - g[q + 3]) * r4 - g[q + 4]) * r5;
          const d = gm - g[q + 5];
          g[q + 5] = gm;
          b[q] += c05 * d;
          b[q + 1] += c15 * d;
          b[q + 2] += c25 * d;
          b[q + 3] += c35 * d;
          b[q + 4] += c45 * d;
          b[q + 5] += d;
          {
            const c0 = b[q], c1 = b[q + 1], c2 = b[q + 2], c3 = b[q + 3], c4 = b[q + 4], c5 = b[q + 5], c6 = b[q + 6];
            const ak = a[k];
            xs[k] = x[k] + sdt * v[k] + sdt2 * (0.5 * ak + c0 * px0 + c1 * px1 + c2 * px2 + c3 * px3 + c4 * px4 + c5 * px5 + c6 * px6);
            vs[k] = v[k] + sdt * (ak + c0 * pv0 + c1 * pv1 + c2 * pv2 + c3 * pv3 + c4 * pv4 + c5 * pv5 + c6 * pv6);
          }
        }
        break;
      }
      default: {
        const r1 = RINV[ro + 1], r2 = RINV[ro + 2], r3 = RINV[ro + 3], r4 = RINV[ro + 4], r5 = RINV[ro + 5], r6 = RINV[ro + 6];
        const c06 = CF[6], c16 = CF[13], c26 = CF[20], c36 = CF[27], c46 = CF[34], c56 = CF[41];
        for (let k = 0, q = 0; k < n3; k++, q += 7) {
          const gm = (((((((at[k] - a[k]) * r0 - g[q]) * r1 - g[q + 1]) * r2 - g[q + 2]) * r3 - g[q + 3]) * r4 - g[q + 4]) * r5 - g[q + 5]) * r6;
          const d = gm - g[q + 6];
          g[q + 6] = gm;
          b[q] += c06 * d;
          b[q + 1] += c16 * d;
          b[q + 2] += c26 * d;
          b[q + 3] += c36 * d;
          b[q + 4] += c46 * d;
          b[q + 5] += c56 * d;
          b[q + 6] += d;
          if (measure) {
            const ad = Math.abs(d);
            if (ad > maxDelta) maxDelta = ad;
            const aa = Math.abs(at[k]);
            if (aa > maxA) maxA = aa;
          }
        }
        if (measure) return maxA > 0 ? maxDelta / maxA : 0;
      }
    }
    return 0;
  }

  /**
   * Take one accepted step towards targetTdbDays (never beyond it). Returns true when the target is reached.
   * Rejected trial steps are retried internally.
   */
  step(targetTdbDays: number): boolean {
    const n3 = this.n3;
    const remaining = targetTdbDays - this.epoch - this.offset;
    if (remaining === 0) return true;
    const sign = remaining > 0 ? 1 : -1;
    if (this.dt === 0 || Math.sign(this.dt) !== sign) this.dt = this.initialStep(sign);
    const x = this.x, v = this.v, a = this.a, b = this.b, g = this.g;
    const tStart = this.epoch + this.offset;
    if (!this.aValid) {
      this.force.accelerations(tStart, x, v, a);
      this.aValid = true;
    }
    const cap = this.force.maxStepDays(tStart, x, v);
    const fixed = this.fixedIterations;

    for (;;) {
      let dt = this.dt;
      if (Math.abs(dt) > cap) dt = sign * cap;
      let final = false;
      if (Math.abs(dt) >= Math.abs(remaining)) {
        dt = remaining;
        final = true;
      }
      if (dt !== this.dt && this.dtLastSuccess !== 0) {
        // Step shortened by the cap or the target: rescale the predicted polynomial to the actual step.
        this.predictNextStep(dt / this.dtLastSuccess, this.e2, this.br);
      }
      if (Math.abs(dt) < this.minStep && !final) {
        throw new StepCollapseError(`integrator step collapsed to ${dt} d at tdbDays ${tStart}`);
      }
      // g from the predicted b (g_m = sum_{j>=m} D[m][j] b_j).
      for (let q = 0, end = 7 * n3; q < end; q += 7) {
        const b0 = b[q], b1 = b[q + 1], b2 = b[q + 2], b3 = b[q + 3], b4 = b[q + 4], b5 = b[q + 5], b6 = b[q + 6];
        g[q] = b0 + DF[1] * b1 + DF[2] * b2 + DF[3] * b3 + DF[4] * b4 + DF[5] * b5 + DF[6] * b6;
        g[q + 1] = b1 + DF[9] * b2 + DF[10] * b3 + DF[11] * b4 + DF[12] * b5 + DF[13] * b6;
        g[q + 2] = b2 + DF[17] * b3 + DF[18] * b4 + DF[19] * b5 + DF[20] * b6;
        g[q + 3] = b3 + DF[25] * b4 + DF[26] * b5 + DF[27] * b6;
        g[q + 4] = b4 + DF[33] * b5 + DF[34] * b6;
        g[q + 5] = b5 + DF[41] * b6;
        g[q + 6] = b6;
      }
      // Predictor–corrector iterations.
      let pcError = 1e300;
      let pcErrorLast = 2;
      let iterations = 0;
      for (;;) {
        if (fixed > 0) {
          if (iterations >= fixed) break;
        } else {
          if (pcError < 1e-16) break;
          if (iterations > 2 && pcErrorLast <= pcError) break;
          if (iterations >= 12) break;
        }
        pcErrorLast = pcError;
        iterations++;
        this.predict(1, dt);
        for (let n = 1; n < 8; n++) {
          this.force.accelerations(tStart + RADAU_NODES[n] * dt, this.xs, this.vs, this.at);
          const r = this.correct(n, fixed === 0, dt);
          if (n === 7) pcError = r;
        }
      }

      // New step size: Pham, Rein & Spiegel (2024) criterion, as in REBOUND's IAS15 ("PRS23").
      let minTimescale2 = Infinity;
      for (let o = 0; o < this.controlN3; o += 3) {
        let y2 = 0, y3 = 0, y4 = 0;
        for (let k = o; k < o + 3; k++) {
          const q = 7 * k;
          const b0 = b[q], b1 = b[q + 1], b2 = b[q + 2], b3 = b[q + 3], b4 = b[q + 4], b5 = b[q + 5], b6 = b[q + 6];
          const aEnd = a[k] + b0 + b1 + b2 + b3 + b4 + b5 + b6;
          y2 += aEnd * aEnd;
          const j1 = b0 + 2 * b1 + 3 * b2 + 4 * b3 + 5 * b4 + 6 * b5 + 7 * b6;
          y3 += j1 * j1;
          const j2 = 2 * b1 + 6 * b2 + 12 * b3 + 20 * b4 + 30 * b5 + 42 * b6;
          y4 += j2 * j2;
        }
        if (!(y2 > 0) || !isFinite(y2)) continue;
        const ts2 = (2 * y2) / (y3 + Math.sqrt(y4 * y2));
        if (ts2 < minTimescale2) minTimescale2 = ts2;
      }
      let dtNew: number;
      if (isFinite(minTimescale2) && minTimescale2 > 0) {
        dtNew = Math.sqrt(minTimescale2) * dt * Math.pow(this.epsilon * 5040, 1 / 7);
      } else {
        dtNew = dt / SAFETY;
      }
      if (!isFinite(dtNew)) dtNew = dt / SAFETY;

      if (Math.abs(dtNew / dt) < SAFETY) {
        // Reject: retry from the same state with the smaller step.
        this.rejected++;
        this.dt = dtNew;
        if (this.dtLastSuccess !== 0) this.predictNextStep(dtNew / this.dtLastSuccess, this.e2, this.br);
        else b.fill(0);
        continue;
      }
      if (Math.abs(dtNew / dt) > 1 / SAFETY) dtNew = dt / SAFETY;

      // Accept: keep the step for dense output, then advance with compensated sums.
      this.dx0.set(x); this.dv0.set(v); this.da0.set(a);
      this.br.set(b);
      this.dStartOffset = this.offset;
      this.dDt = dt;
      this.hasStep = true;

      const csx = this.csx, csv = this.csv;
      const dt2 = dt * dt;
      const xf0 = XF[0], xf1 = XF[1], xf2 = XF[2], xf3 = XF[3], xf4 = XF[4], xf5 = XF[5], xf6 = XF[6];
      const vf0 = VF[0], vf1 = VF[1], vf2 = VF[2], vf3 = VF[3], vf4 = VF[4], vf5 = VF[5], vf6 = VF[6];
      for (let k = 0, q = 0; k < n3; k++, q += 7) {
        const b0 = b[q], b1 = b[q + 1], b2 = b[q + 2], b3 = b[q + 3], b4 = b[q + 4], b5 = b[q + 5], b6 = b[q + 6];
        const ak = a[k];
        const dxk = dt * v[k] + dt2 * (0.5 * ak + b0 * xf0 + b1 * xf1 + b2 * xf2 + b3 * xf3 + b4 * xf4 + b5 * xf5 + b6 * xf6);
        let y = dxk - csx[k];
        let t = x[k] + y;
        csx[k] = t - x[k] - y;
        x[k] = t;
        const dvk = dt * (ak + b0 * vf0 + b1 * vf1 + b2 * vf2 + b3 * vf3 + b4 * vf4 + b5 * vf5 + b6 * vf6);
        y = dvk - csv[k];
        t = v[k] + y;
        csv[k] = t - v[k] - y;
        v[k] = t;
      }
      if (final) {
        this.offset = targetTdbDays - this.epoch;
        this.offsetComp = 0;
      } else {
        const y = dt - this.offsetComp;
        const t = this.offset + y;
        this.offsetComp = t - this.offset - y;
        this.offset = t;
      }
      this.aValid = false;
      this.steps++;
      this.dtLastSuccess = dt;
      // e of this step becomes the "old" e (swap, no copy); br already holds b.
      const eAccepted = this.e;
      this.e = this.e2;
      this.e2 = eAccepted;
      // When the step was shortened (target or cap), keep the controller's natural step for the next one.
      this.dt = dtNew;
      this.predictNextStep(dtNew / dt, this.e2, this.br);
      return final;
    }
  }

  /** Shift the acceleration polynomial to the next step (IAS15 predict_next_step), from (eOld, bOld) into (e, b). */
  private predictNextStep(ratio: number, eOld: Float64Array, bOld: Float64Array): void {
    const e = this.e, b = this.b;
    if (!(Math.abs(ratio) <= 20)) {
      e.fill(0);
      b.fill(0);
      return;
    }
    const q1 = ratio, q2 = q1 * q1, q3 = q1 * q2, q4 = q2 * q2, q5 = q2 * q3, q6 = q3 * q3, q7 = q3 * q4;
    for (let q = 0, end = 7 * this.n3; q < end; q += 7) {
      const p0 = bOld[q], p1 = bOld[q + 1], p2 = bOld[q + 2], p3 = bOld[q + 3], p4 = bOld[q + 4], p5 = bOld[q + 5], p6 = bOld[q + 6];
      const be0 = p0 - eOld[q], be1 = p1 - eOld[q + 1], be2 = p2 - eOld[q + 2], be3 = p3 - eOld[q + 3];
      const be4 = p4 - eOld[q + 4], be5 = p5 - eOld[q + 5], be6 = p6 - eOld[q + 6];
      const e0 = q1 * (p6 * 7 + p5 * 6 + p4 * 5 + p3 * 4 + p2 * 3 + p1 * 2 + p0);
      const e1 = q2 * (p6 * 21 + p5 * 15 + p4 * 10 + p3 * 6 + p2 * 3 + p1);
      const e2 = q3 * (p6 * 35 + p5 * 20 + p4 * 10 + p3 * 4 + p2);
      const e3 = q4 * (p6 * 35 + p5 * 15 + p4 * 5 + p3);
      const e4 = q5 * (p6 * 21 + p5 * 6 + p4);
      const e5 = q6 * (p6 * 7 + p5);
      const e6 = q7 * p6;
      e[q] = e0; e[q + 1] = e1; e[q + 2] = e2; e[q + 3] = e3; e[q + 4] = e4; e[q + 5] = e5; e[q + 6] = e6;
      b[q] = e0 + be0; b[q + 1] = e1 + be1; b[q + 2] = e2 + be2; b[q + 3] = e3 + be3;
      b[q + 4] = e4 + be4; b[q + 5] = e5 + be5; b[q + 6] = e6 + be6;
    }
  }

  /**
   * Dense output inside the last accepted step: state of particle `particle` at tdbDays into out[0..5]
   * (x, y, z, vx, vy, vz). Uses the converged acceleration polynomial of that step.
   */
  stateAt(tdbDays: number, out: Float64Array, particle = 0): void {
    if (!this.hasStep) throw new Error('dense output requested before the first step');
    const dt = this.dDt;
    const s = (tdbDays - this.epoch - this.dStartOffset) / dt;
    const sdt = s * dt;
    const sdt2 = sdt * sdt;
    const s2 = s * s, s3 = s2 * s, s4 = s2 * s2, s5 = s4 * s, s6 = s3 * s3, s7 = s6 * s;
    const b = this.br;
    for (let c = 0; c < 3; c++) {
      const k = 3 * particle + c;
      const q = 7 * k;
      const b0 = b[q] * s, b1 = b[q + 1] * s2, b2 = b[q + 2] * s3, b3 = b[q + 3] * s4, b4 = b[q + 4] * s5, b5 = b[q + 5] * s6, b6 = b[q + 6] * s7;
      const ak = this.da0[k];
      out[c] = this.dx0[k] + sdt * this.dv0[k] +
        sdt2 * (0.5 * ak + b0 * XF[0] + b1 * XF[1] + b2 * XF[2] + b3 * XF[3] + b4 * XF[4] + b5 * XF[5] + b6 * XF[6]);
      out[3 + c] = this.dv0[k] + sdt * (ak + b0 * VF[0] + b1 * VF[1] + b2 * VF[2] + b3 * VF[3] + b4 * VF[4] + b5 * VF[5] + b6 * VF[6]);
    }
  }
}

/** Exposed for tests: the b<->g conversion matrices. */
export const _radauMatrices = { C, D, RR };
