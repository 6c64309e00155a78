/**
 * Force models for test particles (pure apart from an evaluation counter and scratch buffers).
 *
 * Heliocentric restricted N-body equations of motion with the indirect term (METHODS.md §4.1;
 * Murray & Dermott 1999):
 *   r'' = -mu_S r/r^3 + sum_j mu_j [ (r_j - r)/|r_j - r|^3 - r_j/r_j^3 ] + a_GR + a_NG
 * with j over Mercury..Neptune (system GMs), Earth and Moon separately (DE440 GMs, constants.ts).
 * a_GR: Sun's 1PN term, PPN beta = gamma = 1 (METHODS.md §4.2; Montenbruck & Gill 2000 eq. 3.146):
 *   a_GR = mu_S/(c^2 r^3) [ (4 mu_S/r - v^2) r + 4 (r.v) v ].
 * a_NG: Marsden–Sekanina–Yeomans (nongrav.ts).
 */
import { C_AU_D, GM_AU3_D2 } from '../constants';
import { addNonGravInto } from './nongrav';
import { DYNAMICS_BODIES, type ForceModel, type NonGravParams, type PlanetEphemeris } from './types';

const MU_SUN = GM_AU3_D2.sun;
const C2 = C_AU_D * C_AU_D;

/** GM (AU^3/d^2) of the perturbing bodies in ephemeris order. */
export const PERTURBER_GM_AU3_D2: Float64Array = Float64Array.from(DYNAMICS_BODIES.map((b) => GM_AU3_D2[b]));

/** Sun point mass only (pure Kepler problem), N particles. */
export class TwoBodyForce implements ForceModel {
  evaluations = 0;
  constructor(readonly mu: number = MU_SUN) {}
  accelerations(_t: number, x: Float64Array, _v: Float64Array, out: Float64Array): void {
    this.evaluations++;
    const mu = this.mu;
    for (let o = 0; o < x.length; o += 3) {
      const rx = x[o], ry = x[o + 1], rz = x[o + 2];
      const r2 = rx * rx + ry * ry + rz * rz;
      const f = -mu / (r2 * Math.sqrt(r2));
      out[o] = f * rx;
      out[o + 1] = f * ry;
      out[o + 2] = f * rz;
    }
  }
  maxStepDays(): number {
    return Infinity;
  }
}

export type NBodyOptions = {
  /** Include the Sun's 1PN relativistic term (default true). */
  relativity?: boolean;
  /** Non-grav parameters, one set for all particles, or per particle (a1,a2,a3 per particle in a Float64Array(3N)). */
  nonGrav?: NonGravParams | { law: NonGravParams['law']; perParticle: Float64Array } | null;
  /** Encounter step cap h <= rho/(k v_rel) inside capRadiusAu of any body (METHODS.md §4.4). Default k = 10. */
  encounterStepFactor?: number;
  /** Default 0.05 AU (METHODS.md §4.4). */
  capRadiusAu?: number;
};

export class NBodyForce implements ForceModel {
  evaluations = 0;
  readonly relativity: boolean;
  private readonly pos = new Float64Array(27);
  /** Indirect term sum_j mu_j r_j / r_j^3 (same for every particle). */
  private readonly indirect = new Float64Array(3);
  private lastT = NaN;
  private readonly law: NonGravParams['law'] | null;
  private readonly ngSingle: Float64Array | null;
  private readonly ngPer: Float64Array | null;
  private readonly k: number;
  private readonly capR: number;
  private readonly st = new Float64Array(6);

  constructor(
    readonly ephemeris: PlanetEphemeris,
    opts: NBodyOptions = {},
  ) {
    this.relativity = opts.relativity ?? true;
    const ng = opts.nonGrav ?? null;
    if (ng === null) {
      this.law = null;
      this.ngSingle = null;
      this.ngPer = null;
    } else if ('perParticle' in ng) {
      this.law = ng.law;
      this.ngSingle = null;
      this.ngPer = ng.perParticle;
    } else {
      this.law = ng.law;
      this.ngSingle = Float64Array.of(ng.a1, ng.a2, ng.a3);
      this.ngPer = null;
      if (ng.a1 === 0 && ng.a2 === 0 && ng.a3 === 0) this.law = null;
    }
    this.k = opts.encounterStepFactor ?? 10;
    this.capR = opts.capRadiusAu ?? 0.05;
  }

  /** Planet positions at t (cached for repeated calls at the same t). */
  planetPositions(t: number): Float64Array {
    if (t !== this.lastT) {
      this.ephemeris.positionsInto(t, this.pos);
      const p = this.pos;
      let ix = 0, iy = 0, iz = 0;
      for (let j = 0; j < 9; j++) {
        const x = p[3 * j], y = p[3 * j + 1], z = p[3 * j + 2];
        const r2 = x * x + y * y + z * z;
        const f = PERTURBER_GM_AU3_D2[j] / (r2 * Math.sqrt(r2));
        ix += f * x; iy += f * y; iz += f * z;
      }
      this.indirect[0] = ix; this.indirect[1] = iy; this.indirect[2] = iz;
      this.lastT = t;
    }
    return this.pos;
  }

  accelerations(t: number, x: Float64Array, v: Float64Array, out: Float64Array): void {
    this.evaluations++;
    const p = this.planetPositions(t);
    const ind = this.indirect;
    const gm = PERTURBER_GM_AU3_D2;
    const n = x.length / 3;
    for (let i = 0; i < n; i++) {
      const o = 3 * i;
      const rx = x[o], ry = x[o + 1], rz = x[o + 2];
      const r2 = rx * rx + ry * ry + rz * rz;
      const r = Math.sqrt(r2);
      const fs = -MU_SUN / (r2 * r);
      let ax = fs * rx - ind[0], ay = fs * ry - ind[1], az = fs * rz - ind[2];
      for (let j = 0; j < 9; j++) {
        const dx = p[3 * j] - rx, dy = p[3 * j + 1] - ry, dz = p[3 * j + 2] - rz;
        const d2 = dx * dx + dy * dy + dz * dz;
        const f = gm[j] / (d2 * Math.sqrt(d2));
        ax += f * dx; ay += f * dy; az += f * dz;
      }
      if (this.relativity) {
        const vx = v[o], vy = v[o + 1], vz = v[o + 2];
        const v2 = vx * vx + vy * vy + vz * vz;
        const rv = rx * vx + ry * vy + rz * vz;
        const f = MU_SUN / (C2 * r2 * r);
        const cr = 4 * MU_SUN / r - v2;
        ax += f * (cr * rx + 4 * rv * vx);
        ay += f * (cr * ry + 4 * rv * vy);
        az += f * (cr * rz + 4 * rv * vz);
      }
      out[o] = ax; out[o + 1] = ay; out[o + 2] = az;
      if (this.law !== null) {
        const a = this.ngPer ?? this.ngSingle!;
        const ao = this.ngPer ? o : 0;
        addNonGravInto(this.law, a[ao], a[ao + 1], a[ao + 2], x, v, i, out);
      }
    }
  }

  maxStepDays(t: number, x: Float64Array, v: Float64Array): number {
    const p = this.planetPositions(t);
    const capR2 = this.capR * this.capR;
    let cap = Infinity;
    const n = x.length / 3;
    for (let j = 0; j < 9; j++) {
      let loaded = false;
      for (let i = 0; i < n; i++) {
        const o = 3 * i;
        const dx = x[o] - p[3 * j], dy = x[o + 1] - p[3 * j + 1], dz = x[o + 2] - p[3 * j + 2];
        const d2 = dx * dx + dy * dy + dz * dz;
        if (d2 >= capR2) continue;
        if (!loaded) {
          this.ephemeris.stateInto(j, t, this.st);
          loaded = true;
        }
        const ux = v[o] - this.st[3], uy = v[o + 1] - this.st[4], uz = v[o + 2] - this.st[5];
        const vrel = Math.sqrt(ux * ux + uy * uy + uz * uz);
        const h = Math.sqrt(d2) / (this.k * vrel);
        if (h < cap) cap = h;
      }
    }
    return cap;
  }
}
