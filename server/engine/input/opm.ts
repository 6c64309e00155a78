/**
 * CCSDS Orbit Parameter Message (OPM) 2.0, KVN form (CCSDS 502.0-B-2, 2009; handbook METHODS.md §9.5).
 *
 * Accepted structure ("KEY = value [unit]" lines; COMMENT lines and blank lines anywhere):
 *   header    CCSDS_OPM_VERS = 2.0 (first keyword), CREATION_DATE, ORIGINATOR
 *   metadata  OBJECT_NAME, OBJECT_ID, CENTER_NAME = SUN, REF_FRAME = ICRF | EME2000, [REF_FRAME_EPOCH],
 *             TIME_SYSTEM = TDB | UTC
 *   state     EPOCH, X, Y, Z [km], X_DOT, Y_DOT, Z_DOT [km/s]
 *   optional osculating Keplerian block: SEMI_MAJOR_AXIS [km], ECCENTRICITY, INCLINATION, RA_OF_ASC_NODE,
 *             ARG_OF_PERICENTER [deg], TRUE_ANOMALY or MEAN_ANOMALY [deg], GM [km**3/s**2] (checked against the state)
 *   optional spacecraft parameters MASS, SOLAR_RAD_AREA, SOLAR_RAD_COEFF, DRAG_AREA, DRAG_COEFF (read and ignored)
 *   optional covariance: [COV_REF_FRAME = ICRF | EME2000], the 21 lower-triangular keys CX_X … CZ_DOT_Z_DOT
 *             [km**2, km**2/s, km**2/s**2]
 *   USER_DEFINED_A1, _A2, _A3 [AU/d**2] (Marsden–Sekanina non-gravitational parameters), USER_DEFINED_NG_LAW
 *             (WATER-ICE, default, or INVERSE-SQUARE), USER_DEFINED_H (absolute magnitude), USER_DEFINED_ALBEDO
 * Manoeuvre blocks (MAN_*) are refused: small bodies do not manoeuvre.
 * Units in [brackets] are optional; when present they must be the standard's unit for that keyword.
 * All problems are collected and thrown together as one OrbitInputError whose issues name the line and the reason.
 */
import { GM_KM3_S2 } from '../constants';
import { parseEpoch, calendarFromDayIndex, dayIndexFromCalendar, isGregorianLeapYear } from '../time';
import { stateToElements } from '../twobody/elements';
import type { Vec3 } from '../vec';
import { OrbitInputError, type InputIssue } from './errors';

export interface OpmKeplerian {
  semiMajorAxisKm: number;
  eccentricity: number;
  inclinationDeg: number;
  raOfAscNodeDeg: number;
  argOfPericenterDeg: number;
  trueAnomalyDeg: number | null;
  meanAnomalyDeg: number | null;
  gmKm3S2: number;
}

export interface OpmMessage {
  version: string;
  creationDate: string;
  originator: string;
  objectName: string;
  objectId: string;
  centerName: 'SUN';
  refFrame: 'ICRF' | 'EME2000';
  timeSystem: 'TDB' | 'UTC';
  /** EPOCH as written in the file */
  epochText: string;
  /** the same epoch as a Tocsin epoch string ("...Z" for UTC, "TDB:..." for TDB) */
  epoch: string;
  epochTdbDays: number;
  positionKm: Vec3;
  velocityKmS: Vec3;
  keplerian: OpmKeplerian | null;
  /** 6×6 symmetric covariance of x, y, z [km], x_dot, y_dot, z_dot [km/s] in REF_FRAME, or null */
  covarianceKm: number[][] | null;
  nonGrav: { a1: number; a2: number; a3: number; law: 'water-ice' | 'inverse-square' } | null;
  hMagnitude: number | null;
  albedo: number | null;
  comments: string[];
  /** non-fatal findings (ignored keywords, element/state mismatch), each naming its line */
  warnings: InputIssue[];
}

type Kind = 'text' | 'number';
interface KeySpec {
  kind: Kind;
  /** accepted units after normalisation (lower case, no blanks, ^ -> **); undefined = no unit expected */
  units?: string[];
}

const KM = ['km'];
const KMS = ['km/s'];
const DEG = ['deg'];

export const COVARIANCE_KEYS = [
  'CX_X',
  'CY_X', 'CY_Y',
  'CZ_X', 'CZ_Y', 'CZ_Z',
  'CX_DOT_X', 'CX_DOT_Y', 'CX_DOT_Z', 'CX_DOT_X_DOT',
  'CY_DOT_X', 'CY_DOT_Y', 'CY_DOT_Z', 'CY_DOT_X_DOT', 'CY_DOT_Y_DOT',
  'CZ_DOT_X', 'CZ_DOT_Y', 'CZ_DOT_Z', 'CZ_DOT_X_DOT', 'CZ_DOT_Y_DOT', 'CZ_DOT_Z_DOT',
] as const;

function covUnit(key: string): string[] {
  const dots = (key.match(/_DOT/g) ?? []).length;
  return [['km**2'], ['km**2/s'], ['km**2/s**2']][dots];
}

const SPEC: Record<string, KeySpec> = {
  CCSDS_OPM_VERS: { kind: 'text' },
  CREATION_DATE: { kind: 'text' },
  ORIGINATOR: { kind: 'text' },
  MESSAGE_ID: { kind: 'text' },
  OBJECT_NAME: { kind: 'text' },
  OBJECT_ID: { kind: 'text' },
  CENTER_NAME: { kind: 'text' },
  REF_FRAME: { kind: 'text' },
  REF_FRAME_EPOCH: { kind: 'text' },
  TIME_SYSTEM: { kind: 'text' },
  EPOCH: { kind: 'text' },
  X: { kind: 'number', units: KM },
  Y: { kind: 'number', units: KM },
  Z: { kind: 'number', units: KM },
  X_DOT: { kind: 'number', units: KMS },
  Y_DOT: { kind: 'number', units: KMS },
  Z_DOT: { kind: 'number', units: KMS },
  SEMI_MAJOR_AXIS: { kind: 'number', units: KM },
  ECCENTRICITY: { kind: 'number' },
  INCLINATION: { kind: 'number', units: DEG },
  RA_OF_ASC_NODE: { kind: 'number', units: DEG },
  ARG_OF_PERICENTER: { kind: 'number', units: DEG },
  TRUE_ANOMALY: { kind: 'number', units: DEG },
  MEAN_ANOMALY: { kind: 'number', units: DEG },
  GM: { kind: 'number', units: ['km**3/s**2'] },
  MASS: { kind: 'number', units: ['kg'] },
  SOLAR_RAD_AREA: { kind: 'number', units: ['m**2'] },
  SOLAR_RAD_COEFF: { kind: 'number' },
  DRAG_AREA: { kind: 'number', units: ['m**2'] },
  DRAG_COEFF: { kind: 'number' },
  COV_REF_FRAME: { kind: 'text' },
  USER_DEFINED_A1: { kind: 'number', units: ['au/d**2', 'au/day**2'] },
  USER_DEFINED_A2: { kind: 'number', units: ['au/d**2', 'au/day**2'] },
  USER_DEFINED_A3: { kind: 'number', units: ['au/d**2', 'au/day**2'] },
  USER_DEFINED_NG_LAW: { kind: 'text' },
  USER_DEFINED_H: { kind: 'number', units: ['mag'] },
  USER_DEFINED_ALBEDO: { kind: 'number' },
  ...Object.fromEntries(COVARIANCE_KEYS.map((k) => [k, { kind: 'number' as Kind, units: covUnit(k) }])),
};

const REQUIRED = [
  'CCSDS_OPM_VERS', 'CREATION_DATE', 'ORIGINATOR', 'OBJECT_NAME', 'OBJECT_ID', 'CENTER_NAME', 'REF_FRAME',
  'TIME_SYSTEM', 'EPOCH', 'X', 'Y', 'Z', 'X_DOT', 'Y_DOT', 'Z_DOT',
];
const KEPLER_KEYS = ['SEMI_MAJOR_AXIS', 'ECCENTRICITY', 'INCLINATION', 'RA_OF_ASC_NODE', 'ARG_OF_PERICENTER', 'GM'];
const IGNORED_SPACECRAFT = ['MASS', 'SOLAR_RAD_AREA', 'SOLAR_RAD_COEFF', 'DRAG_AREA', 'DRAG_COEFF'];

const NUMBER_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const LINE_RE = /^([A-Z][A-Z0-9_]*)\s*=\s*(.*?)\s*$/;
const EPOCH_CAL_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)(Z?)$/;
const EPOCH_DOY_RE = /^(\d{4})-(\d{3})T(\d{2}):(\d{2}):(\d{2}(?:\.\d+)?)(Z?)$/;

function normaliseUnit(u: string): string {
  return u.toLowerCase().replace(/\s+/g, '').replace(/\^/g, '**');
}

interface Entry {
  line: number;
  text?: string;
  num?: number;
}

/**
 * Convert an OPM epoch ("YYYY-MM-DDThh:mm:ss[.s]" or day-of-year "YYYY-DDDThh:mm:ss[.s]", optional Z for UTC) to a
 * Tocsin epoch string for the given time system. Throws Error with the reason.
 */
export function opmEpochToTocsin(value: string, timeSystem: 'TDB' | 'UTC'): string {
  let y: number, mo: number, d: number, rest: string, z: string;
  const cal = EPOCH_CAL_RE.exec(value);
  const doy = EPOCH_DOY_RE.exec(value);
  if (cal) {
    [y, mo, d] = [Number(cal[1]), Number(cal[2]), Number(cal[3])];
    rest = `${cal[4]}:${cal[5]}:${cal[6]}`;
    z = cal[7];
  } else if (doy) {
    y = Number(doy[1]);
    const dayOfYear = Number(doy[2]);
    const len = isGregorianLeapYear(y) ? 366 : 365;
    if (dayOfYear < 1 || dayOfYear > len) throw new Error(`day of year ${dayOfYear} does not exist in ${y}`);
    ({ month: mo, day: d } = calendarFromDayIndex(dayIndexFromCalendar(y, 1, 1) + dayOfYear - 1));
    rest = `${doy[3]}:${doy[4]}:${doy[5]}`;
    z = doy[6];
  } else {
    throw new Error('EPOCH must be YYYY-MM-DDThh:mm:ss[.s] or YYYY-DDDThh:mm:ss[.s]');
  }
  if (z && timeSystem !== 'UTC') throw new Error('a trailing Z marks UTC, but TIME_SYSTEM is TDB');
  const date = `${String(y).padStart(4, '0')}-${String(mo).padStart(2, '0')}-${String(d).padStart(2, '0')}T${rest}`;
  return timeSystem === 'UTC' ? `${date}Z` : `TDB:${date}`;
}

/** Parse an OPM 2.0 KVN message. Throws OrbitInputError listing every problem with its line number. */
export function parseOpm(text: string): OpmMessage {
  const issues: InputIssue[] = [];
  const warnings: InputIssue[] = [];
  const comments: string[] = [];
  const entries = new Map<string, Entry>();
  const at = (line: number) => `line ${line}`;
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/);
  let sawFirstKey = false;

  lines.forEach((raw, idx) => {
    const line = idx + 1;
    const s = raw.trim();
    if (s === '') return;
    if (/^COMMENT(\s|$)/.test(s)) {
      comments.push(s.slice(7).trim());
      return;
    }
    const m = LINE_RE.exec(s);
    if (!m) {
      issues.push({ where: at(line), message: `not a "KEYWORD = value" line: ${JSON.stringify(s.slice(0, 60))}` });
      return;
    }
    const key = m[1];
    let value = m[2];
    if (!sawFirstKey) {
      sawFirstKey = true;
      if (key !== 'CCSDS_OPM_VERS') {
        issues.push({ where: at(line), message: `the first keyword must be CCSDS_OPM_VERS, found ${key}` });
      }
    }
    if (key.startsWith('MAN_')) {
      issues.push({ where: at(line), message: `manoeuvre keyword ${key} is not supported (small bodies do not manoeuvre)` });
      return;
    }
    const spec = SPEC[key];
    if (!spec && key.startsWith('USER_DEFINED_')) {
      warnings.push({ where: at(line), message: `${key} is not used by Tocsin and was ignored` });
      return;
    }
    if (!spec) {
      issues.push({ where: at(line), message: `unknown keyword ${key} for an OPM 2.0 message` });
      return;
    }
    if (entries.has(key)) {
      issues.push({ where: at(line), message: `${key} appears twice (first on line ${entries.get(key)!.line})` });
      return;
    }
    // optional [unit]
    const unitMatch = /^(.*?)\s*\[([^\]]*)\]$/.exec(value);
    if (unitMatch) {
      value = unitMatch[1];
      const unit = normaliseUnit(unitMatch[2]);
      if (!spec.units) {
        if (unit !== '' && unit !== 'n/a') {
          issues.push({ where: at(line), message: `${key} takes no unit, found [${unitMatch[2]}]` });
          return;
        }
      } else if (!spec.units.includes(unit)) {
        issues.push({
          where: at(line),
          message: `${key} must be in [${spec.units[0]}], found [${unitMatch[2]}]`,
        });
        return;
      }
    }
    if (value === '') {
      issues.push({ where: at(line), message: `${key} has no value` });
      return;
    }
    if (spec.kind === 'number') {
      if (!NUMBER_RE.test(value)) {
        issues.push({ where: at(line), message: `${key} must be a number, found ${JSON.stringify(value)}` });
        return;
      }
      entries.set(key, { line, num: Number(value) });
    } else {
      entries.set(key, { line, text: value });
    }
  });

  if (!sawFirstKey) issues.push({ where: 'line 1', message: 'empty message: no CCSDS_OPM_VERS keyword' });

  const lastLine = lines.length;
  for (const k of REQUIRED) {
    if (!entries.has(k)) issues.push({ where: `line ${lastLine}`, message: `required keyword ${k} is missing` });
  }
  const txt = (k: string) => entries.get(k)?.text;
  const num = (k: string) => entries.get(k)?.num;
  const lineOf = (k: string) => at(entries.get(k)?.line ?? lastLine);

  const version = txt('CCSDS_OPM_VERS');
  if (version !== undefined && version !== '2.0') {
    issues.push({ where: lineOf('CCSDS_OPM_VERS'), message: `CCSDS_OPM_VERS must be 2.0, found ${version}` });
  }
  const center = txt('CENTER_NAME');
  if (center !== undefined && center.toUpperCase() !== 'SUN') {
    issues.push({ where: lineOf('CENTER_NAME'), message: `CENTER_NAME must be SUN (heliocentric state), found ${center}` });
  }
  const frame = txt('REF_FRAME')?.toUpperCase();
  if (frame !== undefined && frame !== 'ICRF' && frame !== 'EME2000') {
    issues.push({ where: lineOf('REF_FRAME'), message: `REF_FRAME must be ICRF or EME2000, found ${txt('REF_FRAME')}` });
  }
  const covFrame = txt('COV_REF_FRAME')?.toUpperCase();
  if (covFrame !== undefined && covFrame !== 'ICRF' && covFrame !== 'EME2000') {
    issues.push({ where: lineOf('COV_REF_FRAME'), message: `COV_REF_FRAME must be ICRF or EME2000 (RTN/RSW are not supported), found ${txt('COV_REF_FRAME')}` });
  }
  const ts = txt('TIME_SYSTEM')?.toUpperCase();
  if (ts !== undefined && ts !== 'TDB' && ts !== 'UTC') {
    issues.push({ where: lineOf('TIME_SYSTEM'), message: `TIME_SYSTEM must be TDB or UTC, found ${txt('TIME_SYSTEM')}` });
  }

  let epoch = '';
  let epochTdbDays = NaN;
  const epochText = txt('EPOCH');
  if (epochText !== undefined && (ts === 'TDB' || ts === 'UTC')) {
    try {
      epoch = opmEpochToTocsin(epochText, ts);
      epochTdbDays = parseEpoch(epoch).tdbDays;
    } catch (err) {
      issues.push({ where: lineOf('EPOCH'), message: `EPOCH ${JSON.stringify(epochText)}: ${(err as Error).message}` });
    }
  }

  // Keplerian block: all or nothing, one anomaly.
  const presentKepler = [...KEPLER_KEYS, 'TRUE_ANOMALY', 'MEAN_ANOMALY'].filter((k) => entries.has(k));
  let keplerian: OpmKeplerian | null = null;
  if (presentKepler.length > 0) {
    const firstLine = Math.min(...presentKepler.map((k) => entries.get(k)!.line));
    const missing = KEPLER_KEYS.filter((k) => !entries.has(k));
    const anomalies = ['TRUE_ANOMALY', 'MEAN_ANOMALY'].filter((k) => entries.has(k));
    if (missing.length) {
      issues.push({ where: at(firstLine), message: `Keplerian block is incomplete: missing ${missing.join(', ')}` });
    }
    if (anomalies.length !== 1) {
      issues.push({ where: at(firstLine), message: 'Keplerian block needs exactly one of TRUE_ANOMALY or MEAN_ANOMALY' });
    }
    const e = num('ECCENTRICITY');
    if (e !== undefined && e < 0) issues.push({ where: lineOf('ECCENTRICITY'), message: 'ECCENTRICITY must be >= 0' });
    const gm = num('GM');
    if (gm !== undefined && !(gm > 0)) issues.push({ where: lineOf('GM'), message: 'GM must be > 0' });
    const inc = num('INCLINATION');
    if (inc !== undefined && !(inc >= 0 && inc <= 180)) {
      issues.push({ where: lineOf('INCLINATION'), message: 'INCLINATION must be in [0, 180] deg' });
    }
    if (!missing.length && anomalies.length === 1) {
      keplerian = {
        semiMajorAxisKm: num('SEMI_MAJOR_AXIS')!,
        eccentricity: num('ECCENTRICITY')!,
        inclinationDeg: num('INCLINATION')!,
        raOfAscNodeDeg: num('RA_OF_ASC_NODE')!,
        argOfPericenterDeg: num('ARG_OF_PERICENTER')!,
        trueAnomalyDeg: num('TRUE_ANOMALY') ?? null,
        meanAnomalyDeg: num('MEAN_ANOMALY') ?? null,
        gmKm3S2: gm!,
      };
    }
  }

  // Covariance: all 21 or none.
  const presentCov = COVARIANCE_KEYS.filter((k) => entries.has(k));
  let covarianceKm: number[][] | null = null;
  if (presentCov.length > 0) {
    const missing = COVARIANCE_KEYS.filter((k) => !entries.has(k));
    if (missing.length) {
      const firstLine = Math.min(...presentCov.map((k) => entries.get(k)!.line));
      issues.push({ where: at(firstLine), message: `covariance is incomplete: missing ${missing.join(', ')}` });
    } else {
      covarianceKm = Array.from({ length: 6 }, () => new Array<number>(6).fill(0));
      let k = 0;
      for (let i = 0; i < 6; i++) {
        for (let j = 0; j <= i; j++) {
          const key = COVARIANCE_KEYS[k++];
          covarianceKm[i][j] = covarianceKm[j][i] = num(key)!;
          if (i === j && !(num(key)! >= 0)) issues.push({ where: lineOf(key), message: `${key} is a variance and must be >= 0` });
        }
      }
    }
  } else if (entries.has('COV_REF_FRAME')) {
    issues.push({ where: lineOf('COV_REF_FRAME'), message: 'COV_REF_FRAME given without the covariance keys CX_X … CZ_DOT_Z_DOT' });
  }

  // User-defined parameters.
  const a = ['USER_DEFINED_A1', 'USER_DEFINED_A2', 'USER_DEFINED_A3'].map((k) => num(k));
  let nonGrav: OpmMessage['nonGrav'] = null;
  const lawText = txt('USER_DEFINED_NG_LAW')?.toUpperCase();
  let law: 'water-ice' | 'inverse-square' = 'water-ice';
  if (lawText !== undefined) {
    if (lawText === 'WATER-ICE' || lawText === 'WATER_ICE') law = 'water-ice';
    else if (lawText === 'INVERSE-SQUARE' || lawText === 'INVERSE_SQUARE') law = 'inverse-square';
    else issues.push({ where: lineOf('USER_DEFINED_NG_LAW'), message: `USER_DEFINED_NG_LAW must be WATER-ICE or INVERSE-SQUARE, found ${txt('USER_DEFINED_NG_LAW')}` });
  }
  if (a.some((v) => v !== undefined)) {
    nonGrav = { a1: a[0] ?? 0, a2: a[1] ?? 0, a3: a[2] ?? 0, law };
  } else if (lawText !== undefined) {
    warnings.push({ where: lineOf('USER_DEFINED_NG_LAW'), message: 'USER_DEFINED_NG_LAW given without USER_DEFINED_A1/A2/A3; ignored' });
  }
  const h = num('USER_DEFINED_H');
  if (h !== undefined && !(h > -5 && h < 40)) issues.push({ where: lineOf('USER_DEFINED_H'), message: 'USER_DEFINED_H must be between -5 and 40 mag' });
  const albedo = num('USER_DEFINED_ALBEDO');
  if (albedo !== undefined && !(albedo > 0 && albedo <= 1)) {
    issues.push({ where: lineOf('USER_DEFINED_ALBEDO'), message: 'USER_DEFINED_ALBEDO must be in (0, 1]' });
  }
  for (const k of IGNORED_SPACECRAFT) {
    if (entries.has(k)) warnings.push({ where: lineOf(k), message: `${k} (spacecraft parameter) is not used for a natural body; ignored` });
  }

  const positionKm: Vec3 = [num('X') ?? NaN, num('Y') ?? NaN, num('Z') ?? NaN];
  const velocityKmS: Vec3 = [num('X_DOT') ?? NaN, num('Y_DOT') ?? NaN, num('Z_DOT') ?? NaN];
  if (positionKm.every(Number.isFinite) && Math.hypot(...positionKm) === 0) {
    issues.push({ where: lineOf('X'), message: 'the position vector is zero' });
  }

  if (issues.length) {
    issues.sort((p, q) => Number(p.where.replace(/\D/g, '')) - Number(q.where.replace(/\D/g, '')));
    throw new OrbitInputError('invalid CCSDS OPM', issues);
  }

  // Cross-check the optional Keplerian block against the state vector (osculating, in REF_FRAME, with its GM).
  if (keplerian) {
    try {
      const el = stateToElements(positionKm, velocityKmS, keplerian.gmKm3S2);
      const aKm = el.q / (1 - el.e);
      const d = (x: number, y: number) => Math.abs((((x - y) % 360) + 540) % 360 - 180);
      const r2d = 180 / Math.PI;
      const mismatches: string[] = [];
      if (Math.abs(aKm - keplerian.semiMajorAxisKm) > 1e-6 * Math.abs(keplerian.semiMajorAxisKm)) mismatches.push(`SEMI_MAJOR_AXIS (state gives ${aKm.toPrecision(10)} km)`);
      if (Math.abs(el.e - keplerian.eccentricity) > 1e-6) mismatches.push(`ECCENTRICITY (state gives ${el.e.toPrecision(10)})`);
      if (Math.abs(el.i * r2d - keplerian.inclinationDeg) > 1e-4) mismatches.push(`INCLINATION (state gives ${(el.i * r2d).toFixed(6)} deg)`);
      if (d(el.node * r2d, keplerian.raOfAscNodeDeg) > 1e-4) mismatches.push(`RA_OF_ASC_NODE (state gives ${(el.node * r2d).toFixed(6)} deg)`);
      if (d(el.argPeri * r2d, keplerian.argOfPericenterDeg) > 1e-4) mismatches.push(`ARG_OF_PERICENTER (state gives ${(el.argPeri * r2d).toFixed(6)} deg)`);
      if (keplerian.trueAnomalyDeg !== null && d(el.trueAnomaly * r2d, keplerian.trueAnomalyDeg) > 1e-4) mismatches.push(`TRUE_ANOMALY (state gives ${(el.trueAnomaly * r2d).toFixed(6)} deg)`);
      if (keplerian.meanAnomalyDeg !== null && el.meanAnomaly !== null && d(el.meanAnomaly * r2d, keplerian.meanAnomalyDeg) > 1e-4) mismatches.push(`MEAN_ANOMALY (state gives ${(el.meanAnomaly * r2d).toFixed(6)} deg)`);
      if (mismatches.length) {
        warnings.push({
          where: lineOf('SEMI_MAJOR_AXIS'),
          message: `Keplerian elements disagree with the state vector, which is used: ${mismatches.join(', ')}`,
        });
      }
      if (Math.abs(keplerian.gmKm3S2 - GM_KM3_S2.sun) > 1e-6 * GM_KM3_S2.sun) {
        warnings.push({ where: lineOf('GM'), message: `GM ${keplerian.gmKm3S2} differs from Tocsin's GM_sun ${GM_KM3_S2.sun} km**3/s**2 (DE440)` });
      }
    } catch (err) {
      warnings.push({ where: lineOf('SEMI_MAJOR_AXIS'), message: `Keplerian block could not be checked: ${(err as Error).message}` });
    }
  }

  return {
    version: version!,
    creationDate: txt('CREATION_DATE')!,
    originator: txt('ORIGINATOR')!,
    objectName: txt('OBJECT_NAME')!,
    objectId: txt('OBJECT_ID')!,
    centerName: 'SUN',
    refFrame: frame as 'ICRF' | 'EME2000',
    timeSystem: ts as 'TDB' | 'UTC',
    epochText: epochText!,
    epoch,
    epochTdbDays,
    positionKm,
    velocityKmS,
    keplerian,
    covarianceKm,
    nonGrav,
    hMagnitude: h ?? null,
    albedo: albedo ?? null,
    comments,
    warnings,
  };
}
