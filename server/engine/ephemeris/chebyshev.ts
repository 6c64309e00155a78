/**
 * Chebyshev cache of the series ephemeris (series.ts) over a requested span: per body, time is cut into
 * granules of fixed length on a grid anchored at J2000 (granule g of a body covers [g·G, (g+1)·G) TDB days); in each
 * granule x, y, z are Chebyshev series of fixed degree, fitted by interpolation at the Chebyshev–Gauss nodes
 * (Press et al. 2007, Numerical Recipes §5.8). Velocities are the analytic derivative of the polynomials.
 * Each ephemeris holds its coefficients in one Float64Array.
 *
 * The Moon is cached geocentric (ELP/MPP02 + tie) and added to the cached Earth on evaluation, so the heliocentric
 * Moon costs three additions and the Earth series is never evaluated twice.
 *
 * Building: granules are fitted in chunks of CHUNK_GRANULES consecutive granules; the node positions of a chunk come
 * from the chunk samplers of vsop87.ts and elpmpp02.ts (series evaluated with per-term angle tables instead of one
 * sine per term and node; equal to the direct series to well under 1 mm, see those files and the unit test).
 * Process-wide granule memo: every fitted chunk is kept (keyed by body and chunk index on the J2000 grid), so
 * building an overlapping or repeated span reuses the overlap and only copies coefficients. Memory is bounded:
 * least recently used chunks are dropped beyond GRANULE_MEMO_DEFAULT_LIMIT_BYTES (64 MiB ≈ 800 simulated years of
 * all nine bodies, ~77 KiB per year); see ChebyshevEphemeris.setGranuleMemoLimitBytes / clearGranuleMemo.
 * Because the grid is anchored at J2000, the coefficients of a granule do not depend on the requested span.
 *
 * Granule lengths and degrees: METHODS.md §4.5 gives sizes measured to reach 1 m; the table below was checked
 * again by tests/unit/engine-ephemeris.test.ts (cache vs series) and tests/bench/ephemeris.ts.
 */
import { EPHEMERIS_BODIES, EARTH_INDEX, MOON_INDEX } from './bodies';
import { moonGeocentricStateInto } from './series';
import { vsop87ChunkPositionsInto, vsop87SampleInto, type Vsop87Planet } from './vsop87';
import { applyTieInPlace, ELP_ECLIPTIC_TO_EQUATORIAL, FRAME_TIE_FIT, VSOP87_TO_FK5 } from './frame-tie';
import { ELP_DATA_NAME, elpChunkPositionsKmInto } from './elpmpp02';
import { FRAME_TIE_DESCRIPTION } from './frame-tie';
import { AU_KM } from '../constants';

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

/** Granules per fitted chunk (the unit of the memo and of the samplers' reseeding). */
export const CHUNK_GRANULES = 16;
/** Default bound of the process-wide granule memo. */
export const GRANULE_MEMO_DEFAULT_LIMIT_BYTES = 64 * 1024 * 1024;

/** Per body: node offsets from the granule centre (days), the cos(π j (k + ½) / n) table and the table key. */
type BodyGeometry = { n: number; G: number; offsets: Float64Array; cosTab: Float64Array; key: string };
const GEOMETRY: BodyGeometry[] = GRANULES.map(({ granuleDays: G, degree }) => {
  const n = degree + 1;
  const offsets = new Float64Array(n);
  for (let k = 0; k < n; k++) offsets[k] = 0.5 * G * Math.cos((Math.PI * (k + 0.5)) / n);
  const cosTab = new Float64Array(n * n);
  for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) cosTab[j * n + k] = Math.cos((Math.PI * j * (k + 0.5)) / n);
  return { n, G, offsets, cosTab, key: `${G}/${n}` };
});

const sampleScratch = new Float64Array(CHUNK_GRANULES * 16 * 3);
const accScratch = new Float64Array(32 * CHUNK_GRANULES * 16);
const tieScratch = new Float64Array(6);

/**
 * Node positions (heliocentric ICRF AU; geocentric for the Moon) of the CHUNK_GRANULES granules of chunk `chunk`
 * of body `i`, out[3(g·n + k) + c], from the fast chunk samplers. Exported for tests and the benchmark.
 */
export function chunkNodePositionsInto(i: number, chunk: number, out: Float64Array): void {
  const { n, G, offsets, key } = GEOMETRY[i];
  const K = CHUNK_GRANULES;
  const centre0 = (chunk * K + 0.5) * G;
  const body = EPHEMERIS_BODIES[i];
  if (i === MOON_INDEX) elpChunkPositionsKmInto(centre0, G, K, offsets, key, out, accScratch);
  else vsop87ChunkPositionsInto(body as Vsop87Planet, centre0, G, K, offsets, key, out, accScratch);
  const st = tieScratch;
  for (let g = 0; g < K; g++) {
    for (let k = 0; k < n; k++) {
      const o = 3 * (g * n + k);
      const t = centre0 + g * G + offsets[k];
      st[3] = 0;
      st[4] = 0;
      st[5] = 0;
      if (i === MOON_INDEX) {
        st[0] = out[o] / AU_KM;
        st[1] = out[o + 1] / AU_KM;
        st[2] = out[o + 2] / AU_KM;
        applyTieInPlace(st, ELP_ECLIPTIC_TO_EQUATORIAL, FRAME_TIE_FIT.moon, t);
      } else {
        st[0] = out[o];
        st[1] = out[o + 1];
        st[2] = out[o + 2];
        applyTieInPlace(st, VSOP87_TO_FK5, FRAME_TIE_FIT[body as Vsop87Planet], t);
      }
      out[o] = st[0];
      out[o + 1] = st[1];
      out[o + 2] = st[2];
    }
  }
}

/**
 * The same node positions for one granule (global index g) by the previous method: the series evaluated at every
 * node (Moon: moonGeocentricStateInto; planets: vsop87SampleInto, one trigonometric pair per term and granule).
 * Reference for the equality test and the benchmark's "before" figures; out[3k + c].
 */
export function referenceNodePositionsInto(i: number, g: number, out: Float64Array): void {
  const { n, G, offsets, key } = GEOMETRY[i];
  const centre = (g + 0.5) * G;
  const body = EPHEMERIS_BODIES[i];
  const st = new Float64Array(6);
  if (i === MOON_INDEX) {
    for (let k = 0; k < n; k++) {
      moonGeocentricStateInto(centre + offsets[k], st, false);
      out[3 * k] = st[0];
      out[3 * k + 1] = st[1];
      out[3 * k + 2] = st[2];
    }
    return;
  }
  const samples = new Float64Array(3 * n);
  vsop87SampleInto(body as Vsop87Planet, centre, offsets, key, samples);
  for (let k = 0; k < n; k++) {
    st[0] = samples[3 * k];
    st[1] = samples[3 * k + 1];
    st[2] = samples[3 * k + 2];
    st[3] = 0;
    st[4] = 0;
    st[5] = 0;
    applyTieInPlace(st, VSOP87_TO_FK5, FRAME_TIE_FIT[body as Vsop87Planet], centre + offsets[k]);
    out[3 * k] = st[0];
    out[3 * k + 1] = st[1];
    out[3 * k + 2] = st[2];
  }
}

/** Chebyshev coefficients of `granules` granules from node positions values[3(g·n + k) + c]: out[g·3n + c·n + j]. */
export function fitGranulesInto(i: number, values: Float64Array, granules: number, out: Float64Array, outOffset: number): void {
  const { n, cosTab } = GEOMETRY[i];
  for (let g = 0; g < granules; g++) {
    const vb = 3 * g * n;
    const base = outOffset + g * 3 * n;
    for (let c = 0; c < 3; c++) {
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += values[vb + 3 * k + c] * cosTab[j * n + k];
        out[base + c * n + j] = ((j === 0 ? 1 : 2) / n) * s;
      }
    }
  }
}

/** Process-wide memo: key chunk·16 + body → coefficients of the chunk (CHUNK_GRANULES·3n). Map order = LRU order. */
const memo = new Map<number, Float64Array>();
let memoBytes = 0;
let memoLimitBytes = GRANULE_MEMO_DEFAULT_LIMIT_BYTES;
let memoHits = 0;
let memoMisses = 0;

function fitChunk(i: number, chunk: number): Float64Array {
  const { n } = GEOMETRY[i];
  const coeffs = new Float64Array(CHUNK_GRANULES * 3 * n);
  chunkNodePositionsInto(i, chunk, sampleScratch);
  fitGranulesInto(i, sampleScratch, CHUNK_GRANULES, coeffs, 0);
  return coeffs;
}

function chunkCoefficients(i: number, chunk: number, useMemo: boolean): Float64Array {
  if (!useMemo) return fitChunk(i, chunk);
  const key = chunk * 16 + i;
  const hit = memo.get(key);
  if (hit) {
    memoHits++;
    memo.delete(key); // move to the most recently used end
    memo.set(key, hit);
    return hit;
  }
  memoMisses++;
  const c = fitChunk(i, chunk);
  memo.set(key, c);
  memoBytes += c.byteLength;
  while (memoBytes > memoLimitBytes && memo.size > 0) {
    const [oldKey, old] = memo.entries().next().value as [number, Float64Array];
    memo.delete(oldKey);
    memoBytes -= old.byteLength;
  }
  return c;
}

/** Exported cache (ChebyshevEphemeris.exportShared / fromData): plain data that can be posted to a worker thread. */
export type ChebyshevEphemerisData = {
  /** Unique per exported ephemeris (workers keep the last one they were given, keyed by id). */
  id: string;
  startTdbDays: number;
  endTdbDays: number;
  /** All coefficients, in a SharedArrayBuffer. */
  coeffs: Float64Array;
  offset: number[];
  degree: number[];
  nGranules: number[];
  origin: number[];
  granuleDays: number[];
};

let exportCounter = 0;

export class ChebyshevEphemeris {
  readonly startTdbDays: number;
  readonly endTdbDays: number;
  /** all coefficients; body i starts at offset[i], its local granule g at offset[i] + g·3·(deg+1) */
  private readonly coeffs: Float64Array;
  private readonly offset: Int32Array;
  private readonly degree: Int32Array;
  private readonly nGranules: Int32Array;
  /** TDB days of the start of each body's first granule (a multiple of its granule length) */
  private readonly origin: Float64Array;
  private readonly granuleDays: Float64Array;
  private readonly invGranuleDays: Float64Array;
  private readonly scratch: Float64Array;
  /** wall time of the build, ms */
  readonly buildMs: number;

  /** The exported form (shared coefficients), made once on the first exportShared(). */
  private shared: ChebyshevEphemerisData | null = null;

  private constructor(start: number, end: number, useMemo: boolean, data?: ChebyshevEphemerisData) {
    const t0 = performance.now();
    this.startTdbDays = start;
    this.endTdbDays = end;
    if (data) {
      this.coeffs = data.coeffs;
      this.offset = Int32Array.from(data.offset);
      this.degree = Int32Array.from(data.degree);
      this.nGranules = Int32Array.from(data.nGranules);
      this.origin = Float64Array.from(data.origin);
      this.granuleDays = Float64Array.from(data.granuleDays);
      this.invGranuleDays = this.granuleDays.map((g) => 1 / g);
      this.scratch = new Float64Array(64);
      this.shared = data;
      this.buildMs = performance.now() - t0;
      return;
    }
    this.offset = new Int32Array(NBODY + 1);
    this.degree = new Int32Array(NBODY);
    this.nGranules = new Int32Array(NBODY);
    this.origin = new Float64Array(NBODY);
    this.granuleDays = new Float64Array(NBODY);
    this.invGranuleDays = new Float64Array(NBODY);
    const first = new Float64Array(NBODY);
    let total = 0;
    for (let i = 0; i < NBODY; i++) {
      const { granuleDays, degree } = GRANULES[i];
      const g0 = Math.floor(start / granuleDays);
      const g1 = Math.max(g0 + 1, Math.ceil(end / granuleDays));
      this.offset[i] = total;
      this.degree[i] = degree;
      this.nGranules[i] = g1 - g0;
      this.origin[i] = g0 * granuleDays;
      this.granuleDays[i] = granuleDays;
      this.invGranuleDays[i] = 1 / granuleDays;
      first[i] = g0;
      total += (g1 - g0) * 3 * (degree + 1);
    }
    this.offset[NBODY] = total;
    this.coeffs = new Float64Array(total);
    this.scratch = new Float64Array(64);
    for (let i = 0; i < NBODY; i++) {
      const per = 3 * (this.degree[i] + 1);
      const g0 = first[i];
      const g1 = g0 + this.nGranules[i];
      for (let chunk = Math.floor(g0 / CHUNK_GRANULES); chunk * CHUNK_GRANULES < g1; chunk++) {
        const c = chunkCoefficients(i, chunk, useMemo);
        const a = Math.max(g0, chunk * CHUNK_GRANULES);
        const b = Math.min(g1, (chunk + 1) * CHUNK_GRANULES);
        const src = (a - chunk * CHUNK_GRANULES) * per;
        this.coeffs.set(c.subarray(src, src + (b - a) * per), this.offset[i] + (a - g0) * per);
      }
    }
    this.buildMs = performance.now() - t0;
  }

  /**
   * Builds the cache over [startTdbDays, endTdbDays] (TDB days since J2000.0). Cost: about 0.035 s of CPU per simulated
   * year when nothing is memoized (tests/bench/ephemeris.ts), a copy when the granules are in the process-wide memo.
   * `opts.useMemo` false bypasses the memo (benchmarks).
   */
  static build(startTdbDays: number, endTdbDays: number, opts?: { useMemo?: boolean }): ChebyshevEphemeris {
    if (!Number.isFinite(startTdbDays) || !Number.isFinite(endTdbDays) || !(endTdbDays > startTdbDays)) {
      throw new RangeError(`ChebyshevEphemeris.build needs finite start < end, got ${startTdbDays}, ${endTdbDays}`);
    }
    return new ChebyshevEphemeris(startTdbDays, endTdbDays, opts?.useMemo ?? true);
  }

  /**
   * The cache in a form another thread can use without rebuilding it (worker threads of a Monte Carlo run): the
   * coefficients in a SharedArrayBuffer (copied there once per ephemeris, then shared, not copied, when posted to a
   * worker) and the small index tables. ChebyshevEphemeris.fromData(d) in the worker gives an ephemeris that returns
   * the same numbers (same coefficients, same code).
   */
  exportShared(): ChebyshevEphemerisData {
    if (!this.shared) {
      const coeffs = new Float64Array(new SharedArrayBuffer(this.coeffs.byteLength));
      coeffs.set(this.coeffs);
      this.shared = {
        id: `${this.startTdbDays}:${this.endTdbDays}:${coeffs.length}:${(exportCounter++).toString(36)}:${Math.random().toString(36).slice(2)}`,
        startTdbDays: this.startTdbDays,
        endTdbDays: this.endTdbDays,
        coeffs,
        offset: Array.from(this.offset),
        degree: Array.from(this.degree),
        nGranules: Array.from(this.nGranules),
        origin: Array.from(this.origin),
        granuleDays: Array.from(this.granuleDays),
      };
    }
    return this.shared;
  }

  /** An ephemeris over exported data (see exportShared); checks the table sizes against the coefficients. */
  static fromData(d: ChebyshevEphemerisData): ChebyshevEphemeris {
    const ok =
      d.offset.length === NBODY + 1 && d.degree.length === NBODY && d.nGranules.length === NBODY && d.origin.length === NBODY &&
      d.granuleDays.length === NBODY && d.offset[NBODY] === d.coeffs.length &&
      d.degree.every((deg, i) => d.offset[i] + d.nGranules[i] * 3 * (deg + 1) === d.offset[i + 1]);
    if (!ok || !(d.endTdbDays > d.startTdbDays)) throw new RangeError('ChebyshevEphemeris.fromData: inconsistent tables');
    return new ChebyshevEphemeris(d.startTdbDays, d.endTdbDays, false, d);
  }

  /** Empties the process-wide granule memo (tests, benchmarks, or to release memory). */
  static clearGranuleMemo(): void {
    memo.clear();
    memoBytes = 0;
    memoHits = 0;
    memoMisses = 0;
  }

  /** Sets the memo's memory bound (bytes; 0 disables keeping chunks); drops least recently used chunks beyond it. */
  static setGranuleMemoLimitBytes(bytes: number): void {
    if (!(bytes >= 0)) throw new RangeError(`memo limit must be >= 0 bytes, got ${bytes}`);
    memoLimitBytes = bytes;
    while (memoBytes > memoLimitBytes && memo.size > 0) {
      const [k, v] = memo.entries().next().value as [number, Float64Array];
      memo.delete(k);
      memoBytes -= v.byteLength;
    }
  }

  /** Memo statistics: chunks held, bytes, bound, hits and misses since the last clear. */
  static granuleMemoStats(): { chunks: number; bytes: number; limitBytes: number; hits: number; misses: number } {
    return { chunks: memo.size, bytes: memoBytes, limitBytes: memoLimitBytes, hits: memoHits, misses: memoMisses };
  }

  private locate(i: number, tdbDays: number): number {
    if (!(tdbDays >= this.startTdbDays - 1e-9 && tdbDays <= this.endTdbDays + 1e-9)) {
      throw new RangeError(
        `tdbDays ${tdbDays} outside the Chebyshev ephemeris span [${this.startTdbDays}, ${this.endTdbDays}]`,
      );
    }
    let g = Math.floor((tdbDays - this.origin[i]) * this.invGranuleDays[i]);
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
    for (let i = 0; i < NBODY; i++) {
      const inv = this.invGranuleDays[i];
      const dt = tdbDays - this.origin[i];
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
    const x = (2 * (tdbDays - this.origin[i] - g * G)) / G - 1;
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

