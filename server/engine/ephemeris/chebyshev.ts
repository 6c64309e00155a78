/**
 * Chebyshev cache of the series ephemeris (series.ts) over a requested span: per body, the span is cut into
 * granules of fixed length; in each granule x, y, z are Chebyshev series of fixed degree, fitted by
 * interpolation at the Chebyshev–Gauss nodes (Press et al. 2007, Numerical Recipes §5.8). Velocities are the
 * analytic derivative of the polynomials. All coefficients live in one Float64Array.
 *
 * The Moon is cached geocentric (ELP/MPP02 + tie) and added to the cached Earth on evaluation, so the heliocentric
 * Moon costs three additions and the Earth series is never evaluated twice.
 *
 * Granule lengths and degrees: METHODS.md §4.5 gives sizes measured to reach 1 m; the table below was checked
 * again by tests/unit/engine-ephemeris.test.ts (cache vs series) and tests/bench/ephemeris.ts.
 */
import { EPHEMERIS_BODIES, EARTH_INDEX, MOON_INDEX } from './bodies';
import { moonGeocentricStateInto } from './series';
import { vsop87SampleInto } from './vsop87';
import { applyTieInPlace, FRAME_TIE_FIT, VSOP87_TO_FK5 } from './frame-tie';
import { ELP_DATA_NAME } from './elpmpp02';
import { FRAME_TIE_DESCRIPTION } from './frame-tie';

/** Granule length (days) and polynomial degree per body, in EPHEMERIS_BODIES order; the Moon entry is geocentric. */
export const GRANULES: readonly { granuleDays: number; degree: number }[] = Object.freeze([
  { granuleDays: 8, degree: 12 }, // mercury (measured max 0.3 m)
  { granuleDays: 16, degree: 8 }, // venus (0.15 m)
  { granuleDays: 8, degree: 10 }, // earth (0.10 m; 16 d/12 gives 3.9 m)
  { granuleDays: 8, degree: 13 }, // moon, geocentric (0.06 m; 8 d/12 gives 0.3 m)
  { granuleDays: 16, degree: 8 }, // mars (0.16 m)
  { granuleDays: 16, degree: 8 }, // jupiter (0.07 m; 32 d/8 gives 1.4 m)
  { granuleDays: 16, degree: 8 }, // saturn (0.07 m; 32 d/8 gives 22 m)
  { granuleDays: 16, degree: 8 }, // uranus (0.10 m; 32 d/8 gives 5.5 m)
  { granuleDays: 8, degree: 8 }, // neptune (0.14 m; 16 d/8 gives 2.5 m: VSOP87 Neptune has short-period terms)
]);

const NBODY = 9;

export class ChebyshevEphemeris {
  readonly startTdbDays: number;
  readonly endTdbDays: number;
  /** all coefficients; body i starts at offset[i], granule g at offset[i] + g·3·(deg+1) */
  private readonly coeffs: Float64Array;
  private readonly offset: Int32Array;
  private readonly degree: Int32Array;
  private readonly nGranules: Int32Array;
  private readonly granuleDays: Float64Array;
  private readonly invGranuleDays: Float64Array;
  private readonly scratch: Float64Array;
  /** wall time of the build, ms */
  readonly buildMs: number;

  private constructor(start: number, end: number) {
    this.startTdbDays = start;
    this.endTdbDays = end;
    this.offset = new Int32Array(NBODY + 1);
    this.degree = new Int32Array(NBODY);
    this.nGranules = new Int32Array(NBODY);
    this.granuleDays = new Float64Array(NBODY);
    this.invGranuleDays = new Float64Array(NBODY);
    let total = 0;
    for (let i = 0; i < NBODY; i++) {
      const { granuleDays, degree } = GRANULES[i];
      const n = Math.max(1, Math.ceil((end - start) / granuleDays));
      this.offset[i] = total;
      this.degree[i] = degree;
      this.nGranules[i] = n;
      this.granuleDays[i] = granuleDays;
      this.invGranuleDays[i] = 1 / granuleDays;
      total += n * 3 * (degree + 1);
    }
    this.offset[NBODY] = total;
    this.coeffs = new Float64Array(total);
    this.scratch = new Float64Array(64);
    const t0 = performance.now();
    for (let i = 0; i < NBODY; i++) this.fitBody(i);
    this.buildMs = performance.now() - t0;
  }

  /** Builds the cache over [startTdbDays, endTdbDays] (TDB days since J2000.0). Cost ≈ 0.2–0.3 s of CPU per simulated year. */
  static build(startTdbDays: number, endTdbDays: number): ChebyshevEphemeris {
    if (!Number.isFinite(startTdbDays) || !Number.isFinite(endTdbDays) || !(endTdbDays > startTdbDays)) {
      throw new RangeError(`ChebyshevEphemeris.build needs finite start < end, got ${startTdbDays}, ${endTdbDays}`);
    }
    return new ChebyshevEphemeris(startTdbDays, endTdbDays);
  }

  private fitBody(i: number): void {
    const N = this.degree[i];
    const n = N + 1;
    const G = this.granuleDays[i];
    const state = new Float64Array(6);
    const values = new Float64Array(3 * n);
    // cos(π j (k + ½) / n) table
    const cosTab = new Float64Array(n * n);
    for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) cosTab[j * n + k] = Math.cos((Math.PI * j * (k + 0.5)) / n);
    const body = EPHEMERIS_BODIES[i];
    const offsets = new Float64Array(n); // node times relative to the granule centre
    for (let k = 0; k < n; k++) offsets[k] = 0.5 * G * Math.cos((Math.PI * (k + 0.5)) / n);
    const key = `${G}/${n}`;
    const samples = new Float64Array(3 * n);
    for (let g = 0; g < this.nGranules[i]; g++) {
      const tCenter = this.startTdbDays + (g + 0.5) * G;
      if (body !== 'moon') vsop87SampleInto(body, tCenter, offsets, key, samples);
      for (let k = 0; k < n; k++) {
        const t = tCenter + offsets[k];
        if (body === 'moon') {
          moonGeocentricStateInto(t, state, false);
        } else {
          // same as seriesPositionInto(body, t): VSOP87 position sampled for all nodes at once, then the tie
          state[0] = samples[3 * k];
          state[1] = samples[3 * k + 1];
          state[2] = samples[3 * k + 2];
          state[3] = 0;
          state[4] = 0;
          state[5] = 0;
          applyTieInPlace(state, VSOP87_TO_FK5, FRAME_TIE_FIT[body], t);
        }
        values[k] = state[0];
        values[n + k] = state[1];
        values[2 * n + k] = state[2];
      }
      const base = this.offset[i] + g * 3 * n;
      for (let c = 0; c < 3; c++) {
        for (let j = 0; j < n; j++) {
          let s = 0;
          for (let k = 0; k < n; k++) s += values[c * n + k] * cosTab[j * n + k];
          this.coeffs[base + c * n + j] = ((j === 0 ? 1 : 2) / n) * s;
        }
      }
    }
  }

  private locate(i: number, tdbDays: number): number {
    if (!(tdbDays >= this.startTdbDays - 1e-9 && tdbDays <= this.endTdbDays + 1e-9)) {
      throw new RangeError(
        `tdbDays ${tdbDays} outside the Chebyshev ephemeris span [${this.startTdbDays}, ${this.endTdbDays}]`,
      );
    }
    let g = Math.floor((tdbDays - this.startTdbDays) * this.invGranuleDays[i]);
    if (g < 0) g = 0;
    else if (g >= this.nGranules[i]) g = this.nGranules[i] - 1;
    return g;
  }

  /**
   * Heliocentric ICRF positions (AU) of all nine bodies in EPHEMERIS_BODIES order: out[3i + k].
   * `out` must have length ≥ 27.
   */
  positionsInto(tdbDays: number, out: Float64Array): void {
    if (!(tdbDays >= this.startTdbDays - 1e-9 && tdbDays <= this.endTdbDays + 1e-9)) {
      throw new RangeError(
        `tdbDays ${tdbDays} outside the Chebyshev ephemeris span [${this.startTdbDays}, ${this.endTdbDays}]`,
      );
    }
    const c = this.coeffs;
    const dt = tdbDays - this.startTdbDays;
    for (let i = 0; i < NBODY; i++) {
      const inv = this.invGranuleDays[i];
      let g = Math.floor(dt * inv);
      const ng = this.nGranules[i];
      if (g >= ng) g = ng - 1;
      else if (g < 0) g = 0;
      const x = 2 * (dt * inv - g) - 1;
      const x2 = 2 * x;
      const n = this.degree[i] + 1;
      const bx = this.offset[i] + g * 3 * n;
      const by = bx + n;
      const bz = by + n;
      // Clenshaw, three coordinates at once
      let b1x = 0, b2x = 0, b1y = 0, b2y = 0, b1z = 0, b2z = 0;
      for (let j = n - 1; j >= 1; j--) {
        const tx = x2 * b1x - b2x + c[bx + j];
        b2x = b1x;
        b1x = tx;
        const ty = x2 * b1y - b2y + c[by + j];
        b2y = b1y;
        b1y = ty;
        const tz = x2 * b1z - b2z + c[bz + j];
        b2z = b1z;
        b1z = tz;
      }
      out[3 * i] = x * b1x - b2x + c[bx];
      out[3 * i + 1] = x * b1y - b2y + c[by];
      out[3 * i + 2] = x * b1z - b2z + c[bz];
    }
    // Moon: cached geocentric, add the Earth
    out[3 * MOON_INDEX] += out[3 * EARTH_INDEX];
    out[3 * MOON_INDEX + 1] += out[3 * EARTH_INDEX + 1];
    out[3 * MOON_INDEX + 2] += out[3 * EARTH_INDEX + 2];
  }

  /** Evaluates one cached series (geocentric for the Moon): position and velocity into out[o..o+5]. */
  private evalState(i: number, tdbDays: number, out: Float64Array, o: number): void {
    const g = this.locate(i, tdbDays);
    const G = this.granuleDays[i];
    const x = (2 * (tdbDays - this.startTdbDays - g * G)) / G - 1;
    const n = this.degree[i] + 1;
    const T = this.scratch; // T_j(x) in [0, n), T'_j(x) in [32, 32 + n)
    T[0] = 1;
    T[1] = x;
    T[32] = 0;
    T[33] = 1;
    for (let j = 2; j < n; j++) {
      T[j] = 2 * x * T[j - 1] - T[j - 2];
      T[32 + j] = 2 * T[j - 1] + 2 * x * T[32 + j - 1] - T[32 + j - 2];
    }
    const c = this.coeffs;
    const dxdt = 2 / G;
    for (let k = 0; k < 3; k++) {
      const b = this.offset[i] + g * 3 * n + k * n;
      let p = 0;
      let v = 0;
      for (let j = 0; j < n; j++) {
        p += c[b + j] * T[j];
        v += c[b + j] * T[32 + j];
      }
      out[o + k] = p;
      out[o + 3 + k] = v * dxdt;
    }
  }

  /** Heliocentric ICRF state of body `bodyIndex` (EPHEMERIS_BODIES order): out[0..2] AU, out[3..5] AU/day. */
  stateInto(bodyIndex: number, tdbDays: number, out: Float64Array): void {
    if (!(bodyIndex >= 0 && bodyIndex < NBODY && Number.isInteger(bodyIndex))) {
      throw new RangeError(`bodyIndex must be an integer in 0..8, got ${bodyIndex}`);
    }
    this.evalState(bodyIndex, tdbDays, out, 0);
    if (bodyIndex === MOON_INDEX) {
      const e = this.scratch.subarray(48, 54);
      this.evalState(EARTH_INDEX, tdbDays, e, 0);
      for (let k = 0; k < 6; k++) out[k] += e[k];
    }
  }

  /** Geocentric ICRF state of the Moon (AU, AU/day) into out[0..5]. */
  moonGeocentricStateInto(tdbDays: number, out: Float64Array): void {
    this.evalState(MOON_INDEX, tdbDays, out, 0);
  }

  /** Bytes of coefficient storage. */
  get byteLength(): number {
    return this.coeffs.byteLength;
  }

  provenance(): { ephemeris: string; frameTie: string; spanTdbJd: [number, number] } {
    return {
      ephemeris:
        `astronomia 4.2.0: VSOP87B full series (Bretagnon & Francou 1988) for Mercury-Neptune and the Earth; ` +
        `ELP/MPP02 (${ELP_DATA_NAME}, Chapront & Francou 2003) for the Moon; Chebyshev cache, granules ` +
        EPHEMERIS_BODIES.map((b, i) => `${b} ${GRANULES[i].granuleDays} d/deg ${GRANULES[i].degree}`).join(', '),
      frameTie: FRAME_TIE_DESCRIPTION,
      spanTdbJd: [2451545.0 + this.startTdbDays, 2451545.0 + this.endTdbDays],
    };
  }
}

