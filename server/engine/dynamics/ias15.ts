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
  private readonly b: Float64Array[];
  private readonly g: Float64Array[];
  private readonly e: Float64Array[];
  private readonly br: Float64Array[];
  private readonly er: Float64Array[];
  private readonly xs: Float64Array;
  private readonly vs: Float64Array;
  private readonly at: Float64Array;
  private readonly x0: Float64Array;
  private readonly v0: Float64Array;
  // Last accepted step, for dense output.
  private readonly dx0: Float64Array;
  private readonly dv0: Float64Array;
  private readonly da0: Float64Array;
  private readonly db: Float64Array[];
  private dStartOffset = 0;
  private dDt = 0;
  private hasStep = false;

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
    const mk7 = () => Array.from({ length: 7 }, mk);
    this.x = mk(); this.v = mk(); this.a = mk(); this.csx = mk(); this.csv = mk();
    this.b = mk7(); this.g = mk7(); this.e = mk7(); this.br = mk7(); this.er = mk7(); this.db = mk7();
    this.xs = mk(); this.vs = mk(); this.at = mk(); this.x0 = mk(); this.v0 = mk();
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
    for (let j = 0; j < 7; j++) {
      this.b[j].fill(0); this.g[j].fill(0); this.e[j].fill(0); this.br[j].fill(0); this.er[j].fill(0);
    }
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
      for (let j = 0; j < 7; j++) {
        this.b[j][k] = 0; this.g[j][k] = 0; this.e[j][k] = 0; this.br[j][k] = 0; this.er[j][k] = 0;
      }
    }
    this.aValid = false;
  }

  /** Current time, tdbDays. */
  get tdbDays(): number {
    return this.epoch + this.offset;
  }

  /** Last accepted step: [start, end] in tdbDays. */
  get lastStep(): { t0: number; t1: number } {
    const t0 = this.epoch + this.dStartOffset;
    return { t0, t1: t0 + this.dDt };
  }

  /** The trial size of the next step (signed days). */
  get nextStepDays(): number {
    return this.dt;
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
    const x = this.x, v = this.v, a = this.a, b = this.b, g = this.g, e = this.e;
    const xs = this.xs, vs = this.vs, at = this.at;
    const tStart = this.epoch + this.offset;
    if (!this.aValid) {
      this.force.accelerations(tStart, x, v, a);
      this.aValid = true;
    }
    const cap = this.force.maxStepDays(tStart, x, v);

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
        this.predictNextStep(dt / this.dtLastSuccess, this.er, this.br);
      }
      if (Math.abs(dt) < this.minStep && !final) {
        throw new StepCollapseError(`integrator step collapsed to ${dt} d at tdbDays ${tStart}`);
      }
      for (let k = 0; k < n3; k++) {
        this.x0[k] = x[k];
        this.v0[k] = v[k];
      }
      // g from the predicted b.
      for (let m = 0; m < 7; m++) {
        const gm = g[m];
        for (let k = 0; k < n3; k++) {
          let s = 0;
          for (let j = m; j < 7; j++) s += D[m][j] * b[j][k];
          gm[k] = s;
        }
      }
      // Predictor–corrector iterations.
      let pcError = 1e300;
      let pcErrorLast = 2;
      let iterations = 0;
      const b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3], b4 = b[4], b5 = b[5], b6 = b[6];
      for (;;) {
        if (this.fixedIterations > 0) {
          if (iterations >= this.fixedIterations) break;
        } else {
          if (pcError < 1e-16) break;
          if (iterations > 2 && pcErrorLast <= pcError) break;
          if (iterations >= 12) break;
        }
        pcErrorLast = pcError;
        iterations++;
        for (let n = 1; n < 8; n++) {
          const s = RADAU_NODES[n];
          const sdt = s * dt;
          for (let k = 0; k < n3; k++) {
            const poly =
              a[k] / 2 +
              s * (b0[k] / 6 + s * (b1[k] / 12 + s * (b2[k] / 20 + s * (b3[k] / 30 + s * (b4[k] / 42 + s * (b5[k] / 56 + s * (b6[k] / 72)))))));
            xs[k] = x[k] + sdt * v[k] + sdt * sdt * poly;
            const vpoly =
              a[k] +
              s * (b0[k] / 2 + s * (b1[k] / 3 + s * (b2[k] / 4 + s * (b3[k] / 5 + s * (b4[k] / 6 + s * (b5[k] / 7 + s * (b6[k] / 8)))))));
            vs[k] = v[k] + sdt * vpoly;
          }
          this.force.accelerations(tStart + sdt, xs, vs, at);
          const m = n - 1;
          const rr = RR[n];
          const gm = g[m];
          let maxDelta = 0, maxA = 0;
          for (let k = 0; k < n3; k++) {
            let q = (at[k] - a[k]) / rr[0];
            for (let i = 1; i <= m; i++) q = (q - g[i - 1][k]) / rr[i];
            const delta = q - gm[k];
            gm[k] = q;
            for (let j = 0; j < m; j++) b[j][k] += C[j][m] * delta;
            b[m][k] += delta;
            if (n === 7) {
              const ad = Math.abs(delta);
              if (ad > maxDelta) maxDelta = ad;
              const aa = Math.abs(at[k]);
              if (aa > maxA) maxA = aa;
            }
          }
          if (n === 7) pcError = maxA > 0 ? maxDelta / maxA : 0;
        }
      }

      // New step size: Pham, Rein & Spiegel (2024) criterion, as in REBOUND's IAS15 ("PRS23").
      let minTimescale2 = Infinity;
      for (let o = 0; o < this.controlN3; o += 3) {
        let y2 = 0, y3 = 0, y4 = 0;
        for (let k = o; k < o + 3; k++) {
          const aEnd = a[k] + b0[k] + b1[k] + b2[k] + b3[k] + b4[k] + b5[k] + b6[k];
          y2 += aEnd * aEnd;
          const j1 = b0[k] + 2 * b1[k] + 3 * b2[k] + 4 * b3[k] + 5 * b4[k] + 6 * b5[k] + 7 * b6[k];
          y3 += j1 * j1;
          const j2 = 2 * b1[k] + 6 * b2[k] + 12 * b3[k] + 20 * b4[k] + 30 * b5[k] + 42 * b6[k];
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
        if (this.dtLastSuccess !== 0) this.predictNextStep(dtNew / this.dtLastSuccess, this.er, this.br);
        else for (let j = 0; j < 7; j++) b[j].fill(0);
        continue;
      }
      if (Math.abs(dtNew / dt) > 1 / SAFETY) dtNew = dt / SAFETY;

      // Accept: keep the step for dense output, then advance with compensated sums.
      for (let k = 0; k < n3; k++) {
        this.dx0[k] = x[k]; this.dv0[k] = v[k]; this.da0[k] = a[k];
      }
      for (let j = 0; j < 7; j++) this.db[j].set(b[j]);
      this.dStartOffset = this.offset;
      this.dDt = dt;
      this.hasStep = true;

      const csx = this.csx, csv = this.csv;
      const dt2 = dt * dt;
      for (let k = 0; k < n3; k++) {
        const dxk =
          dt * v[k] +
          dt2 * (a[k] / 2 + b0[k] / 6 + b1[k] / 12 + b2[k] / 20 + b3[k] / 30 + b4[k] / 42 + b5[k] / 56 + b6[k] / 72);
        let y = dxk - csx[k];
        let t = x[k] + y;
        csx[k] = t - x[k] - y;
        x[k] = t;
        const dvk = dt * (a[k] + b0[k] / 2 + b1[k] / 3 + b2[k] / 4 + b3[k] / 5 + b4[k] / 6 + b5[k] / 7 + b6[k] / 8);
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
      for (let j = 0; j < 7; j++) {
        this.er[j].set(e[j]);
        this.br[j].set(b[j]);
      }
      // When the step was shortened (target or cap), keep the controller's natural step for the next one.
      this.dt = dtNew;
      this.predictNextStep(dtNew / dt, this.er, this.br);
      return final;
    }
  }

  /** Shift the acceleration polynomial to the next step (IAS15 predict_next_step), from (eOld, bOld) into (e, b). */
  private predictNextStep(ratio: number, eOld: Float64Array[], bOld: Float64Array[]): void {
    const e = this.e, b = this.b;
    if (!(Math.abs(ratio) <= 20)) {
      for (let j = 0; j < 7; j++) {
        e[j].fill(0);
        b[j].fill(0);
      }
      return;
    }
    const q1 = ratio, q2 = q1 * q1, q3 = q1 * q2, q4 = q2 * q2, q5 = q2 * q3, q6 = q3 * q3, q7 = q3 * q4;
    for (let k = 0; k < this.n3; k++) {
      const p0 = bOld[0][k], p1 = bOld[1][k], p2 = bOld[2][k], p3 = bOld[3][k], p4 = bOld[4][k], p5 = bOld[5][k], p6 = bOld[6][k];
      const be0 = p0 - eOld[0][k], be1 = p1 - eOld[1][k], be2 = p2 - eOld[2][k], be3 = p3 - eOld[3][k];
      const be4 = p4 - eOld[4][k], be5 = p5 - eOld[5][k], be6 = p6 - eOld[6][k];
      const e0 = q1 * (p6 * 7 + p5 * 6 + p4 * 5 + p3 * 4 + p2 * 3 + p1 * 2 + p0);
      const e1 = q2 * (p6 * 21 + p5 * 15 + p4 * 10 + p3 * 6 + p2 * 3 + p1);
      const e2 = q3 * (p6 * 35 + p5 * 20 + p4 * 10 + p3 * 4 + p2);
      const e3 = q4 * (p6 * 35 + p5 * 15 + p4 * 5 + p3);
      const e4 = q5 * (p6 * 21 + p5 * 6 + p4);
      const e5 = q6 * (p6 * 7 + p5);
      const e6 = q7 * p6;
      e[0][k] = e0; e[1][k] = e1; e[2][k] = e2; e[3][k] = e3; e[4][k] = e4; e[5][k] = e5; e[6][k] = e6;
      b[0][k] = e0 + be0; b[1][k] = e1 + be1; b[2][k] = e2 + be2; b[3][k] = e3 + be3;
      b[4][k] = e4 + be4; b[5][k] = e5 + be5; b[6][k] = e6 + be6;
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
    const b = this.db;
    for (let c = 0; c < 3; c++) {
      const k = 3 * particle + c;
      const poly =
        this.da0[k] / 2 +
        s * (b[0][k] / 6 + s * (b[1][k] / 12 + s * (b[2][k] / 20 + s * (b[3][k] / 30 + s * (b[4][k] / 42 + s * (b[5][k] / 56 + s * (b[6][k] / 72)))))));
      out[c] = this.dx0[k] + sdt * this.dv0[k] + sdt * sdt * poly;
      const vpoly =
        this.da0[k] +
        s * (b[0][k] / 2 + s * (b[1][k] / 3 + s * (b[2][k] / 4 + s * (b[3][k] / 5 + s * (b[4][k] / 6 + s * (b[5][k] / 7 + s * (b[6][k] / 8)))))));
      out[3 + c] = this.dv0[k] + sdt * vpoly;
    }
  }
}

/** Exposed for tests: the b<->g conversion matrices. */
export const _radauMatrices = { C, D, RR };
