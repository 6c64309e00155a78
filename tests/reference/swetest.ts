/**
 * Small wrapper that RUNS Debian's swetest (package `swetest`, data `swe-basic-data` in /usr/share/libswe/ephe:
 * Swiss Ephemeris files sepl_18/semo_18, 1800–2400, compressed from JPL DE431) and parses its output.
 *
 * Commands follow handbook CHECKS.md §2: `-eswe` (Swiss Ephemeris files), `-j2000` (no precession),
 * `-true` (geometric positions: no light-time, no aberration, no deflection), `-hel` for heliocentric,
 * `-fxss -speed` for equatorial rectangular position and speed in AU and AU/day. We add `-icrs` so that the
 * axes are the ICRS itself (without it swetest applies the IAU 2006 frame bias and reports the mean
 * equator/equinox J2000; the unit test checks that the two differ by exactly that bias).
 * `-fX` (ecliptic) is available through `frame: 'ecliptic'`.
 *
 * Time: swetest's `-j` takes a Julian date in TT. The engine works in TDB. TDB − TT is below 1.7 ms
 * (METHODS.md §1.3): the Earth moves 5 cm and the geocentric Moon 2 mm in that time, so the conversion is
 * negligible at our tolerances; we still apply it with the simple form of METHODS.md §1.3
 * (Astronomical Almanac: 0.001657 sin g + 0.000014 sin 2g seconds).
 *
 * swetest prints 9 decimals of AU (0.15 km) and 9 decimals of AU/day (1.7 mm/s); that quantisation is part of
 * every tolerance that uses this wrapper.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export const SWETEST_BIN = '/usr/bin/swetest';
export const SWETEST_EPHE_DIR = '/usr/share/libswe/ephe';
export const SWETEST_MISSING_MESSAGE =
  'swetest or its data files are missing: install swetest swe-basic-data (apt-get install swetest swe-basic-data)';

/** swetest body letters (swetest -h): 0 Sun, 1 Moon, 2 Mercury, 3 Venus, 4 Mars, 5 Jupiter, 6 Saturn, 7 Uranus, 8 Neptune, C Earth, F Ceres. */
export const SWETEST_BODY: Record<string, string> = {
  mercury: '2',
  venus: '3',
  earth: 'C',
  moon: '1',
  mars: '4',
  jupiter: '5',
  saturn: '6',
  uranus: '7',
  neptune: '8',
  ceres: 'F',
};

export type SwetestState = { jdTt: number; positionAu: [number, number, number]; velocityAuD: [number, number, number] };

/** Throws with the install hint when swetest or its data are not there (tests must fail, never skip). */
export function assertSwetestAvailable(): void {
  if (!existsSync(SWETEST_BIN) || !existsSync(`${SWETEST_EPHE_DIR}/sepl_18.se1`) || !existsSync(`${SWETEST_EPHE_DIR}/semo_18.se1`)) {
    throw new Error(SWETEST_MISSING_MESSAGE);
  }
}

/** TDB − TT in seconds, simple form (METHODS.md §1.3; Astronomical Almanac), about 30 µs accuracy. */
export function tdbMinusTtSecondsApprox(jdTt: number): number {
  const g = ((357.53 + 0.98560028 * (jdTt - 2451545.0)) * Math.PI) / 180;
  return 0.001657 * Math.sin(g) + 0.000014 * Math.sin(2 * g);
}

/** TT Julian date for a TDB offset in days from J2000 (one fixed-point step is exact to far below a ns). */
export function jdTtFromTdbDays(tdbDays: number): number {
  const jdTdb = 2451545.0 + tdbDays;
  return jdTdb - tdbMinusTtSecondsApprox(jdTdb) / 86400;
}

export function runSwetest(args: string[]): string {
  assertSwetestAvailable();
  const out = execFileSync(SWETEST_BIN, [`-edir${SWETEST_EPHE_DIR}`, '-eswe', ...args], { encoding: 'utf8' });
  if (/warning|Moshier|not found|error/i.test(out)) {
    throw new Error(`swetest did not use the Swiss Ephemeris files (outside 1800–2400?):\n${out}`);
  }
  return out;
}

/**
 * Geometric state of `body` (heliocentric unless `geocentric`) at `count` epochs starting at TT JD `jdTt`
 * spaced by `stepDays`, on ICRS equatorial axes (default) or the swetest J2000 ecliptic (`-fX`, IAU 2006
 * obliquity, frame bias applied).
 */
export function swetestStates(opts: {
  body: keyof typeof SWETEST_BODY;
  jdTt: number;
  count?: number;
  stepDays?: number;
  geocentric?: boolean;
  frame?: 'icrs-equatorial' | 'ecliptic-j2000';
}): SwetestState[] {
  const count = opts.count ?? 1;
  const args = [`-j${opts.jdTt.toFixed(9)}`, `-p${SWETEST_BODY[opts.body]}`, '-j2000', '-true', '-speed', '-head', '-g,'];
  if (!opts.geocentric) args.push('-hel');
  if ((opts.frame ?? 'icrs-equatorial') === 'icrs-equatorial') args.push('-fxss', '-icrs');
  else args.push('-fXss');
  if (count > 1) args.push(`-n${count}`, `-s${opts.stepDays ?? 1}`);
  const lines = runSwetest(args)
    .split('\n')
    .map((l) => l.trim())
    .filter((l) => l.length > 0);
  if (lines.length !== count) throw new Error(`swetest returned ${lines.length} lines, expected ${count}:\n${lines.join('\n')}`);
  return lines.map((line, i) => {
    const v = line
      .split(',')
      .map((s) => s.trim())
      .filter((s) => s.length > 0)
      .map(Number);
    if (v.length !== 6 || v.some((x) => !Number.isFinite(x))) throw new Error(`cannot parse swetest line: ${line}`);
    return {
      jdTt: opts.jdTt + i * (opts.stepDays ?? 1),
      positionAu: [v[0], v[1], v[2]],
      velocityAuD: [v[3], v[4], v[5]],
    };
  });
}

// ---------------------------------------------------------------------------------------------------------------
// Added for orbit determination (issue 8): apparent-place switches, topocentric observers, spherical output.
// ---------------------------------------------------------------------------------------------------------------

/**
 * Which positions: 'geometric' = `-true` (no light-time, no aberration, no deflection); 'astrometric' =
 * `-noaberr -nodefl` (light-time corrected, no aberration, no deflection: swetest -h calls this "astrometric
 * positions").
 */
export type SwetestPlace = 'geometric' | 'astrometric';

export type SwetestSpherical = { jdTt: number; raDeg: number; decDeg: number; distanceKm: number; deltaTSeconds: number };

/**
 * ICRS equatorial RA/Dec (degrees) and distance (km) of `body`, geocentric or topocentric (`topo`: east longitude deg,
 * latitude deg, elevation m; `-topo[long,lat,elev]` of swetest -h). Also returns swetest's ΔT = TT − UT1 (seconds)
 * for that instant, read from its header, so a test can use the same UT1 as swetest did.
 * Format letter `a` is listed by `swetest -hform` as "right ascension hours decimal", but this build (2.10.03)
 * prints decimal DEGREES with 7 decimals (0.0004"): checked in tests/unit/od-observer.test.ts against our own Moon
 * direction (a factor 15 would show as degrees of difference).
 */
export function swetestSpherical(opts: {
  body: keyof typeof SWETEST_BODY;
  jdTt: number;
  place: SwetestPlace;
  topo?: { eastLongitudeDeg: number; latitudeDeg: number; elevationM: number };
  /**
   * 'icrs' (default): `-j2000 -icrs`; 'mean-j2000': `-j2000` (mean J2000 equator, frame bias applied);
   * 'true-of-date': neither (true equator and equinox of date).
   */
  frame?: 'icrs' | 'mean-j2000' | 'true-of-date';
}): SwetestSpherical {
  const frame = opts.frame ?? 'icrs';
  const args = [`-j${opts.jdTt.toFixed(9)}`, `-p${SWETEST_BODY[opts.body]}`, '-fadw', '-g,'];
  if (frame !== 'true-of-date') args.push('-j2000');
  if (frame === 'icrs') args.push('-icrs');
  if (opts.place === 'geometric') args.push('-true');
  else args.push('-noaberr', '-nodefl');
  if (opts.topo) {
    const lon = opts.topo.eastLongitudeDeg > 180 ? opts.topo.eastLongitudeDeg - 360 : opts.topo.eastLongitudeDeg;
    args.push(`-topo${lon.toFixed(9)},${opts.topo.latitudeDeg.toFixed(9)},${opts.topo.elevationM.toFixed(3)}`);
  }
  const out = runSwetest(args);
  const dt = /delta t:\s*([-+0-9.]+)\s*sec/.exec(out);
  if (!dt) throw new Error(`swetest printed no delta t:\n${out}`);
  const line = out
    .split('\n')
    .map((l) => l.trim())
    .find((l) => /^-?\d+\.\d+,\s*-?\d+\.\d+,\s*\d+\.\d+,?$/.test(l));
  if (!line) throw new Error(`cannot find the position line in swetest output:\n${out}`);
  const [raDeg, decDeg, distanceKm] = line.split(',').map((s) => Number(s.trim()));
  return { jdTt: opts.jdTt, raDeg, decDeg, distanceKm, deltaTSeconds: Number(dt[1]) };
}

/** Unit vector times distance (km) from swetest's spherical output. */
export function vectorKmFromSpherical(s: { raDeg: number; decDeg: number; distanceKm: number }): [number, number, number] {
  const a = (s.raDeg * Math.PI) / 180;
  const d = (s.decDeg * Math.PI) / 180;
  return [s.distanceKm * Math.cos(d) * Math.cos(a), s.distanceKm * Math.cos(d) * Math.sin(a), s.distanceKm * Math.sin(d)];
}
