/**
 * End-to-end tests of the engine CLI (issue 3 item 8): each case spawns the real process and reads its stdout,
 * stderr and exit code. One case uses the exact documented invocation `npm run -s engine -- ...`; the others start
 * `node --import tsx server/engine/cli.ts ...` (the same entry point without npm's start-up cost).
 */
import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { AU_KM, DAY_S, GM_AU3_D2, GM_KM3_S2, J2000_JD } from '../../server/engine/constants';
import { seriesState } from '../../server/engine/ephemeris';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { parseEpoch, utcFromTdbDays } from '../../server/engine/time';
import { propagateKepler } from '../../server/engine/twobody';
import { readFileSync } from 'node:fs';

interface Run {
  stdout: string;
  stderr: string;
  code: number;
}

function spawnCli(args: string[], viaNpm = false): Promise<Run> {
  const [cmd, argv] = viaNpm
    ? ['npm', ['run', '-s', 'engine', '--', ...args]]
    : [process.execPath, ['--import', 'tsx', 'server/engine/cli.ts', ...args]];
  return new Promise((resolve) => {
    execFile(cmd, argv, { cwd: process.cwd(), timeout: 60_000 }, (err, stdout, stderr) => {
      const code = err ? (typeof (err as NodeJS.ErrnoException & { code?: unknown }).code === 'number' ? (err as unknown as { code: number }).code : 1) : 0;
      resolve({ stdout, stderr, code });
    });
  });
}

const ALPHA = 'tests/reference/orbits/exercise-alpha.opm';
const CHARLIE = 'tests/reference/orbits/exercise-charlie-hyperbolic.json';
const ECHO = 'tests/reference/orbits/exercise-echo.json';

const tmp = mkdtempSync(join(tmpdir(), 'tocsin-cli-'));
const BAD_OPM = join(tmp, 'bad.opm');
writeFileSync(BAD_OPM, readFileSync(ALPHA, 'utf8').replace('CENTER_NAME = SUN', 'CENTER_NAME = EARTH'));

const CASES: Record<string, { args: string[]; viaNpm?: boolean }> = {
  ephEarth: { args: ['ephemeris', '--body', 'earth', '--at', 'JD:2462502.5'], viaNpm: true },
  ephMoon: { args: ['ephemeris', '--body', 'moon', '--at', '2030-01-01T00:00:00Z', '--center', 'earth'] },
  propTwoBody: { args: ['propagate', ALPHA, '--to', 'TDB:2031-06-09T00:00:00', '--model', 'two-body'] },
  propNBody: { args: ['propagate', ALPHA, '--to', 'TDB:2031-06-09T00:00:00'] },
  approaches: { args: ['approaches', ECHO, '--until', 'TDB:2031-04-10T00:00:00', '--max-au', '0.05', '--body', 'earth'] },
  classifyCharlie: { args: ['classify', CHARLIE] },
  classifyAlpha: { args: ['classify', ALPHA] },
  help: { args: ['help'] },
  // errors
  noCommand: { args: [] },
  unknownCommand: { args: ['orbit'] },
  badEpoch: { args: ['ephemeris', '--body', 'earth', '--at', '2030-01-01'] },
  unknownOption: { args: ['classify', CHARLIE, '--verbose', 'yes'] },
  badMaxAu: { args: ['approaches', ECHO, '--until', 'TDB:2031-04-10T00:00:00', '--max-au', 'lots'] },
  missingFile: { args: ['classify', join(tmp, 'missing.json')] },
  invalidOpm: { args: ['classify', BAD_OPM] },
  pre1972: { args: ['propagate', ALPHA, '--to', '1969-07-20T20:17:40Z'] },
  assess: { args: ['assess', ALPHA] },
  fit: { args: ['fit'] },
};

const results: Record<string, Run> = {};

beforeAll(async () => {
  // a small pool: the machine has two cores shared with other work
  const names = Object.keys(CASES);
  let next = 0;
  const worker = async () => {
    while (next < names.length) {
      const name = names[next++];
      results[name] = await spawnCli(CASES[name].args, CASES[name].viaNpm);
    }
  };
  await Promise.all([worker(), worker(), worker()]);
}, 180_000);

function ok(name: string) {
  const r = results[name];
  expect(r.code, r.stderr).toBe(0);
  expect(r.stderr).toBe('');
  // exactly one JSON document on stdout
  expect(r.stdout.trim().split('\n')).toHaveLength(1);
  return JSON.parse(r.stdout);
}

function fails(name: string, code: string, exit: number) {
  const r = results[name];
  expect(r.code).toBe(exit);
  expect(r.stdout).toBe('');
  const doc = JSON.parse(r.stderr);
  expect(Object.keys(doc)).toEqual(['error']);
  expect(doc.error.code).toBe(code);
  expect(typeof doc.error.message).toBe('string');
  expect(doc.error.message.length).toBeGreaterThan(10);
  return doc.error;
}

describe('engine CLI: valid runs print one JSON document with the fixed keys', () => {
  it('ephemeris (run through npm run -s engine): heliocentric Earth equals the full series in km', () => {
    const out = ok('ephEarth');
    expect(Object.keys(out)).toEqual(['body', 'center', 'frame', 'epochTdbJd', 'positionKm', 'velocityKmS']);
    expect(out).toMatchObject({ body: 'earth', center: 'sun', frame: 'ICRF', epochTdbJd: 2462502.5 });
    const s = seriesState('earth', 2462502.5 - J2000_JD);
    for (let k = 0; k < 3; k++) {
      expect(out.positionKm[k]).toBeCloseTo(s.positionAu[k] * AU_KM, 3);
      expect(out.velocityKmS[k]).toBeCloseTo((s.velocityAuD[k] * AU_KM) / DAY_S, 9);
    }
  });

  it('ephemeris --center earth for the Moon: geocentric distance inside the lunar range 356,000–407,000 km (common knowledge)', () => {
    const out = ok('ephMoon');
    expect(out.center).toBe('earth');
    const d = Math.hypot(...(out.positionKm as number[]));
    expect(d).toBeGreaterThan(356_000);
    expect(d).toBeLessThan(407_000);
    expect(out.epochTdbJd).toBeCloseTo(J2000_JD + parseEpoch('2030-01-01T00:00:00Z').tdbDays, 9);
  });

  it('propagate --model two-body agrees with the universal-variable Kepler solution (independent code) to 1 m', () => {
    const out = ok('propTwoBody');
    expect(Object.keys(out)).toEqual(['object', 'model', 'epochTdbJd', 'center', 'frame', 'positionKm', 'velocityKmS', 'impact']);
    expect(out).toMatchObject({ object: 'X31-ALPHA', model: 'two-body', center: 'sun', frame: 'ICRF', impact: null });
    const orbit = loadOrbitSolution(readFileSync(ALPHA, 'utf8'));
    const to = parseEpoch('TDB:2031-06-09T00:00:00').tdbDays;
    expect(out.epochTdbJd).toBe(J2000_JD + to);
    const k = propagateKepler(orbit.positionAu, orbit.velocityAuD, to - orbit.epochTdbDays, GM_AU3_D2.sun);
    const dKm = Math.hypot(...k.r.map((x, i) => x * AU_KM - out.positionKm[i]));
    expect(dKm).toBeLessThan(1e-3);
  });

  it('propagate (n-body, default) differs from two-body by planetary perturbations, but not wildly (100 days)', () => {
    const nb = ok('propNBody');
    const tb = ok('propTwoBody');
    expect(nb.model).toBe('n-body');
    const dKm = Math.hypot(...(nb.positionKm as number[]).map((x, i) => x - tb.positionKm[i]));
    expect(dKm).toBeGreaterThan(1); // perturbations are real
    expect(dKm).toBeLessThan(1e6); // but small over 100 days for a body that stays > 0.05 AU from planets
  });

  it('approaches: one Earth encounter with the fixed keys, utc from the time module, b-plane consistent with the hyperbola', () => {
    const out = ok('approaches');
    expect(Object.keys(out)).toEqual(['object', 'approaches']);
    expect(out.object).toBe('X31-ECHO');
    expect(out.approaches).toHaveLength(1);
    const a = out.approaches[0];
    expect(Object.keys(a)).toEqual(['body', 'epochTdbJd', 'utc', 'utcPredicted', 'distanceKm', 'relativeSpeedKmS', 'vInfinityKmS', 'bPlane', 'impact']);
    expect(Object.keys(a.bPlane)).toEqual(['xiKm', 'zetaKm']);
    expect(a.body).toBe('earth');
    expect(a.impact).toBe(false);
    // the fixture was built to pass ~48,000 km from the Earth 15 days after its epoch (JD 2462926.5 + 15)
    expect(Math.abs(a.epochTdbJd - 2462941.5)).toBeLessThan(0.05);
    expect(a.distanceKm).toBeGreaterThan(40_000);
    expect(a.distanceKm).toBeLessThan(60_000);
    const u = utcFromTdbDays(a.epochTdbJd - J2000_JD);
    expect(a.utc).toBe(u.utc);
    expect(a.utcPredicted).toBe(true);
    // two-body hyperbola about the Earth: periapsis r_p = (μ/v∞²)(√(1 + b²v∞⁴/μ²) − 1) (standard b-plane geometry,
    // e.g. Valsecchi et al. 2003); the actual minimum includes solar tides, so allow 1 %
    const mu = GM_KM3_S2.earth;
    const b = Math.hypot(a.bPlane.xiKm, a.bPlane.zetaKm);
    const v2 = a.vInfinityKmS ** 2;
    const rp = (mu / v2) * (Math.sqrt(1 + (b * b * v2 * v2) / (mu * mu)) - 1);
    expect(Math.abs(rp / a.distanceKm - 1)).toBeLessThan(0.01);
    // and energy: v² at periapsis = v∞² + 2μ/r
    expect(Math.abs(a.relativeSpeedKmS ** 2 / (v2 + (2 * mu) / a.distanceKm) - 1)).toBeLessThan(0.01);
  });

  it('classify: the element covariance of the hyperbolic sample gives back its σ_e = 1e-4 (JSON -> Cartesian -> σ_e)', () => {
    const out = ok('classifyCharlie');
    expect(Object.keys(out)).toEqual(['object', 'eccentricity', 'eccentricitySigma', 'unboundSignificance', 'bound', 'vInfinityKmS', 'perihelionAu']);
    expect(out.eccentricity).toBeCloseTo(1.0008, 10);
    expect(out.eccentricitySigma / 1e-4).toBeCloseTo(1, 5);
    expect(out.unboundSignificance).toBeCloseTo(8, 3);
    expect(out.bound).toBe(false);
    expect(out.perihelionAu).toBeCloseTo(1.8, 10);
    // v∞ = √(μ(e − 1)/q) (METHODS §3.5)
    expect(out.vInfinityKmS).toBeCloseTo((Math.sqrt((GM_AU3_D2.sun * 0.0008) / 1.8) * AU_KM) / DAY_S, 6);
  });

  it('classify: a bound orbit has null v∞', () => {
    const out = ok('classifyAlpha');
    expect(out.bound).toBe(true);
    expect(out.vInfinityKmS).toBeNull();
    expect(out.eccentricity).toBeCloseTo(0.34, 8);
    expect(out.unboundSignificance).toBeLessThan(0);
  });

  it('help lists the commands, including the reserved assess and fit', () => {
    const out = ok('help');
    expect(Object.keys(out.commands)).toEqual(expect.arrayContaining(['ephemeris', 'propagate', 'approaches', 'classify', 'assess', 'fit']));
  });
});

describe('engine CLI: errors are JSON on stderr with a non-zero exit', () => {
  it('usage errors exit 2', () => {
    expect(fails('noCommand', 'USAGE', 2).message).toMatch(/no command given.*Usage/);
    expect(fails('unknownCommand', 'USAGE', 2).message).toMatch(/unknown command "orbit"/);
    expect(fails('unknownOption', 'USAGE', 2).message).toMatch(/--verbose/);
    expect(fails('badMaxAu', 'USAGE', 2).message).toMatch(/--max-au/);
  });
  it('a malformed epoch exits 2 and lists the accepted forms', () => {
    const e = fails('badEpoch', 'INVALID_EPOCH', 2);
    expect(e.message).toContain('TDB:2030-01-01T00:00:00');
    expect(e.message).toContain('JD:2462502.5');
  });
  it('file and input errors exit 1; invalid input carries the line-numbered issues', () => {
    fails('missingFile', 'FILE_NOT_READABLE', 1);
    const e = fails('invalidOpm', 'INVALID_INPUT', 1);
    expect(e.issues[0].where).toMatch(/^line \d+$/);
    expect(e.issues[0].message).toMatch(/CENTER_NAME must be SUN/);
  });
  it('UTC before 1972 is out of range (exit 1)', () => {
    expect(fails('pre1972', 'OUT_OF_RANGE', 1).message).toMatch(/before 1972/);
  });
  it('assess needs --until; fit needs its astrometry file', () => {
    // assess exists since Engine II (issue 4); without --until it is a usage error
    expect(fails('assess', 'USAGE', 2).message).toMatch(/missing --until/);
    // fit exists since issue 8 (tests/unit/od-cli.test.ts); without a file it is a usage error
    expect(fails('fit', 'USAGE', 2).message).toMatch(/missing FILE\.psv/);
  });
});
