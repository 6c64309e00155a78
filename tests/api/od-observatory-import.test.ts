// Importing a file of observatories (POST /api/observatories/import): the CLI's own JSON form
// ({"observatories": [...]}, shared/schemas/od.ts observatoryFileSchema, documented in README), all or nothing.
// Real server through tests/helpers/testServer.ts; the table is read back through GET and the database.
// Sources: the file format is Tocsin's own (README "fit ... --observatories"); status codes RFC 9110 §15.3.1 (200),
// §15.5.2 (401), §15.5.4 (403), §15.5.21 (422); field limits (rho cos phi' in [0, 1.001], longitude in [0, 360))
// are the messages of shared/schemas/od.ts observatorySchema. Refusing a whole file on one bad entry, and
// replacing existing codes only on an explicit choice, is common practice, no source.
import { readFileSync } from 'node:fs';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { observatories } from '../../server/db/schema';
import { DEMO_OBSERVATORIES_FILE } from '../../server/services/od/demo';
import { errorBodySchema } from '../../shared/schemas/errors';
import { importObservatoriesResultSchema, observatoryImportIssueSchema, observatoryRowSchema } from '../../shared/schemas/odApi';
import { startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';
import { signedIn } from './signedIn';

let srv: TestServer;
const as: Record<string, ApiClient> = {};

beforeAll(async () => {
  srv = await startTestServer();
  Object.assign(as, await signedIn(srv.url));
});
afterAll(() => srv?.close());

// Codes of this test only (invented sites; none is in the demo office's table).
const site = (code: string, extra: Record<string, unknown> = {}) => ({
  code,
  name: `Import test site ${code} (invented)`,
  longitudeDeg: 20.5,
  rhoCosPhi: 0.75,
  rhoSinPhi: 0.66,
  geodeticLatitudeDeg: null,
  heightM: null,
  ...extra,
});
const fileText = (entries: unknown[]) => JSON.stringify({ format: 'tocsin-observatories/1', observatories: entries }, null, 2);
const post = (client: ApiClient, body: unknown) => client.request('POST', '/api/observatories/import', { body });
const tableCount = () => srv.db.select({ n: sql<number>`count(*)` }).from(observatories).get()!.n;
const listed = async () => {
  const res = await as.admin.get('/api/observatories');
  expect(res.status).toBe(200);
  return (res.body.observatories as unknown[]).map((o) => observatoryRowSchema.parse(o));
};
/** The refusal's issues (422 unprocessable, details.issues), each checked against the shared schema. */
function refusal(res: { status: number; body: any }) {
  expect(res.status).toBe(422);
  const body = errorBodySchema.parse(res.body);
  expect(body.error.code).toBe('unprocessable');
  const issues = ((body.error.details as { issues: unknown[] }).issues ?? []).map((i) => observatoryImportIssueSchema.parse(i));
  return { message: body.error.message, issues };
}

async function multipart(client: ApiClient, text: string, name: string, mode?: string) {
  const form = new FormData();
  if (mode) form.append('mode', mode);
  form.append('file', new Blob([text]), name);
  const res = await fetch(`${srv.url}/api/observatories/import`, {
    method: 'POST',
    headers: { cookie: client.cookieHeader(), 'x-csrf-token': client.csrfToken ?? (await client.fetchCsrf()), accept: 'application/json' },
    body: form,
  });
  return { status: res.status, body: (await res.json()) as any };
}

describe('importing an observatory file', () => {
  it('a valid file adds every entry (JSON body, default add-only) and the list shows them', async () => {
    const before = tableCount();
    const entries = [site('TIA'), site('TIB', { rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -24.6, heightM: 2635 }), site('TIC', { longitudeDeg: 359.5 })];
    const res = await post(as.admin, { fileName: 'three.json', text: fileText(entries) });
    expect(res.status).toBe(200);
    const result = importObservatoriesResultSchema.parse(res.body);
    expect(result).toMatchObject({ fileName: 'three.json', mode: 'add-only', added: 3, replaced: 0, unchanged: 0, addedCodes: ['TIA', 'TIB', 'TIC'] });
    expect(tableCount()).toBe(before + 3);
    const rows = await listed();
    expect(rows.find((r) => r.code === 'TIB')).toMatchObject({ geodeticLatitudeDeg: -24.6, heightM: 2635, rhoCosPhi: null, observationCount: 0 });
  });

  it('a multipart file (field `file`, mode field) is accepted the same way', async () => {
    const res = await multipart(as.admin, fileText([site('TID')]), 'one.json', 'add-only');
    expect(res.status).toBe(200);
    expect(importObservatoriesResultSchema.parse(res.body)).toMatchObject({ fileName: 'one.json', added: 1, addedCodes: ['TID'] });
    const empty = await multipart(as.admin, '   ', 'blank.json');
    expect(refusal(empty).issues).toEqual([{ entry: null, code: null, field: null, kind: 'invalid', message: 'The file is empty' }]);
  });

  it('one bad entry refuses the whole file, naming the entry, its code and the field; nothing is stored', async () => {
    const before = tableCount();
    const entries = [site('TIE'), site('TIF'), site('HSX', { rhoCosPhi: 1.5 }), site('TIG', { longitudeDeg: 400, colour: 'red' })];
    const { message, issues } = refusal(await post(as.admin, { text: fileText(entries) }));
    expect(message).toContain("entry 3 (code HSX): rho cos phi' must be in [0, 1.001]");
    expect(issues).toEqual([
      { entry: 3, code: 'HSX', field: 'rhoCosPhi', kind: 'invalid', message: "rho cos phi' must be in [0, 1.001]" },
      expect.objectContaining({ entry: 4, code: 'TIG' }),
      expect.objectContaining({ entry: 4, code: 'TIG' }),
    ]);
    expect(issues.filter((i) => i.entry === 4).map((i) => i.field).sort()).toEqual(['colour', 'longitudeDeg']);
    expect(tableCount()).toBe(before);
    expect((await listed()).map((r) => r.code)).not.toContain('TIE');
  });

  it('a file that is not JSON, or not in the CLI form, is one file issue', async () => {
    const notJson = refusal(await post(as.admin, { text: '{"observatories": [' }));
    expect(notJson.issues).toHaveLength(1);
    expect(notJson.issues[0]).toMatchObject({ entry: null, message: expect.stringMatching(/^The file is not JSON/) });
    const noList = refusal(await post(as.admin, { text: JSON.stringify({ stations: [site('TIH')] }) }));
    expect(noList.issues.every((i) => i.entry === null)).toBe(true);
    expect(noList.issues.length).toBeGreaterThanOrEqual(1);
    const emptyList = refusal(await post(as.admin, { text: JSON.stringify({ observatories: [] }) }));
    expect(emptyList.issues.map((i) => i.message).join(' ')).toContain('The file lists no observatory');
  });

  it('a code repeated inside the file is named with both entries (case does not matter)', async () => {
    const before = tableCount();
    const { issues } = refusal(await post(as.admin, { text: fileText([site('TIJ'), site('TIK'), site('tij', { name: 'Again' })]) }));
    expect(issues).toEqual([{ entry: 3, code: 'tij', field: 'code', kind: 'duplicate', message: 'code tij is repeated in the file: entries 1 (TIJ) and 3 (tij)' }]);
    expect(tableCount()).toBe(before);
  });

  it('codes already stored: refused in add-only mode (nothing stored), replaced in replace mode', async () => {
    const before = tableCount();
    const entries = [site('TIL'), site('TIA', { name: 'Renamed A', longitudeDeg: 21 }), site('TIB', { rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: -24.6, heightM: 2635 })];
    const refused = refusal(await post(as.admin, { text: fileText(entries), mode: 'add-only' }));
    expect(refused.issues.map((i) => [i.entry, i.code, i.kind, i.field])).toEqual([
      [2, 'TIA', 'exists', 'code'],
      [3, 'TIB', 'exists', 'code'],
    ]);
    expect(tableCount()).toBe(before);

    const res = await post(as.admin, { text: fileText(entries), mode: 'replace' });
    expect(res.status).toBe(200);
    expect(importObservatoriesResultSchema.parse(res.body)).toMatchObject({
      mode: 'replace',
      added: 1,
      replaced: 1,
      unchanged: 1,
      addedCodes: ['TIL'],
      replacedCodes: ['TIA'],
      unchangedCodes: ['TIB'],
    });
    expect(tableCount()).toBe(before + 1);
    expect((await listed()).find((r) => r.code === 'TIA')).toMatchObject({ name: 'Renamed A', longitudeDeg: 21, rhoCosPhi: 0.75 });
  });

  it('a bad entry in replace mode stores nothing either (the replacements are not half-done)', async () => {
    const rowA = (await listed()).find((r) => r.code === 'TIA')!;
    const { issues } = refusal(await post(as.admin, { text: fileText([site('TIA', { name: 'Should not stick' }), site('TIM', { heightM: 5 })]), mode: 'replace' }));
    expect(issues.map((i) => i.entry)).toEqual([2]);
    expect((await listed()).find((r) => r.code === 'TIA')).toEqual(rowA);
  });

  it('the demo office file imports in replace mode without changing the table', async () => {
    const text = readFileSync(DEMO_OBSERVATORIES_FILE, 'utf8');
    const codes = (JSON.parse(text) as { observatories: { code: string }[] }).observatories.map((o) => o.code);
    const before = await listed();
    const res = await post(as.admin, { fileName: 'hspdo-observatories.json', text, mode: 'replace' });
    expect(res.status).toBe(200);
    const result = importObservatoriesResultSchema.parse(res.body);
    // the seed stored the demo observatories, so nothing is added or rewritten
    expect(result).toMatchObject({ added: 0, replaced: 0, unchanged: codes.length, unchangedCodes: codes });
    expect(await listed()).toEqual(before);
  });

  it('analysts and reviewers may not import (403); signed out is 401; an unknown mode is 400', async () => {
    const text = fileText([site('TIN')]);
    for (const role of ['analyst', 'reviewer', 'communications', 'liaison']) expect((await post(as[role], { text })).status, role).toBe(403);
    expect((await post(new ApiClient(srv.url), { text })).status).toBe(401);
    expect((await post(as.admin, { text, mode: 'merge' })).status).toBe(400);
    expect((await listed()).map((r) => r.code)).not.toContain('TIN');
  });
});
