// Demo scenario of orbit determination (issue 8 item 9): the seed puts the office's invented observatories and the
// unbound visitor's invented astrometry arc in the database (idempotently), server/index.ts queues one fit with A1
// and A2, and the fit runner computes it with the real engine, so both fits and their comparison are there on the
// first start.
// What is checked against the files themselves (outside the code under test): every data line of
// server/db/demo/hso-26-u1.psv becomes one stored observation (IAU ADES PSV: one observation per data line), every
// observatory of server/db/demo/hspdo-observatories.json is in the table, and the three outliers planted by
// server/db/demo/make-astrometry.ts (3.0", 4.5" and 6.0" off, at 0.2-0.3" noise) are rejected by the chi-square
// rule of METHODS.md §9.1 in both fits.
import fs from 'node:fs';
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { astrometryBatches, observations, observatories, orbitFits, trackedObjects } from '../../server/db/schema';
import { seed } from '../../server/db/seed';
import { parseAdesPsv } from '../../server/engine/od';
import { DEMO_ASTROMETRY_FILE, DEMO_FIT_SETTINGS, DEMO_OBSERVATORIES_FILE, queueDemoFit } from '../../server/services/od/demo';
import { createFitRunner } from '../../server/services/od/fitRunner';
import { orbitDeterminationResultSchema } from '../../shared/schemas/od';
import { startTestServer, type TestServer } from '../helpers/testServer';

const ANALYST = 'analyst@hspdo.example';
let srv: TestServer;
let visitorId: number;

beforeAll(async () => {
  srv = await startTestServer();
  visitorId = srv.db.select().from(trackedObjects).where(eq(trackedObjects.designation, 'HSO-26-U1')).get()!.id;
});
afterAll(() => srv?.close());

const count = (table: typeof observations | typeof astrometryBatches | typeof observatories | typeof orbitFits) => srv.db.select({ n: sql<number>`count(*)` }).from(table).get()!.n;

describe('demo astrometry', () => {
  it('the seed stored every observatory of the file and every data line of the arc, once', async () => {
    const file = JSON.parse(fs.readFileSync(DEMO_OBSERVATORIES_FILE, 'utf8')) as { observatories: { code: string }[] };
    const codes = srv.db.select({ code: observatories.code }).from(observatories).all().map((r) => r.code);
    expect(codes.sort()).toEqual(file.observatories.map((o) => o.code).sort());
    expect(file.observatories.length).toBeGreaterThanOrEqual(3);

    // data lines: not blank, not a header ("#", "!") line, not the column-header line (the first line after a header)
    const lines = fs.readFileSync(DEMO_ASTROMETRY_FILE, 'utf8').split(/\r?\n/);
    let dataLines = 0;
    let afterHeader = false;
    for (const l of lines) {
      const t = l.trim();
      if (t === '') continue;
      if (t.startsWith('#') || t.startsWith('!')) afterHeader = true;
      else if (afterHeader) afterHeader = false; // the column header
      else dataLines++;
    }
    expect(dataLines).toBeGreaterThan(100);
    expect(srv.db.select({ n: sql<number>`count(*)` }).from(observations).where(eq(observations.objectId, visitorId)).get()!.n).toBe(dataLines);
    expect(parseAdesPsv(fs.readFileSync(DEMO_ASTROMETRY_FILE, 'utf8')).observations).toHaveLength(dataLines);

    // a second seed adds nothing
    const before = { obs: count(observations), batches: count(astrometryBatches), sites: count(observatories) };
    expect((await seed(srv.db)).inserted).toBe(0);
    expect({ obs: count(observations), batches: count(astrometryBatches), sites: count(observatories) }).toEqual(before);
  });

  it('the demo fit is queued once (A1, A2), and the real engine finishes it with both fits and the comparison', async () => {
    const id = queueDemoFit(srv.db, srv.services.fits, ANALYST);
    expect(id).not.toBeNull();
    expect(queueDemoFit(srv.db, srv.services.fits, ANALYST)).toBeNull(); // a restart queues nothing new
    expect(count(orbitFits)).toBe(1);
    expect(srv.services.fits.get(id!).settings).toEqual(DEMO_FIT_SETTINGS);
    expect(DEMO_FIT_SETTINGS.nonGravTerms).toEqual(['a1', 'a2']);

    const runner = createFitRunner(srv.db, srv.services.fits, { pollMs: 100, log: () => undefined });
    runner.start();
    try {
      await expect.poll(() => srv.services.fits.get(id!).status, { timeout: 300_000, interval: 200 }).toMatch(/done|failed/);
    } finally {
      await runner.stop();
    }
    const fit = srv.services.fits.get(id!);
    expect(fit.status, fit.error ?? '').toBe('done');
    const result = orbitDeterminationResultSchema.parse(fit.result);
    expect(result.gravityOnly.status).toBe('converged');
    expect(result.nonGrav?.status).toBe('converged');
    expect(result.comparison?.addedParameters).toEqual(['a1', 'a2']);
    expect(result.arc.stations.length).toBeGreaterThanOrEqual(3);
    // The arc was made from version 2 (A1 = 1.6e-7, A2 = 5.5e-8 AU/d², inverse-square law; make-astrometry.ts): the
    // non-gravitational fit recovers A1 within 3 sigma of that truth, detects it (S/N > 3), and the comparison
    // favours it (p < 0.003).
    const truth = JSON.parse(fs.readFileSync(DEMO_ASTROMETRY_FILE.replace('hso-26-u1.psv', 'hso-26-u1.v2.json'), 'utf8')) as { nonGrav: { a1: number; law: string } };
    expect(result.nonGrav!.nonGrav!.law).toBe(truth.nonGrav.law);
    const a1 = result.comparison!.parameterSignificance.find((p) => p.term === 'a1')!;
    expect(Math.abs(a1.valueAuD2 - truth.nonGrav.a1)).toBeLessThan(3 * a1.sigmaAuD2);
    expect(a1.signalToNoise).toBeGreaterThan(3);
    expect(result.comparison!.pValue).toBeLessThan(0.003);
    // The planted outliers (make-astrometry.ts outlierPlan: the 10th observation of HSA, the 6th of HSC, the 15th
    // of HSD, each station's block in time order) are rejected in both fits.
    const parsed = parseAdesPsv(fs.readFileSync(DEMO_ASTROMETRY_FILE, 'utf8')).observations;
    const nth = (stn: string, i: number) => parsed.filter((o) => o.stn === stn)[i];
    const planted = [nth('HSA', 9), nth('HSC', 5), nth('HSD', 14)].filter((o) => o !== undefined);
    expect(planted.length).toBe(3);
    for (const f of [result.gravityOnly, result.nonGrav!]) {
      const rejected = new Set(f.residuals.filter((r) => r.status === 'rejected').map((r) => `${r.stn} ${r.obsTime}`));
      for (const o of planted) expect(rejected.has(`${o.stn} ${o.obsTime}`), `${f.label}: ${o.stn} ${o.obsTime} (line ${o.line})`).toBe(true);
    }
  }, 360_000);
});
