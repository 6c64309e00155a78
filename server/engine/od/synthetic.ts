/**
 * Synthetic optical astrometry in IAU ADES PSV form from a known orbit (tests and the demo scenario):
 * the astrometric RA/Dec predicted by predict.ts (n-body model with the orbit's non-grav terms, observer positions
 * from observer.ts with an optional UT1 − UTC, light time, no aberration; METHODS.md §9.4), plus seeded Gaussian noise of `noiseArcsec` in
 * RA·cos(dec) and in Dec (xoshiro256** + Box–Muller, risk/random.ts), plus optional planted outliers.
 *
 * The file is written so that parseAdesPsv reads it back without issues: "# version=2022", header groups, the
 * column header provID|mode|stn|obsTime|ra|dec|rmsRA|rmsDec|astCat|remarks, RA/Dec with 9 decimals of a degree
 * (3.6 µas), obsTime to the millisecond. rmsRA/rmsDec carry `noiseArcsec` (left empty when the noise is 0, so the
 * fit then uses its default weight rather than an impossible zero).
 */
import type { Observatory } from '../../../shared/schemas/od';
import type { NonGravParams } from '../dynamics/types';
import { defaultEphemeris } from '../dynamics/ephemeris-source';
import { RandomStream } from '../risk/random';
import { tdbDaysFromUtc } from '../time';
import type { Vec3 } from '../vec';
import { normalizeObsTime, observationKey } from './ades';
import { observerStatesAu } from './observer';
import { predictAstrometry } from './predict';

export type SyntheticArcOptions = {
  designation: string;
  orbit: { epochTdbDays: number; positionAu: Vec3; velocityAuD: Vec3; nonGrav: NonGravParams | null };
  observatories: readonly Observatory[];
  /** One observation per entry: station code and UTC instant (ISO 8601 with Z). */
  nights: readonly { stn: string; utc: string }[];
  /** 1-sigma noise in RA·cos(dec) and in Dec, arcsec (>= 0). */
  noiseArcsec: number;
  seed: number;
  /** Observations (by index into `nights`) displaced by `offsetArcsec` in a seeded random direction. */
  outliers?: readonly { index: number; offsetArcsec: number }[];
  /** ADES astCat written on every line (default "Gaia3"). */
  astCat?: string;
  /** UT1 − UTC (s) of the observer positions (observer.ts; default 0 = UT1 taken as UTC), one value for the arc. */
  ut1MinusUtcSeconds?: number;
};

export type SyntheticArc = {
  psv: string;
  /** Noise-free astrometric RA/Dec (degrees) in the order of `nights`. */
  truth: { raDeg: number; decDeg: number }[];
};

const DEG = Math.PI / 180;
const ARCSEC_DEG = 1 / 3600;
const OBS_TIME_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)Z$/;

function utcToTdbDays(utc: string, index: number): number {
  const m = OBS_TIME_RE.exec(utc.trim());
  if (!m) throw new RangeError(`nights[${index}].utc "${utc}" is not an ISO 8601 UTC time like 2026-03-01T03:12:45.123Z`);
  const [y, mo, d, h, mi] = m.slice(1, 6).map(Number);
  return tdbDaysFromUtc(y, mo, d, h, mi, Number(m[6]));
}

/** Writes a synthetic ADES PSV arc; throws RangeError / UnknownObservatoryError for bad options. */
export function synthesizeAdesPsv(opts: SyntheticArcOptions): SyntheticArc {
  if (!(opts.noiseArcsec >= 0) || !Number.isFinite(opts.noiseArcsec)) throw new RangeError('noiseArcsec must be a finite number >= 0');
  if (opts.designation.includes('|') || opts.designation.trim() === '') throw new RangeError('designation must be non-empty and contain no "|"');
  if (opts.nights.length === 0) throw new RangeError('nights must not be empty');
  const n = opts.nights.length;
  const outliers = new Map<number, number>();
  for (const o of opts.outliers ?? []) {
    if (!Number.isInteger(o.index) || o.index < 0 || o.index >= n) throw new RangeError(`outlier index ${o.index} is outside 0..${n - 1}`);
    if (!Number.isFinite(o.offsetArcsec)) throw new RangeError(`outlier ${o.index}: offsetArcsec must be finite`);
    outliers.set(o.index, o.offsetArcsec);
  }
  const times = opts.nights.map((x, i) => utcToTdbDays(x.utc, i));
  const seen = new Map<string, number>();
  opts.nights.forEach((x, i) => {
    const key = observationKey({ stn: x.stn, obsTime: x.utc });
    const j = seen.get(key);
    if (j !== undefined) throw new RangeError(`nights[${i}] repeats nights[${j}] (same station and instant to the millisecond)`);
    seen.set(key, i);
  });
  const lo = times.reduce((a, t) => Math.min(a, t), opts.orbit.epochTdbDays);
  const hi = times.reduce((a, t) => Math.max(a, t), opts.orbit.epochTdbDays);
  const eph = defaultEphemeris(lo - 0.1, hi + 0.1);
  const observers = observerStatesAu(opts.nights.map((x, i) => ({ stn: x.stn, obsTimeTdbDays: times[i] })), opts.observatories, eph, {
    ut1MinusUtcSeconds: opts.ut1MinusUtcSeconds ?? 0,
  });
  const predicted = predictAstrometry({
    epochTdbDays: opts.orbit.epochTdbDays,
    positionAu: opts.orbit.positionAu,
    velocityAuD: opts.orbit.velocityAuD,
    nonGrav: opts.orbit.nonGrav,
    model: 'n-body',
    observations: times.map((t, i) => ({ obsTimeTdbDays: t, observerPositionAu: observers[i].positionAu, observerVelocityAuD: observers[i].velocityAuD })),
    partials: false,
    ephemeris: eph,
    tolerance: 1e-11,
  });

  // Two normals per observation always (and one uniform for the outlier direction), so planting an outlier does not
  // change the noise of the other observations.
  const rng = RandomStream.forClone(opts.seed, 0);
  const rms = opts.noiseArcsec > 0 ? trimNumber(opts.noiseArcsec.toFixed(3)) : '';
  const astCat = opts.astCat ?? 'Gaia3';
  const lines: string[] = [
    '# version=2022',
    '# submitter',
    '! name Halden Sound Planetary Defence Office',
    '# software',
    '! astrometry Tocsin synthetic arc generator',
    '# comment',
    `! line Synthetic astrometry of ${opts.designation}: ${n} observations, noise ${opts.noiseArcsec} arcsec, seed ${opts.seed}`,
    'provID|mode|stn|obsTime|ra|dec|rmsRA|rmsDec|astCat|remarks',
  ];
  const truth: { raDeg: number; decDeg: number }[] = [];
  predicted.forEach((p, i) => {
    const raDeg = p.raRad / DEG;
    const decDeg = p.decRad / DEG;
    truth.push({ raDeg, decDeg });
    const nRa = rng.normal() * opts.noiseArcsec;
    const nDec = rng.normal() * opts.noiseArcsec;
    const angle = 2 * Math.PI * rng.uniform();
    const off = outliers.get(i) ?? 0;
    const dRaCosDecArcsec = nRa + off * Math.cos(angle);
    const dDecArcsec = nDec + off * Math.sin(angle);
    let dec = decDeg + dDecArcsec * ARCSEC_DEG;
    let ra = raDeg + (dRaCosDecArcsec * ARCSEC_DEG) / Math.cos(p.decRad);
    if (dec > 90) dec = 90;
    if (dec < -90) dec = -90;
    ra = ((ra % 360) + 360) % 360;
    let raText = ra.toFixed(9);
    if (raText === '360.000000000') raText = '0.000000000';
    lines.push(
      [opts.designation, 'CCD', opts.nights[i].stn, normalizeObsTime(opts.nights[i].utc), raText, dec.toFixed(9), rms, rms, astCat, ''].join('|'),
    );
  });
  return { psv: `${lines.join('\n')}\n`, truth };
}

function trimNumber(s: string): string {
  return s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}
