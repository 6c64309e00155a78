/**
 * Fits the small rotations of server/engine/ephemeris/frame-tie.ts (FRAME_TIE_FIT) against Debian's swetest.
 * Run: npx tsx scripts/fit-ephemeris-frame-tie.ts   (needs swetest + swe-basic-data)
 *
 * For each VSOP87 body b: model r_swetest ≈ M·(r + (θ0 + θ1·T) × r), with M the VSOP87 → FK5 matrix of the
 * VSOP87 documentation, r the raw VSOP87B vector, T Julian centuries TDB from J2000; linear least squares for
 * θ0, θ1 (6 unknowns). Moon: r_swetest ≈ R1(−ε2006)·(r + θ0 × r) on the geocentric ELP/MPP02 vector (3 unknowns).
 * Data: swetest `-j2000 -true -icrs -fxss` (ICRS axes, geometric), 200 epochs evenly spaced over
 * JD(TT) 2433282.5–2506332.5 (1950-01-01 to 2150-01-01); TDB − TT (< 2 ms) is applied as in tests/reference/swetest.ts.
 * Prints the constants to paste into frame-tie.ts (stdout) and the residuals before/after at the fit epochs (stderr).
 */
import { swetestStates, tdbMinusTtSecondsApprox } from './swetest';
import { vsop87StateInto, type Vsop87Planet } from '../../server/engine/ephemeris/vsop87';
import { elpMoonGeocentricKmInto } from '../../server/engine/ephemeris/elpmpp02';
import { ELP_ECLIPTIC_TO_EQUATORIAL, VSOP87_TO_FK5 } from '../../server/engine/ephemeris/frame-tie';
import { AU_KM } from '../../server/engine/constants';

const MAS_RAD = Math.PI / (180 * 3600 * 1000);
const FIT_START_JD_TT = 2433282.5;
const FIT_END_JD_TT = 2506332.5;
const FIT_COUNT = 200;

type Sample = { T: number; r: number[]; target: number[] };

/** Mᵀ·v for a row-major 3×3 M. */
function mulT(m: readonly number[], v: number[]): number[] {
  return [0, 1, 2].map((j) => m[j] * v[0] + m[3 + j] * v[1] + m[6 + j] * v[2]);
}

function solve(A: number[][], b: number[]): number[] {
  const n = b.length;
  const m = A.map((row, i) => [...row, b[i]]);
  for (let i = 0; i < n; i++) {
    let p = i;
    for (let k = i + 1; k < n; k++) if (Math.abs(m[k][i]) > Math.abs(m[p][i])) p = k;
    [m[i], m[p]] = [m[p], m[i]];
    for (let k = 0; k < n; k++) {
      if (k === i) continue;
      const f = m[k][i] / m[i][i];
      for (let j = i; j <= n; j++) m[k][j] -= f * m[i][j];
    }
  }
  return m.map((row, i) => row[n] / row[i]);
}

/** Design rows: θ × r = −[r]× θ, with optional rate columns (× T). */
function design(s: Sample, withRate: boolean): number[][] {
  const [x, y, z] = s.r;
  const A = [
    [0, z, -y],
    [-z, 0, x],
    [y, -x, 0],
  ];
  return withRate ? A.map((row) => [...row, ...row.map((v) => v * s.T)]) : A;
}

function fit(samples: Sample[], matrix: readonly number[], withRate: boolean) {
  const np = withRate ? 6 : 3;
  const N = Array.from({ length: np }, () => new Array<number>(np).fill(0));
  const B = new Array<number>(np).fill(0);
  const resid = (s: Sample) => mulT(matrix, s.target).map((v, k) => v - s.r[k]);
  for (const s of samples) {
    const A = design(s, withRate);
    const e = resid(s);
    for (let i = 0; i < np; i++) {
      for (let j = 0; j < np; j++) for (let k = 0; k < 3; k++) N[i][j] += A[k][i] * A[k][j];
      for (let k = 0; k < 3; k++) B[i] += A[k][i] * e[k];
    }
  }
  const theta = solve(N, B);
  const stats = (th: number[] | null) => {
    let max = 0;
    let ss = 0;
    for (const s of samples) {
      const A = design(s, withRate);
      const e = resid(s);
      const d = [0, 1, 2].map((k) => e[k] - (th ? A[k].reduce((a, v, i) => a + v * th[i], 0) : 0));
      const km = Math.hypot(d[0], d[1], d[2]) * AU_KM; // M is a rotation: lengths are the same on both sides
      max = Math.max(max, km);
      ss += km * km;
    }
    return { maxKm: max, rmsKm: Math.sqrt(ss / samples.length) };
  };
  return { theta, before: stats(null), after: stats(theta) };
}

const step = (FIT_END_JD_TT - FIT_START_JD_TT) / (FIT_COUNT - 1);
const tdbDaysOf = (jdTt: number) => jdTt + tdbMinusTtSecondsApprox(jdTt) / 86400 - 2451545.0;
const planets: Vsop87Planet[] = ['mercury', 'venus', 'earth', 'mars', 'jupiter', 'saturn', 'uranus', 'neptune'];
const st = new Float64Array(6);
const lines: string[] = [];
const fmt = (v: number) => (v / MAS_RAD).toFixed(3);
for (const p of planets) {
  const samples = swetestStates({ body: p, jdTt: FIT_START_JD_TT, count: FIT_COUNT, stepDays: step }).map((s) => {
    const t = tdbDaysOf(s.jdTt);
    vsop87StateInto(p, t, st);
    return { T: t / 36525, r: [st[0], st[1], st[2]], target: s.positionAu };
  });
  const { theta, before, after } = fit(samples, VSOP87_TO_FK5, true);
  console.error(
    `${p}: VSOP87 doc matrix only: max ${before.maxKm.toFixed(1)} km, rms ${before.rmsKm.toFixed(1)} km; ` +
      `with fitted rotation: max ${after.maxKm.toFixed(1)} km, rms ${after.rmsKm.toFixed(1)} km`,
  );
  lines.push(
    `  ${p}: { theta0Mas: [${theta.slice(0, 3).map(fmt).join(', ')}], theta1MasPerCentury: [${theta.slice(3).map(fmt).join(', ')}] },`,
  );
}
{
  const samples = swetestStates({
    body: 'moon',
    geocentric: true,
    jdTt: FIT_START_JD_TT + 0.25,
    count: FIT_COUNT,
    stepDays: step,
  }).map((s) => {
    const t = tdbDaysOf(s.jdTt);
    elpMoonGeocentricKmInto(t, st);
    return { T: t / 36525, r: [st[0] / AU_KM, st[1] / AU_KM, st[2] / AU_KM], target: s.positionAu };
  });
  const { theta, before, after } = fit(samples, ELP_ECLIPTIC_TO_EQUATORIAL, false);
  console.error(
    `moon (geocentric): eps 84381.406" only: max ${before.maxKm.toFixed(3)} km, rms ${before.rmsKm.toFixed(3)} km; ` +
      `with fitted rotation: max ${after.maxKm.toFixed(3)} km, rms ${after.rmsKm.toFixed(3)} km`,
  );
  lines.push(`  moon: { theta0Mas: [${theta.map(fmt).join(', ')}], theta1MasPerCentury: [0, 0, 0] },`);
}
console.log(lines.join('\n'));
