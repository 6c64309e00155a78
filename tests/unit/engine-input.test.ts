import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseOpm, opmEpochToTocsin } from '../../server/engine/input/opm';
import {
  OrbitInputError,
  detectFormat,
  loadOrbitSolution,
  sha256Hex,
  solutionFromOpm,
  solutionFromTocsinJson,
} from '../../server/engine/input/solution';
import { AU_KM, GM_AU3_D2, KMS_TO_AUD } from '../../server/engine/constants';
import { eclipticToEquatorial } from '../../server/engine/frames';
import { parseEpoch } from '../../server/engine/time';
import { cross, norm, type Vec3 } from '../../server/engine/vec';

// Sample OPM written for these tests from the CCSDS 502.0-B-2 (2009) OPM structure (header, metadata, state vector,
// optional Keplerian block, covariance, USER_DEFINED parameters); the object and numbers are invented.
const OPM_PATH = 'tests/reference/orbits/exercise-alpha.opm';
const OPM = readFileSync(OPM_PATH, 'utf8');
const BRAVO = readFileSync('tests/reference/orbits/exercise-bravo.json', 'utf8');
const CHARLIE = readFileSync('tests/reference/orbits/exercise-charlie-hyperbolic.json', 'utf8');

/** Run fn, expect an OrbitInputError, return its issues. */
function issuesOf(fn: () => unknown) {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(OrbitInputError);
    return (err as OrbitInputError).issues;
  }
  throw new Error('expected an OrbitInputError');
}

function lineNo(text: string, re: RegExp): number {
  return text.split('\n').findIndex((l) => re.test(l)) + 1;
}

/** Replace the first line that matches `re` with `replacement` ('' deletes it). */
function edit(text: string, re: RegExp, replacement: string): string {
  const lines = text.split('\n');
  const i = lines.findIndex((l) => re.test(l));
  if (i < 0) throw new Error(`no line matches ${re}`);
  if (replacement === '') lines.splice(i, 1);
  else lines[i] = replacement;
  return lines.join('\n');
}

function expectIssue(text: string, line: number | RegExp, message: RegExp) {
  const issues = issuesOf(() => parseOpm(text));
  const want = typeof line === 'number' ? `line ${line}` : undefined;
  const hit = issues.find((i) => (want ? i.where === want : true) && message.test(i.message));
  expect(hit, JSON.stringify(issues)).toBeTruthy();
  if (line instanceof RegExp) expect(hit!.where).toMatch(line);
}

describe('CCSDS OPM 2.0 KVN parser', () => {
  it('reads the sample message: header, metadata, state, Keplerian block, covariance, user-defined parameters', () => {
    const m = parseOpm(OPM);
    expect(m.version).toBe('2.0');
    expect(m.objectId).toBe('X31-ALPHA');
    expect(m.objectName).toBe('EXERCISE OBJECT ALPHA');
    expect(m.refFrame).toBe('ICRF');
    expect(m.timeSystem).toBe('TDB');
    expect(m.epoch).toBe('TDB:2031-03-01T00:00:00.000');
    expect(m.positionKm).toEqual([-5478114.276101, 149051949.276345, 80001025.080692]);
    expect(m.velocityKmS[2]).toBe(-2.829548087); // no unit on this line: units are optional
    expect(m.keplerian?.trueAnomalyDeg).toBeCloseTo(283.22629147, 8);
    expect(m.covarianceKm?.[0][0]).toBe(14400);
    expect(m.covarianceKm?.[1][0]).toBe(m.covarianceKm?.[0][1]); // lower triangle mirrored
    expect(m.covarianceKm?.[5][5]).toBeCloseTo(
      // CZ_DOT_Z_DOT = L55² + L54² + L53² of the generating factor (2e-5, 3e-6, 2e-6)
      (2e-5) ** 2 + (3e-6) ** 2 + (2e-6) ** 2 + (1e-5) ** 2 + (5e-6) ** 2,
      20,
    );
    expect(m.nonGrav).toEqual({ a1: 0, a2: -2.5e-14, a3: 0, law: 'inverse-square' });
    expect(m.hMagnitude).toBe(21.4);
    expect(m.albedo).toBe(0.14);
    expect(m.comments[0]).toMatch(/CCSDS 502.0-B-2/);
    expect(m.warnings).toEqual([]); // the Keplerian block matches the state vector
  });

  it('converts km, km/s to AU, AU/d and the covariance with the same scale factors', () => {
    const o = solutionFromOpm(OPM);
    expect(o.positionAu[1]).toBe(149051949.276345 / AU_KM);
    expect(o.velocityAuD[0]).toBe(-28.69189289 * KMS_TO_AUD);
    expect(o.covariance!.matrix[0][0]).toBeCloseTo(14400 / AU_KM ** 2, 25);
    expect(o.covariance!.matrix[3][0] / ((2.4e-3 / AU_KM) * KMS_TO_AUD)).toBeCloseTo(1, 12);
    expect(o.epochTdbDays).toBe(parseEpoch('TDB:2031-03-01T00:00:00').tdbDays);
    expect(o.epochTdbJd).toBe(2462926.5);
    expect(o.source.format).toBe('ccsds-opm-kvn');
    expect(o.source.inputSha256).toBe(sha256Hex(OPM));
  });

  it('accepts UTC and day-of-year epochs, including a leap second', () => {
    expect(opmEpochToTocsin('2031-060T00:00:00', 'TDB')).toBe('TDB:2031-03-01T00:00:00');
    expect(opmEpochToTocsin('2016-366T23:59:60.5', 'UTC')).toBe('2016-12-31T23:59:60.5Z');
    const utc = edit(edit(OPM, /^TIME_SYSTEM/, 'TIME_SYSTEM = UTC'), /^EPOCH/, 'EPOCH = 2016-12-31T23:59:60');
    const m = parseOpm(utc);
    expect(m.epoch).toBe('2016-12-31T23:59:60Z');
    expect(m.epochTdbDays).toBe(parseEpoch('2016-12-31T23:59:60Z').tdbDays);
  });

  it('accepts EME2000 and says it is read as ICRF axes', () => {
    const o = solutionFromOpm(edit(OPM, /^REF_FRAME =/, 'REF_FRAME = EME2000'));
    expect(o.notes.join(' ')).toMatch(/EME2000 taken as the ICRF/);
  });

  it('warns (not fails) on a Keplerian block that disagrees with the state, on spacecraft and unknown user-defined keys', () => {
    let t = edit(OPM, /^ECCENTRICITY/, 'ECCENTRICITY = 0.35');
    t = t.replace('USER_DEFINED_H', 'MASS = 1000 [kg]\nUSER_DEFINED_COLOR = RED\nUSER_DEFINED_H');
    const m = parseOpm(t);
    expect(m.warnings.map((w) => w.message).join(' ')).toMatch(/disagree.*ECCENTRICITY/);
    expect(m.warnings.find((w) => /MASS/.test(w.message))!.where).toBe(`line ${lineNo(t, /^MASS/)}`);
    expect(m.warnings.find((w) => /USER_DEFINED_COLOR/.test(w.message))).toBeTruthy();
  });

  describe('every error names the line and the reason', () => {
    it('first keyword, version, malformed line, unknown and duplicate keywords', () => {
      expectIssue(OPM.replace('CCSDS_OPM_VERS = 2.0\n', 'CREATION_DATE = 2031-01-01\nCCSDS_OPM_VERS = 2.0\n'), 1, /first keyword must be CCSDS_OPM_VERS/);
      expectIssue(edit(OPM, /^CCSDS_OPM_VERS/, 'CCSDS_OPM_VERS = 1.0'), 1, /must be 2\.0/);
      expectIssue(OPM.replace('CENTER_NAME = SUN', 'CENTER_NAME = SUN\nthis is not a keyword line'), lineNo(OPM, /^CENTER_NAME/) + 1, /not a "KEYWORD = value" line/);
      expectIssue(OPM.replace('CENTER_NAME = SUN', 'CENTER_NAME = SUN\nFLAVOUR = STRAWBERRY'), lineNo(OPM, /^CENTER_NAME/) + 1, /unknown keyword FLAVOUR/);
      expectIssue(OPM.replace('CENTER_NAME = SUN', 'CENTER_NAME = SUN\nCENTER_NAME = SUN'), lineNo(OPM, /^CENTER_NAME/) + 1, /appears twice \(first on line \d+\)/);
    });
    it('missing required keywords, bad numbers, wrong and unexpected units, empty values', () => {
      expectIssue(edit(OPM, /^Y_DOT/, ''), /^line \d+$/, /required keyword Y_DOT is missing/);
      expectIssue(edit(OPM, /^X =/, 'X = 12,5 [km]'), lineNo(OPM, /^X =/), /X must be a number/);
      expectIssue(edit(OPM, /^X =/, 'X = 1.0 [m]'), lineNo(OPM, /^X =/), /X must be in \[km\], found \[m\]/);
      expectIssue(edit(OPM, /^X_DOT/, 'X_DOT = 1.0 [km/d]'), lineNo(OPM, /^X_DOT/), /must be in \[km\/s\]/);
      expectIssue(edit(OPM, /^CX_DOT_X =/, 'CX_DOT_X = 1.0 [km**2]'), lineNo(OPM, /^CX_DOT_X =/), /must be in \[km\*\*2\/s\]/);
      expectIssue(edit(OPM, /^ECCENTRICITY/, 'ECCENTRICITY = 0.34 [deg]'), lineNo(OPM, /^ECCENTRICITY/), /takes no unit/);
      expectIssue(edit(OPM, /^ORIGINATOR/, 'ORIGINATOR ='), lineNo(OPM, /^ORIGINATOR/), /has no value/);
      // units in the caret spelling are accepted
      expect(() => parseOpm(edit(OPM, /^CX_DOT_X =/, 'CX_DOT_X = 2.4e-3 [km^2/s]'))).not.toThrow();
    });
    it('CENTER_NAME, REF_FRAME, COV_REF_FRAME and TIME_SYSTEM restrictions', () => {
      expectIssue(edit(OPM, /^CENTER_NAME/, 'CENTER_NAME = EARTH'), lineNo(OPM, /^CENTER_NAME/), /CENTER_NAME must be SUN/);
      expectIssue(edit(OPM, /^REF_FRAME =/, 'REF_FRAME = TEME'), lineNo(OPM, /^REF_FRAME =/), /REF_FRAME must be ICRF or EME2000/);
      expectIssue(edit(OPM, /^COV_REF_FRAME/, 'COV_REF_FRAME = RTN'), lineNo(OPM, /^COV_REF_FRAME/), /COV_REF_FRAME must be ICRF or EME2000/);
      expectIssue(edit(OPM, /^TIME_SYSTEM/, 'TIME_SYSTEM = TAI'), lineNo(OPM, /^TIME_SYSTEM/), /TIME_SYSTEM must be TDB or UTC/);
    });
    it('epochs: malformed, Z with TDB, impossible dates, UTC before 1972', () => {
      const ln = lineNo(OPM, /^EPOCH/);
      expectIssue(edit(OPM, /^EPOCH/, 'EPOCH = 01/03/2031'), ln, /EPOCH must be YYYY-MM-DDThh:mm:ss/);
      expectIssue(edit(OPM, /^EPOCH/, 'EPOCH = 2031-03-01T00:00:00Z'), ln, /trailing Z marks UTC/);
      expectIssue(edit(OPM, /^EPOCH/, 'EPOCH = 2031-02-30T00:00:00'), ln, /day 30 does not exist/);
      expectIssue(edit(OPM, /^EPOCH/, 'EPOCH = 2031-366T00:00:00'), ln, /day of year 366 does not exist/);
      const utc = edit(OPM, /^TIME_SYSTEM/, 'TIME_SYSTEM = UTC');
      expectIssue(edit(utc, /^EPOCH/, 'EPOCH = 1969-07-20T20:17:40'), ln, /before 1972/);
      expectIssue(edit(utc, /^EPOCH/, 'EPOCH = 2017-06-30T23:59:60'), ln, /second 60 is only valid/);
    });
    it('incomplete Keplerian block, both anomalies, incomplete or invalid covariance, COV_REF_FRAME alone', () => {
      expectIssue(edit(OPM, /^GM =/, ''), lineNo(OPM, /^SEMI_MAJOR_AXIS/), /Keplerian block is incomplete: missing GM/);
      expectIssue(OPM.replace(/^TRUE_ANOMALY.*$/m, '$&\nMEAN_ANOMALY = 10 [deg]'), lineNo(OPM, /^SEMI_MAJOR_AXIS/), /exactly one of TRUE_ANOMALY or MEAN_ANOMALY/);
      expectIssue(edit(OPM, /^CY_DOT_Z =/, ''), lineNo(OPM, /^CX_X/), /covariance is incomplete: missing CY_DOT_Z/);
      expectIssue(edit(OPM, /^CZ_Z =/, 'CZ_Z = -1 [km**2]'), lineNo(OPM, /^CZ_Z =/), /variance and must be >= 0/);
      let noCov = OPM;
      for (const k of ['CX_X', 'CY_X', 'CY_Y', 'CZ_X', 'CZ_Y', 'CZ_Z']) noCov = edit(noCov, new RegExp(`^${k} =`), '');
      noCov = noCov.replace(/^C[XYZ]_DOT_.*\n/gm, '');
      expectIssue(noCov, lineNo(noCov, /^COV_REF_FRAME/), /COV_REF_FRAME given without the covariance/);
      // not positive semi-definite: a correlation above 1 between X and Y
      const bad = edit(OPM, /^CY_X =/, 'CY_X = 2.0e4 [km**2]');
      const issues = issuesOf(() => solutionFromOpm(bad));
      expect(issues[0].where).toBe(`line ${lineNo(OPM, /^CX_X/)}`);
      expect(issues[0].message).toMatch(/not positive semi-definite/);
    });
    it('manoeuvres, non-gravitational law, H, albedo, zero position', () => {
      expectIssue(OPM.replace('USER_DEFINED_A1', 'MAN_EPOCH_IGNITION = 2031-03-02T00:00:00\nUSER_DEFINED_A1'), lineNo(OPM, /^USER_DEFINED_A1/), /manoeuvre keyword MAN_EPOCH_IGNITION is not supported/);
      expectIssue(edit(OPM, /^USER_DEFINED_NG_LAW/, 'USER_DEFINED_NG_LAW = CO2'), lineNo(OPM, /^USER_DEFINED_NG_LAW/), /WATER-ICE or INVERSE-SQUARE/);
      expectIssue(edit(OPM, /^USER_DEFINED_H/, 'USER_DEFINED_H = 99'), lineNo(OPM, /^USER_DEFINED_H/), /USER_DEFINED_H must be between/);
      expectIssue(edit(OPM, /^USER_DEFINED_ALBEDO/, 'USER_DEFINED_ALBEDO = 1.5'), lineNo(OPM, /^USER_DEFINED_ALBEDO/), /ALBEDO must be in \(0, 1\]/);
      expectIssue(edit(edit(edit(OPM, /^X =/, 'X = 0'), /^Y =/, 'Y = 0'), /^Z =/, 'Z = 0'), lineNo(OPM, /^X =/), /position vector is zero/);
      expect(() => parseOpm('')).toThrow(/empty message/);
    });
    it('collects several problems in one error, in line order', () => {
      const t = edit(edit(OPM, /^CENTER_NAME/, 'CENTER_NAME = MARS'), /^TIME_SYSTEM/, 'TIME_SYSTEM = GPS');
      const issues = issuesOf(() => parseOpm(t));
      expect(issues.map((i) => i.where)).toEqual([`line ${lineNo(OPM, /^CENTER_NAME/)}`, `line ${lineNo(OPM, /^TIME_SYSTEM/)}`]);
    });
  });
});

describe('Tocsin JSON orbit solution', () => {
  it('elements in the J2000 ecliptic give the same ICRF state as the sample OPM (same invented orbit)', () => {
    const a = solutionFromOpm(OPM);
    const b = solutionFromTocsinJson(BRAVO);
    // the OPM rounds positions to 1 mm (7e-12 AU) and velocities to 1e-9 km/s (6e-13 AU/d)
    for (let k = 0; k < 3; k++) {
      expect(Math.abs(a.positionAu[k] - b.positionAu[k])).toBeLessThan(2e-11);
      expect(Math.abs(a.velocityAuD[k] - b.velocityAuD[k])).toBeLessThan(2e-12);
    }
    expect(b.designation).toBe('X31-BRAVO');
    expect(b.kind).toBe('asteroid');
    expect(b.source.inputSha256).toBe(sha256Hex(BRAVO));
    expect(b.covariance!.parameters).toEqual(['x', 'y', 'z', 'vx', 'vy', 'vz']);
  });

  it('maps a tp-only covariance to σ² v vᵀ (analytic: ∂r/∂tp = −v, ∂v/∂tp = −a)', () => {
    const doc = JSON.parse(CHARLIE);
    const sigmaTp = 0.01; // days
    doc.covariance.matrix = doc.covariance.matrix.map((row: number[], i: number) => row.map((_, j) => (i === 5 && j === 5 ? sigmaTp ** 2 : 0)));
    const o = solutionFromTocsinJson(JSON.stringify(doc));
    const v = o.velocityAuD;
    const r = o.positionAu;
    const rn = norm(r);
    const acc: Vec3 = r.map((x) => (-GM_AU3_D2.sun * x) / rn ** 3) as Vec3;
    const C = o.covariance!.matrix;
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        expect(C[i][j] / (sigmaTp ** 2 * v[i] * v[j])).toBeCloseTo(1, 6);
        expect(C[i + 3][j + 3] / (sigmaTp ** 2 * acc[i] * acc[j])).toBeCloseTo(1, 5);
      }
    }
  });

  it('maps a node-only covariance to rotations about the ecliptic pole (analytic: ∂r/∂Ω = k̂ × r)', () => {
    const doc = JSON.parse(BRAVO);
    const sigmaDeg = 1e-3;
    doc.covariance.matrix = doc.covariance.matrix.map((row: number[], i: number) => row.map((_, j) => (i === 3 && j === 3 ? sigmaDeg ** 2 : 0)));
    const o = solutionFromTocsinJson(JSON.stringify(doc));
    const pole = eclipticToEquatorial([0, 0, 1]);
    const dr = cross(pole, o.positionAu).map((x) => x * (sigmaDeg * Math.PI) / 180);
    const C = o.covariance!.matrix;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
      if (Math.abs(dr[i] * dr[j]) > 1e-22) expect(C[i][j] / (dr[i] * dr[j])).toBeCloseTo(1, 6);
    }
  });

  it('Cartesian input with non-gravitational covariance rows keeps them in the standard order', () => {
    const params = ['a2', 'x', 'y', 'z', 'vx', 'vy', 'vz'];
    const diag = [4e-30, 1e-12, 2e-12, 3e-12, 1e-16, 2e-16, 3e-16];
    const o = solutionFromTocsinJson(
      JSON.stringify({
        designation: 'X31-DELTA',
        epoch: 'JD:2462926.5',
        cartesian: { positionAu: [1, 0.2, 0.1], velocityAuD: [0, 0.017, 0.001] },
        nonGrav: { a1: 0, a2: 2e-14, a3: 0 },
        covariance: { parameters: params, matrix: diag.map((d, i) => diag.map((_, j) => (i === j ? d : 0))) },
      }),
    );
    expect(o.covariance!.parameters).toEqual(['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2']);
    expect(o.covariance!.matrix[6][6]).toBe(4e-30);
    expect(o.covariance!.matrix[1][1]).toBe(2e-12);
    expect(o.nonGrav).toEqual({ a1: 0, a2: 2e-14, a3: 0, law: 'water-ice' }); // default law
  });

  describe('every error names the field (or line) and the reason', () => {
    const base = () => JSON.parse(BRAVO);
    const cases: Array<[string, (d: any) => unknown, RegExp, RegExp]> = [
      ['missing designation', (d) => (delete d.designation, d), /^field designation$/, /./],
      ['both state forms', (d) => ({ ...d, cartesian: { positionAu: [1, 0, 0], velocityAuD: [0, 0.017, 0] } }), /^field cartesian$/, /exactly one of cartesian or elements/],
      ['no state', (d) => (delete d.elements, delete d.covariance, d), /^field cartesian$/, /exactly one of cartesian or elements/],
      ['epoch form', (d) => ({ ...d, epoch: '2031-03-01' }), /^field epoch$/, /"TDB:2030-01-01T00:00:00"/],
      ['epoch before 1972 UTC', (d) => ({ ...d, epoch: '1970-01-01T00:00:00Z' }), /^field epoch$/, /before 1972/],
      ['impossible date', (d) => ({ ...d, epoch: 'TDB:2031-02-29T00:00:00' }), /^field epoch$/, /does not exist/],
      ['negative eccentricity', (d) => ((d.elements.eccentricity = -0.1), d), /^field elements\.eccentricity$/, /must be >= 0/],
      ['two timings', (d) => ((d.elements.perihelionTime = 'TDB:2031-01-01T00:00:00'), d), /^field elements\.perihelionTime$/, /exactly one of perihelionTime or meanAnomalyDeg/],
      ['mean anomaly on a parabola', (d) => ((d.elements.eccentricity = 1), d), /^field elements\.meanAnomalyDeg$/, /undefined for e = 1/],
      ['matrix size', (d) => (d.covariance.matrix.pop(), d), /^field covariance\.matrix$/, /must have 6 rows/],
      ['row size', (d) => (d.covariance.matrix[2].pop(), d), /^field covariance\.matrix\[2\]$/, /row 2 must have 6 entries/],
      ['asymmetric', (d) => ((d.covariance.matrix[1][0] = 3e-15), d), /^field covariance\.matrix\[1\]\[0\]$/, /not symmetric/],
      ['negative variance', (d) => ((d.covariance.matrix[2][2] = -1), d), /^field covariance\.matrix\[2\]\[2\]$/, />= 0/],
      ['unknown parameter name', (d) => ((d.covariance.parameters[0] = 'semimajor'), d), /^field covariance\.parameters\[0\]$/, /./],
      ['parameter of the other representation', (d) => ((d.covariance.parameters[5] = 'vx'), d), /^field covariance\.parameters/, /does not belong|must include/],
      ['a1 without nonGrav', (d) => {
        d.covariance.parameters.push('a1');
        d.covariance.matrix = [...d.covariance.matrix.map((r: number[]) => [...r, 0]), [0, 0, 0, 0, 0, 0, 1e-30]];
        return d;
      }, /^field covariance\.parameters\[6\]$/, /needs nonGrav/],
      ['albedo', (d) => ({ ...d, albedo: 2 }), /^field albedo$/, /\(0, 1\]/],
      ['unknown field', (d) => ({ ...d, colour: 'red' }), /^document$/, /colour/],
      ['not positive semi-definite', (d) => ((d.covariance.matrix[0][1] = d.covariance.matrix[1][0] = 1e-13), d), /^field covariance\.matrix$/, /not positive semi-definite/],
      ['malformed perihelionTime epoch', (d) => {
        delete d.elements.meanAnomalyDeg;
        d.elements.perihelionTime = 'JD:24x';
        delete d.covariance;
        return d;
      }, /^field elements\.perihelionTime$/, /epoch must be/],
    ];
    for (const [name, mutate, where, message] of cases) {
      it(name, () => {
        const issues = issuesOf(() => solutionFromTocsinJson(JSON.stringify(mutate(base()))));
        const hit = issues.find((i) => where.test(i.where) && message.test(i.message));
        expect(hit, JSON.stringify(issues)).toBeTruthy();
      });
    }
    it('JSON syntax errors name the line', () => {
      const broken = BRAVO.replace('"kind": "asteroid",', '"kind": "asteroid"');
      const issues = issuesOf(() => solutionFromTocsinJson(broken));
      expect(issues[0].where).toMatch(/^line \d+$/);
      expect(Number(issues[0].where.slice(5))).toBeGreaterThanOrEqual(lineNo(BRAVO, /"kind"/));
      expect(issues[0].message).toMatch(/not valid JSON/);
    });
  });
});

describe('format detection and hashing', () => {
  it('detects OPM and JSON, refuses anything else naming the accepted formats', () => {
    expect(detectFormat(OPM)).toBe('ccsds-opm-kvn');
    expect(detectFormat(`COMMENT leading comment\n${OPM}`)).toBe('ccsds-opm-kvn');
    expect(detectFormat(BRAVO)).toBe('tocsin-json');
    const issues = issuesOf(() => loadOrbitSolution('<xml/>'));
    expect(issues[0]).toEqual({ where: 'line 1', message: expect.stringMatching(/CCSDS OPM in KVN form.*Tocsin JSON/) });
  });
  it('SHA-256 of "abc" is the FIPS 180-2 example digest', () => {
    // FIPS 180-2, Appendix B.1 (SHA-256 of "abc")
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});
