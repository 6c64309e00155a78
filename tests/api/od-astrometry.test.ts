// Orbit determination, server side (issue 8 items 1 and 9): the office's observatory table (admin manages, the
// analysis side reads, 409 on removing one in use, 422 with zod's messages), astrometry uploads in IAU ADES PSV
// (all or nothing, every bad line named, unknown observatories refused, duplicates of stored observations skipped)
// and the analyst's manual exclusion. Real server through tests/helpers/testServer.ts.
// Status codes: RFC 9110 §15.3.2 (201), §15.5.4 (403), §15.5.10 (409), §15.5.21 (422 Unprocessable Content).
// ADES PSV layout (version line, header groups, "|"-separated column header and data lines; obsTime in ISO 8601
// UTC, ra/dec in degrees, rmsRA/rmsDec in arcsec): the IAU ADES description, as summarised in METHODS.md §9.5.
import { eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { astrometryBatches, observations, trackedObjects } from '../../server/db/schema';
import { errorBodySchema } from '../../shared/schemas/errors';
import { astrometryListSchema, observatoryRowSchema, storedObservationSchema, uploadAstrometryResultSchema } from '../../shared/schemas/odApi';
import { DEMO_USERS, startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';
import { signedIn } from './signedIn';

let srv: TestServer;
const as: Record<string, ApiClient> = {};
let objectId: number;
let designation: string;

// Codes of this test only (not the demo office's): the table starts with whatever the seed put there.
const SITE_A = { code: 'TQA', name: 'Test site A (invented)', longitudeDeg: 10.5, rhoCosPhi: 0.6, rhoSinPhi: 0.79, geodeticLatitudeDeg: null, heightM: null };
const SITE_B = { code: 'TQB', name: 'Test site B (invented)', longitudeDeg: 300.25, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -30.2, heightM: 2200 };

beforeAll(async () => {
  srv = await startTestServer();
  Object.assign(as, await signedIn(srv.url));
  const obj = srv.db.select().from(trackedObjects).where(eq(trackedObjects.designation, 'HSO-26-N4')).get()!;
  objectId = obj.id;
  designation = obj.designation;
});
afterAll(() => srv?.close());

/** A small ADES PSV file: one data line per row, columns padded as ADES allows. */
function psv(rows: { stn: string; obsTime: string; ra: string; dec: string; provID?: string; extra?: string }[]): string {
  const head = ['# version=2022', '# observatory', '! mpcCode TQA', '# submitter', '! name Test submitter (invented)'];
  const columns = 'permID |provID     |trkSub |mode|stn |obsTime                 |ra          |dec         |rmsRA|rmsDec|astCat|mag  |band';
  const lines = rows.map((r) => `       |${(r.provID ?? designation).padEnd(11)}|       |CCD |${r.stn.padEnd(4)}|${r.obsTime}|${r.ra.padEnd(12)}|${r.dec.padEnd(12)}|0.35 |0.30  |Gaia3 |19.8 |G`);
  return [...head, columns, ...lines, ''].join('\n');
}
/** Data lines start after the 5 header lines and the column header: row i is on line 7 + i. */
const lineOfRow = (i: number) => 7 + i;

const GOOD_ROWS = [
  { stn: 'TQA', obsTime: '2026-09-01T01:00:00.000Z', ra: '150.100000', dec: '10.200000' },
  { stn: 'TQA', obsTime: '2026-09-01T01:30:00.000Z', ra: '150.110000', dec: '10.210000' },
  { stn: 'TQB', obsTime: '2026-09-03T04:00:00.000Z', ra: '150.400000', dec: '10.500000' },
  { stn: 'TQB', obsTime: '2026-09-05T04:00:00.000Z', ra: '150.700000', dec: '10.800000' },
];

const post = (client: ApiClient, body: unknown) => client.request('POST', `/api/objects/${objectId}/astrometry`, { body });
const counts = () => ({
  batches: srv.db.select({ n: sql<number>`count(*)` }).from(astrometryBatches).where(eq(astrometryBatches.objectId, objectId)).get()!.n,
  observations: srv.db.select({ n: sql<number>`count(*)` }).from(observations).where(eq(observations.objectId, objectId)).get()!.n,
});

async function multipart(client: ApiClient, parts: { text: string; name: string; field?: string }) {
  const form = new FormData();
  form.append(parts.field ?? 'file', new Blob([parts.text]), parts.name);
  const res = await fetch(`${srv.url}/api/objects/${objectId}/astrometry`, {
    method: 'POST',
    headers: { cookie: client.cookieHeader(), 'x-csrf-token': client.csrfToken ?? (await client.fetchCsrf()), accept: 'application/json' },
    body: form,
  });
  return { status: res.status, body: (await res.json()) as any };
}

describe('observatories', () => {
  it('the administrator adds them (201); a second one with the same code is 409', async () => {
    for (const site of [SITE_A, SITE_B]) {
      const res = await as.admin.request('POST', '/api/observatories', { body: site });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(observatoryRowSchema.parse(res.body)).toMatchObject({ ...site, observationCount: 0 });
    }
    const again = await as.admin.request('POST', '/api/observatories', { body: { ...SITE_A, name: 'Other' } });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toContain('TQA');
  });

  it('bad fields are 422 with zod\'s messages, field by field', async () => {
    const res = await as.admin.request('POST', '/api/observatories', { body: { ...SITE_A, code: 'TQX', longitudeDeg: 400 } });
    expect(res.status).toBe(422);
    expect(res.body.error.details.issues).toContainEqual({ in: 'body', path: 'longitudeDeg', message: 'Longitude must be in [0, 360) degrees east' });
    // both pairs of position fields given: the schema's own message
    const both = await as.admin.request('POST', '/api/observatories', { body: { ...SITE_A, code: 'TQX', geodeticLatitudeDeg: 10, heightM: 5 } });
    expect(both.status).toBe(422);
    expect(both.body.error.details.issues.map((i: { message: string }) => i.message)).toContain('Give either both parallax constants or the geodetic latitude and height');
    const code = await as.admin.request('POST', '/api/observatories', { body: { ...SITE_A, code: 'T-Q' } });
    expect(code.status).toBe(422);
    expect(code.body.error.details.issues[0]).toMatchObject({ path: 'code', message: 'Code: 1 to 8 letters or digits' });
  });

  it('PUT replaces name and position; the code cannot change', async () => {
    const res = await as.admin.request('PUT', '/api/observatories/TQA', { body: { ...SITE_A, name: 'Test site A, renamed' } });
    expect(res.status).toBe(200);
    expect(res.body.name).toBe('Test site A, renamed');
    const moved = await as.admin.request('PUT', '/api/observatories/TQA', { body: { ...SITE_A, code: 'TQZ' } });
    expect(moved.status).toBe(422);
    expect(moved.body.error.message).toMatch(/cannot change/);
    expect((await as.admin.request('PUT', '/api/observatories/NOPE1', { body: { ...SITE_A, code: 'NOPE1' } })).status).toBe(404);
  });

  it('analysts and reviewers read the table; only the administrator changes it; communications and liaison see none', async () => {
    for (const role of ['analyst', 'reviewer', 'admin']) {
      const res = await as[role].get('/api/observatories');
      expect(res.status, role).toBe(200);
      expect(res.body.observatories.map((o: { code: string }) => o.code)).toEqual(expect.arrayContaining(['TQA', 'TQB']));
    }
    for (const role of ['communications', 'liaison']) expect((await as[role].get('/api/observatories')).status, role).toBe(403);
    for (const role of ['analyst', 'reviewer', 'communications', 'liaison']) {
      expect((await as[role].request('POST', '/api/observatories', { body: { ...SITE_A, code: 'TQY' } })).status, role).toBe(403);
      expect((await as[role].request('DELETE', '/api/observatories/TQB')).status, role).toBe(403);
    }
  });
});

describe('astrometry uploads', () => {
  it('a good file (JSON body) is stored: batch with the raw text and its SHA-256, one row per line', async () => {
    const text = psv(GOOD_ROWS);
    const res = await post(as.analyst, { fileName: 'first.psv', text });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const body = uploadAstrometryResultSchema.parse(res.body);
    expect(body.added).toBe(4);
    expect(body.duplicates).toEqual([]);
    expect(body.batch).toMatchObject({ fileName: 'first.psv', observationCount: 4, duplicatesSkipped: 0, createdByName: DEMO_USERS.find((u) => u.role === 'analyst')!.name });
    const stored = srv.db.select().from(astrometryBatches).where(eq(astrometryBatches.id, body.batch.id)).get()!;
    expect(stored.rawText).toBe(text);
    // SHA-256 of the UTF-8 bytes (FIPS 180-4), computed here independently
    const { createHash } = await import('node:crypto');
    expect(body.batch.sha256).toBe(createHash('sha256').update(Buffer.from(text, 'utf8')).digest('hex'));

    const list = astrometryListSchema.parse((await as.reviewer.get(`/api/objects/${objectId}/astrometry`)).body);
    expect(list.observations.map((o) => [o.line, o.stn, o.raDeg, o.decDeg])).toEqual(GOOD_ROWS.map((r, i) => [lineOfRow(i), r.stn, Number(r.ra), Number(r.dec)]));
    expect(list.observations[0]).toMatchObject({ rmsRaArcsec: 0.35, rmsDecArcsec: 0.3, astCat: 'Gaia3', mag: 19.8, band: 'G', mode: 'CCD', excluded: false, excludedReason: null });
    // obsTime 2026-09-01T01:00Z as TDB days since J2000: JD(UTC) 2461284.541667 - 2451545.0 plus TT-UTC 69.184 s
    // (37 leap seconds + 32.184 s, IERS Bulletin C) and TDB-TT < 2 ms; Fliegel & van Flandern JD algorithm.
    expect(list.observations[0].obsTimeTdbDays).toBeCloseTo(9739.541667 + 69.184 / 86400, 5);
  });

  it('a bad file is 422 INVALID_ASTROMETRY naming each bad line and field, and nothing is stored', async () => {
    const before = counts();
    const rows = [
      { stn: 'TQA', obsTime: '2026-09-07T01:00:00.000Z', ra: '150.9', dec: '11.0' },
      { stn: 'TQA', obsTime: '2026-09-07T01:20:00.000Z', ra: '361.5', dec: '11.0' }, // ra out of [0, 360)
      { stn: 'TQA', obsTime: '2026-09-07T01:40:00.000Z', ra: '151.0', dec: '95.0' }, // dec out of [-90, 90]
      { stn: 'TQA', obsTime: '2026-13-07T01:40:00.000Z', ra: '151.0', dec: '11.0' }, // month 13
    ];
    const res = await post(as.analyst, { fileName: 'bad.psv', text: psv(rows) });
    expect(res.status).toBe(422);
    expect(errorBodySchema.safeParse(res.body).success).toBe(true);
    expect(res.body.error.code).toBe('INVALID_ASTROMETRY');
    const issues = res.body.error.issues as { line: number; field: string | null; message: string }[];
    expect(issues.map((i) => [i.line, i.field])).toEqual([
      [lineOfRow(1), 'ra'],
      [lineOfRow(2), 'dec'],
      [lineOfRow(3), 'obsTime'],
    ]);
    expect(res.body.error.details.issues).toEqual(issues);
    expect(res.body.error.message).toMatch(/nothing was stored/);
    expect(counts()).toEqual(before);
  });

  it('a JSON upload larger than the 1 MB API body limit is read (this path allows 6 MB); larger bodies are refused', async () => {
    const before = counts();
    // ADES PSV allows padding blanks around values: one bad value padded to 1.5 MB must reach the parser (422 with
    // its line), not be cut off by the body limit.
    const padded = `361.5${' '.repeat(1_500_000)}`;
    const rows = [{ stn: 'TQA', obsTime: '2026-09-08T01:00:00.000Z', ra: padded, dec: '11.0' }];
    const res = await post(as.analyst, { text: psv(rows) });
    expect(res.status).toBe(422);
    expect(res.body.error.issues.map((i: { line: number; field: string | null }) => [i.line, i.field])).toEqual([[lineOfRow(0), 'ra']]);
    const huge = await post(as.analyst, { text: 'x'.repeat(7_000_000) });
    expect(huge.status).toBeGreaterThanOrEqual(400);
    expect(huge.status).toBeLessThan(500);
    expect(counts()).toEqual(before);
  });

  it('an observatory not in the table is an issue with its line and code; nothing is stored', async () => {
    const before = counts();
    const rows = [
      { stn: 'TQA', obsTime: '2026-09-09T01:00:00.000Z', ra: '151.2', dec: '11.3' },
      { stn: 'ZZ9', obsTime: '2026-09-09T01:30:00.000Z', ra: '151.3', dec: '11.4' },
    ];
    const res = await post(as.analyst, { text: psv(rows) });
    expect(res.status).toBe(422);
    expect(res.body.error.issues).toEqual([{ line: lineOfRow(1), field: 'stn', message: expect.stringContaining("Observatory 'ZZ9' is not in the office's table") }]);
    expect(res.body.error.message).toContain(`line ${lineOfRow(1)}`);
    expect(counts()).toEqual(before);
  });

  it('observations of another object are refused (designation in provID)', async () => {
    const res = await post(as.analyst, { text: psv([{ stn: 'TQA', obsTime: '2026-09-10T01:00:00.000Z', ra: '151.2', dec: '11.3', provID: 'HSO-99-X9' }]) });
    expect(res.status).toBe(422);
    expect(res.body.error.issues[0]).toMatchObject({ line: lineOfRow(0), field: 'provID' });
  });

  it('lines already stored for the object are skipped and listed; the new ones are added (multipart upload)', async () => {
    const before = counts();
    const newRow = { stn: 'TQB', obsTime: '2026-09-08T03:00:00.000Z', ra: '151.000000', dec: '11.100000' };
    const existing = srv.db.select().from(observations).where(eq(observations.objectId, objectId)).all();
    const res = await multipart(as.analyst, { text: psv([GOOD_ROWS[1], newRow, GOOD_ROWS[3]]), name: 'second.psv' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const body = uploadAstrometryResultSchema.parse(res.body);
    expect(body.added).toBe(1);
    const idOf = (r: (typeof GOOD_ROWS)[number]) => existing.find((e) => e.stn === r.stn && e.obsTime === r.obsTime)!.id;
    expect(body.duplicates).toEqual([
      { line: lineOfRow(0), stn: 'TQA', obsTime: GOOD_ROWS[1].obsTime, existingId: idOf(GOOD_ROWS[1]) },
      { line: lineOfRow(2), stn: 'TQB', obsTime: GOOD_ROWS[3].obsTime, existingId: idOf(GOOD_ROWS[3]) },
    ]);
    expect(body.batch).toMatchObject({ fileName: 'second.psv', observationCount: 1, duplicatesSkipped: 2 });
    expect(counts()).toEqual({ batches: before.batches + 1, observations: before.observations + 1 });
  });

  it('the same instant written with fewer decimals is the same observation (station + instant to the ms)', async () => {
    const res = await post(as.analyst, { text: psv([{ ...GOOD_ROWS[0], obsTime: '2026-09-01T01:00:00Z' }]) });
    expect(res.status).toBe(201);
    expect(res.body.added).toBe(0);
    expect(res.body.duplicates).toHaveLength(1);
  });

  it('multipart without a file, or in the wrong field, is refused with the reason', async () => {
    const res = await multipart(as.analyst, { text: psv(GOOD_ROWS), name: 'x.psv', field: 'ades' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('INVALID_ASTROMETRY');
    expect(res.body.error.issues[0].message).toMatch(/multipart field "file"/);
  });

  it('only analysts upload; reviewers and admins read; communications and liaison see nothing', async () => {
    for (const role of ['reviewer', 'admin', 'communications', 'liaison']) expect((await post(as[role], { text: psv(GOOD_ROWS) })).status, role).toBe(403);
    for (const role of ['communications', 'liaison']) expect((await as[role].get(`/api/objects/${objectId}/astrometry`)).status, role).toBe(403);
    expect((await as.analyst.get('/api/objects/999999/astrometry')).status).toBe(404);
  });
});

describe('manual exclusion and the observatory table', () => {
  it('an analyst excludes an observation with a reason and takes it back', async () => {
    const first = srv.db.select().from(observations).where(eq(observations.objectId, objectId)).all()[0];
    const url = `/api/objects/${objectId}/astrometry/${first.id}`;
    const noReason = await as.analyst.request('PATCH', url, { body: { excluded: true } });
    expect(noReason.status).toBe(422);
    expect(noReason.body.error.message).toMatch(/reason/);
    const res = await as.analyst.request('PATCH', url, { body: { excluded: true, reason: 'trailed image' } });
    expect(res.status).toBe(200);
    expect(storedObservationSchema.parse(res.body)).toMatchObject({ id: first.id, excluded: true, excludedReason: 'trailed image' });
    expect(srv.db.select().from(observations).where(eq(observations.id, first.id)).get()).toMatchObject({ excluded: true, excludedReason: 'trailed image' });
    expect((await as.reviewer.request('PATCH', url, { body: { excluded: false } })).status).toBe(403);
    const back = await as.analyst.request('PATCH', url, { body: { excluded: false } });
    expect(back.body).toMatchObject({ excluded: false, excludedReason: null });
    // another object's observation through this object's address: not found
    const other = srv.db.select().from(trackedObjects).where(eq(trackedObjects.designation, 'HSO-23-C2')).get()!;
    expect((await as.analyst.request('PATCH', `/api/objects/${other.id}/astrometry/${first.id}`, { body: { excluded: true, reason: 'x' } })).status).toBe(404);
  });

  it('an observatory in use cannot be removed (409 with the count); an unused one can (204)', async () => {
    const listed = (await as.admin.get('/api/observatories')).body.observatories as { code: string; observationCount: number }[];
    const a = listed.find((o) => o.code === 'TQA')!;
    expect(a.observationCount).toBe(2);
    const res = await as.admin.request('DELETE', '/api/observatories/TQA');
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('2 stored observations');
    expect((await as.admin.request('POST', '/api/observatories', { body: { ...SITE_A, code: 'TQU', name: 'Unused (invented)' } })).status).toBe(201);
    expect((await as.admin.request('DELETE', '/api/observatories/TQU')).status).toBe(204);
    expect((await as.admin.get('/api/observatories')).body.observatories.map((o: { code: string }) => o.code)).not.toContain('TQU');
  });
});
