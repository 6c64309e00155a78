/**
 * The engine CLI `fit` command (issue 8 item 7): `npm run -s engine -- fit FILE.psv --observatories FILE.json
 * [--nongrav A1,A2] [--epoch EPOCH]` prints one JSON document; errors are JSON on stderr with exit 2 (usage) or 1.
 * Most cases call runCli in-process (the same function the entry point runs); one spawns the documented command.
 */
import { execFile } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { fitComparisonSchema, fitResultSchema, type Observatory } from '../../shared/schemas/od';
import { orbitSolutionInputSchema } from '../../shared/schemas/orbit';
import { runCli } from '../../server/engine/cli';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { syntheticPsv, testOrbit, TEST_T0 } from '../helpers/odSynthetic';

const T0 = TEST_T0;
const OBSERVATORIES: Observatory[] = [
  { code: 'TQA', name: 'Test site A', longitudeDeg: 10, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: 45, heightM: 500 },
  { code: 'TQB', name: 'Test site B', longitudeDeg: 250, rhoCosPhi: 0.86, rhoSinPhi: -0.5, geodeticLatitudeDeg: null, heightM: null },
];

const tmp = mkdtempSync(join(tmpdir(), 'tocsin-od-cli-'));
const PSV = join(tmp, 'arc.psv');
const OBS_JSON = join(tmp, 'observatories.json');
const BAD_PSV = join(tmp, 'bad.psv');
const DEMO_PSV = 'server/db/demo/hso-26-u1.psv';
const DEMO_OBS = 'server/db/demo/hspdo-observatories.json';

beforeAll(() => {
  const times: number[] = [];
  for (let n = 0; n < 8; n++) for (let k = 0; k < 3; k++) times.push(T0 - 15 + n * 4 + 0.3 + k * 0.014);
  const psv = syntheticPsv({
    designation: 'TEST-CLI',
    orbit: testOrbit(),
    observatories: OBSERVATORIES,
    timesTdbDays: times,
    noiseArcsec: 0.4,
    seed: 12,
    outliers: [{ index: 7, offsetArcsec: 9 }],
  });
  writeFileSync(PSV, psv);
  writeFileSync(OBS_JSON, JSON.stringify({ observatories: OBSERVATORIES }));
  // two malformed data lines: a Dec out of range and a month 13 (columns provID|mode|stn|obsTime|ra|dec|...)
  const lines = psv.trimEnd().split('\n');
  const header = lines.findIndex((l) => l.startsWith('provID|'));
  const bad = [...lines];
  const f1 = bad[header + 1].split('|');
  f1[5] = '95.0';
  bad[header + 1] = f1.join('|');
  const f3 = bad[header + 3].split('|');
  f3[3] = '2030-13-05T00:00:00.000Z';
  bad[header + 3] = f3.join('|');
  writeFileSync(BAD_PSV, `${bad.join('\n')}\n`);
});

async function ok(args: string[]) {
  const r = await runCli(args);
  if (r.exitCode !== 0) throw new Error(`exit ${r.exitCode}: ${r.stderr}`);
  expect(r.stderr).toBe('');
  return JSON.parse(r.stdout);
}

async function fails(args: string[], code: string, exit: number) {
  const r = await runCli(args);
  expect(r.exitCode).toBe(exit);
  expect(r.stdout).toBe('');
  const e = JSON.parse(r.stderr).error;
  expect(e.code).toBe(code);
  return e;
}

describe('engine CLI fit (issue 8 item 7)', () => {
  it(
    'gravity-only: one JSON document with the solution, covariance, RMS and every residual; the solution loads back',
    async () => {
      const out = await ok(['fit', PSV, '--observatories', OBS_JSON, '--epoch', 'JD:2462495.5']);
      expect(out.object).toBe('TEST-CLI');
      expect(out.chosen).toBe('gravity-only');
      expect(fitResultSchema.safeParse(out.fit).success).toBe(true);
      expect(out.fit.status).toBe('converged');
      expect(out.fit.residuals).toHaveLength(24);
      expect(out.fit.covariance).toHaveLength(6);
      expect(out.fit.epochTdbJd).toBe(2462495.5);
      // the planted 9" outlier (22 sigma) is rejected by the chi-square rule
      expect(out.fit.residuals[7].status).toBe('rejected');
      expect(out.fit.rmsNormalized).toBeGreaterThan(0.5);
      expect(out.fit.rmsNormalized).toBeLessThan(1.5);
      expect(out.gravityOnly).toBeNull();
      expect(out.comparison).toBeNull();
      expect(out.caution).toMatch(/analysis aids/);
      expect(orbitSolutionInputSchema.safeParse(out.solution).success).toBe(true);
      const back = loadOrbitSolution(JSON.stringify(out.solution));
      expect(back.positionAu).toEqual(out.fit.positionAu);
      expect(back.epochTdbDays).toBeCloseTo(T0, 9);
    },
    120_000,
  );

  it(
    '--nongrav A2: the non-gravitational fit is the chosen solution and the comparison is included',
    async () => {
      const out = await ok(['fit', PSV, '--observatories', OBS_JSON, '--nongrav', 'A2', '--law', 'inverse-square']);
      expect(out.chosen).toBe('non-gravitational');
      expect(out.fit.parameters).toEqual(['x', 'y', 'z', 'vx', 'vy', 'vz', 'a2']);
      expect(out.fit.nonGrav.law).toBe('inverse-square');
      expect(fitResultSchema.safeParse(out.gravityOnly).success).toBe(true);
      expect(fitComparisonSchema.safeParse(out.comparison).success).toBe(true);
      // the arc was made without non-grav forces: the gravity-only fit stays adequate
      expect(out.comparison.parameterSignificance[0].signalToNoise).toBeLessThan(3);
      expect(out.solution.nonGrav.a2).toBe(out.fit.nonGrav.a2);
      expect(out.solution.covariance.parameters).toContain('a2');
    },
    120_000,
  );

  it(
    '--station-sigma: the residuals of the named station carry the analyst sigma; an unknown station is a warning',
    async () => {
      const out = await ok(['fit', PSV, '--observatories', OBS_JSON, '--epoch', 'JD:2462495.5', '--station-sigma', 'TQA=1.2, TQZ=3']);
      expect(out.fit.status).toBe('converged');
      // three per night: no nightly de-weighting, so the sigma is exactly the given one (synthetic rms is 0.4")
      for (const r of out.fit.residuals) {
        expect([r.sigmaRaArcsec, r.sigmaDecArcsec]).toEqual(r.stn === 'TQA' ? [1.2, 1.2] : [0.4, 0.4]);
      }
      expect(out.warnings.filter((w: string) => w.includes('TQZ'))).toHaveLength(1);
    },
    120_000,
  );

  it('usage errors exit 2; bad ADES lines and observatory files exit 1 with their line/field issues', async () => {
    expect((await fails(['fit', PSV], 'USAGE', 2)).message).toMatch(/missing --observatories/);
    expect((await fails(['fit', PSV, '--observatories', OBS_JSON, '--nongrav', 'A4'], 'USAGE', 2)).message).toMatch(/--nongrav/);
    expect((await fails(['fit', PSV, '--observatories', OBS_JSON, '--epoch', '2030-01-01'], 'INVALID_EPOCH', 2)).message).toMatch(/JD:/);
    // malformed --station-sigma values are usage errors naming what is wrong
    for (const [value, why] of [
      ['TQA', /not STN=ARCSEC/],
      ['TQA=0', /TQA.*\(0, 60\]/],
      ['TQA=61', /TQA.*\(0, 60\]/],
      ['TQA=abc', /TQA.*"abc"/],
      ['TQA=1,TQA=2', /TQA is given twice/],
      ['T-Q=1', /not STN=ARCSEC/],
      ['TQA=1,', /not STN=ARCSEC/],
    ] as const) {
      expect((await fails(['fit', PSV, '--observatories', OBS_JSON, '--station-sigma', value], 'USAGE', 2)).message).toMatch(why);
    }
    await fails(['fit', join(tmp, 'nope.psv'), '--observatories', OBS_JSON], 'FILE_NOT_READABLE', 1);
    const bad = await fails(['fit', BAD_PSV, '--observatories', OBS_JSON], 'INVALID_INPUT', 1);
    expect(bad.issues.length).toBeGreaterThanOrEqual(2);
    expect(bad.issues.some((i: { where: string }) => /^line \d+, field dec$/.test(i.where))).toBe(true);
    expect(bad.issues.some((i: { where: string }) => /^line \d+, field obsTime$/.test(i.where))).toBe(true);
    const badObs = join(tmp, 'badobs.json');
    writeFileSync(badObs, JSON.stringify({ observatories: [{ code: 'TQA', name: 'x', longitudeDeg: 400 }] }));
    const e = await fails(['fit', PSV, '--observatories', badObs], 'INVALID_INPUT', 1);
    expect(e.issues.some((i: { where: string; message: string }) => /longitudeDeg/.test(i.where) && /Longitude/.test(i.message))).toBe(true);
    // an observatory missing from the table: the fit refuses with the code
    const oneObs = join(tmp, 'oneobs.json');
    writeFileSync(oneObs, JSON.stringify({ observatories: [OBSERVATORIES[0]] }));
    expect((await fails(['fit', PSV, '--observatories', oneObs], 'INVALID_INPUT', 1)).message).toMatch(/TQB/);
  });

  it.skipIf(!existsSync(DEMO_PSV) || !existsSync(DEMO_OBS))(
    'the documented invocation on the demo arc of HSO-26-U1 prints valid JSON (unbound orbit, both fits)',
    async () => {
      const run = await new Promise<{ stdout: string; stderr: string; code: number }>((resolve) => {
        execFile('npm', ['run', '-s', 'engine', '--', 'fit', DEMO_PSV, '--observatories', DEMO_OBS, '--nongrav', 'A1,A2'], { cwd: process.cwd(), timeout: 300_000, maxBuffer: 64 << 20 }, (err, stdout, stderr) => {
          resolve({ stdout, stderr, code: err ? 1 : 0 });
        });
      });
      expect(run.code, run.stderr).toBe(0);
      const out = JSON.parse(run.stdout);
      expect(out.object).toBe('HSO-26-U1');
      expect(fitResultSchema.safeParse(out.fit).success).toBe(true);
      expect(fitResultSchema.safeParse(out.gravityOnly).success).toBe(true);
      expect(fitComparisonSchema.safeParse(out.comparison).success).toBe(true);
      // the demo visitor is hyperbolic: e > 1 with a large unbound significance in both fits (METHODS §3.5)
      expect(out.gravityOnly.elements.eccentricity.value).toBeGreaterThan(1);
      expect(out.gravityOnly.unboundSignificance).toBeGreaterThan(10);
      expect(out.gravityOnly.encounter.body).toBe('earth');
    },
    300_000,
  );
});
