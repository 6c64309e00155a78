// Bulletins: every allowed and refused workflow transition per role (driven by the shared transition table),
// four-eyes, the 409 path of autosave, concurrent approval (one version), version hash stability, stale-figure
// detection after a newer run, and readable differences between versions.
// Sources: the agreed contract (issue 6 items 2-4 and the resource list; shared/bulletins/workflow.ts is the table
// the tests walk); RFC 9110 §15.5.4 (403), §15.5.10 (409), §15.5.21 (422); SHA-256 test vector "abc" from FIPS 180-2
// Appendix B.1; canonical JSON rule (sorted keys, no whitespace) as in RFC 8785 §3.2.3 for the inputs used here.
// Figure values come from two real engine runs (tests/api/fixtures/bulletin-runs.json, make-bulletin-runs.ts),
// stored as run rows directly; the expected text is written from the fixture's raw numbers with toFixed here, not
// with the code under test.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bulletins, bulletinVersions, staleFigureConfirmations } from '../../server/db/schema';
import { canonicalJson, sha256Hex } from '../../server/services/bulletins/canonical';
import { BULLETIN_ACTIONS, BULLETIN_STATES, TRANSITIONS, findTransition, type BulletinAction, type BulletinState } from '../../shared/bulletins/workflow';
import { ROLES, type Role } from '../../shared/roles';
import { bulletinSchema, bulletinVersionDetailSchema, versionListResponseSchema, type Bulletin } from '../../shared/schemas/bulletins';
import { startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';
import { approvedBulletin, confirmAll, createBulletin, docWithFigures, FIXTURE_RUNS, insertRun, neaIds, signedIn, transition } from './bulletinsSetup';

let srv: TestServer;
let as: Record<string, ApiClient>;
let objectId: number;
let run1: number;

beforeAll(async () => {
  srv = await startTestServer();
  as = await signedIn(srv.url);
  objectId = neaIds(srv).objectId;
  run1 = insertRun(srv, 0, new Date('2026-12-01T01:00:00Z'));
});
afterAll(() => srv?.close());

/** The Palermo value as the fixture run gives it, two decimals (the bulletin shows it so). */
const palermoText = (i: number) => FIXTURE_RUNS[i].result.approaches[0].palermo!.toFixed(2);

/** A bulletin brought into `state` through the API (distributed: approved, then marked in the database, since distribution is tested in bulletins-distribution.test.ts). */
async function bulletinIn(state: BulletinState): Promise<Bulletin> {
  const b = await createBulletin(as.analyst, objectId, docWithFigures(run1));
  const step = async (client: ApiClient, body: Record<string, unknown>) => {
    const res = await transition(client, b, body);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
  };
  if (state === 'withdrawn') await step(as.analyst, { action: 'withdraw', comment: 'Not needed.' });
  if (['in_review', 'changes_requested', 'approved', 'distributed'].includes(state)) await step(as.analyst, { action: 'submit' });
  if (state === 'changes_requested') await step(as.reviewer, { action: 'request_changes', comment: 'Say what would change the assessment.' });
  if (state === 'approved' || state === 'distributed') await step(as.reviewer, { action: 'approve', comment: 'Checked.', confirmedFigures: confirmAll(b) });
  if (state === 'distributed') {
    srv.db.update(bulletins).set({ state: 'distributed' }).where(eq(bulletins.id, b.id)).run();
    srv.db.update(bulletinVersions).set({ status: 'distributed' }).where(eq(bulletinVersions.bulletinId, b.id)).run();
  }
  const got = bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}`)).body);
  expect(got.state).toBe(state);
  return got;
}

// Every state a bulletin can be in (superseded is a status of versions, checked below with version 1 after a newer approval).
const STATES = BULLETIN_STATES.filter((s) => s !== 'superseded');
// distribute goes through POST /api/distributions (bulletins-distribution.test.ts); here it must be refused.
const ACTIONS = BULLETIN_ACTIONS.filter((a) => a !== 'distribute');

describe('workflow table, every state x action x role', () => {
  for (const state of STATES) {
    it(`from ${state}`, async () => {
      const shared = await bulletinIn(state);
      for (const action of ACTIONS) {
        for (const role of ROLES) {
          const t = findTransition(state, action);
          const allowed = t !== undefined && t.roles.includes(role as Role);
          const body = { action, comment: 'Reason given in the test.', confirmedFigures: confirmAll(shared) };
          if (!allowed) {
            const res = await transition(as[role], shared, body);
            // Liaisons have no workflow ability at all (403 by the route table); a missing transition is 409; a role not in the row is 403.
            const expected = role === 'liaison' ? 403 : t === undefined ? 409 : 403;
            expect(res.status, `${state} ${action} as ${role}: ${JSON.stringify(res.body)}`).toBe(expected);
            continue;
          }
          const fresh = await bulletinIn(state);
          const res = await transition(as[role], fresh, { ...body, confirmedFigures: confirmAll(fresh) });
          expect(res.status, `${state} ${action} as ${role}: ${JSON.stringify(res.body)}`).toBe(200);
          expect(bulletinSchema.parse(res.body).state).toBe(t!.to);
        }
      }
      // Refusals changed nothing.
      const after = bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${shared.id}`)).body);
      expect(after.state).toBe(state);
      expect(after.revision).toBe(shared.revision);
    }, 60_000);
  }

  it('refuses distribute through /transitions (it needs a list and goes through /api/distributions)', async () => {
    const b = await bulletinIn('approved');
    expect((await transition(as.communications, b, { action: 'distribute' })).status).toBe(422);
  });

  it('offers exactly the actions the table allows the role (allowedActions)', async () => {
    const b = await bulletinIn('in_review');
    for (const role of ['analyst', 'reviewer', 'communications', 'admin'] as const) {
      const got = bulletinSchema.parse((await as[role].get(`/api/bulletins/${b.id}`)).body).allowedActions.sort();
      const want = TRANSITIONS.filter((t) => t.from === 'in_review' && t.roles.includes(role)).map((t) => t.action as BulletinAction).sort();
      expect(got, role).toEqual(want);
    }
    // Liaisons do not read bulletins at all (their inbox is /api/briefings).
    expect((await as.liaison.get(`/api/bulletins/${b.id}`)).status).toBe(403);
  });

  it('requires a comment to request changes or withdraw (422)', async () => {
    const b = await bulletinIn('in_review');
    expect((await transition(as.reviewer, b, { action: 'request_changes' })).status).toBe(422);
    expect((await transition(as.analyst, b, { action: 'withdraw', comment: '  ' })).status).toBe(422);
  });

  it('requires every figure to be confirmed at sign-off, as it is (422)', async () => {
    const b = await bulletinIn('in_review');
    const all = confirmAll(b);
    expect((await transition(as.reviewer, b, { action: 'approve', confirmedFigures: all.slice(1) })).status).toBe(422);
    // A confirmation naming another run than the figure's does not count.
    expect((await transition(as.reviewer, b, { action: 'approve', confirmedFigures: all.map((c) => ({ ...c, runId: c.runId + 1000 })) })).status).toBe(422);
    const ok = await transition(as.reviewer, b, { action: 'approve', comment: 'All figures confirmed.', confirmedFigures: all });
    expect(ok.status).toBe(200);
    const v = bulletinVersionDetailSchema.parse((await as.reviewer.get(`/api/bulletins/${b.id}/versions/1`)).body);
    expect(v.signOff.confirmedFigures).toEqual(all);
    expect(v.signOff.comment).toBe('All figures confirmed.');
    expect(v.signOff.reviewer.name).toBe('Ines Marrow');
  });
});

describe('four-eyes', () => {
  it('refuses approval by the author even when the author now holds the reviewer role', async () => {
    // A second analyst writes the draft, then is made a reviewer by the admin.
    const created = await as.admin.request('POST', '/api/users', { body: { email: 'second.analyst@hspdo.example', name: 'Edda Frey', role: 'analyst', password: 'second-analyst-pass-1' } });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const edda = new ApiClient(srv.url);
    expect((await edda.signIn('second.analyst@hspdo.example', 'second-analyst-pass-1')).status).toBe(200);
    const b = await createBulletin(edda, objectId, docWithFigures(run1));
    // Another analyst cannot submit Edda's draft (only its author can).
    expect((await transition(as.analyst, b, { action: 'submit' })).status).toBe(403);
    expect((await transition(edda, b, { action: 'submit' })).status).toBe(200);
    expect((await as.admin.request('PATCH', `/api/users/${created.body.id}`, { body: { role: 'reviewer' } })).status).toBe(200);
    const res = await transition(edda, b, { action: 'approve', comment: 'Mine.', confirmedFigures: confirmAll(b) });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/four-eyes/);
    expect(bulletinSchema.parse((await as.reviewer.get(`/api/bulletins/${b.id}`)).body).allowedActions).toContain('approve');
    expect((await as.reviewer.get(`/api/bulletins/${b.id}/versions`)).body.versions).toHaveLength(0);
  });
});

describe('autosave revisions', () => {
  it('answers a save against an old revision with 409 and the current copy, and loses nothing', async () => {
    const b = await createBulletin(as.analyst, objectId, docWithFigures(run1));
    expect(b.revision).toBe(1);
    const first = docWithFigures(run1, 'First tab: the encounter is on 17 September 2034.');
    const r1 = await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: 1, document: first } });
    expect(r1.status).toBe(200);
    expect(r1.body.revision).toBe(2);
    // A second tab still holds revision 1.
    const second = docWithFigures(run1, 'Second tab: a different lead.');
    const r2 = await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: 1, document: second, title: 'Other title' } });
    expect(r2.status).toBe(409);
    expect(r2.body.error.code).toBe('conflict');
    const current = bulletinSchema.parse(r2.body.error.details.current);
    expect(current.revision).toBe(2);
    expect(current.document).toEqual(first);
    // The stored draft is the first save; the refused edit changed nothing.
    const stored = bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}`)).body);
    expect(stored.document).toEqual(first);
    expect(stored.title).toBe(b.title);
    // Saved again on the current revision, the second tab's text goes in.
    const r3 = await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: 2, document: second } });
    expect(r3.status).toBe(200);
    expect(r3.body.revision).toBe(3);
    expect(r3.body.document).toEqual(second);
  });

  it('refuses saves once the draft is in review (409) and documents referring to another object\'s run (422)', async () => {
    const b = await createBulletin(as.analyst, objectId, docWithFigures(run1));
    const bad = await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: 1, document: docWithFigures(run1 + 999) } });
    expect(bad.status).toBe(422);
    expect((await transition(as.analyst, b, { action: 'submit' })).status).toBe(200);
    const res = await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: 1, document: docWithFigures(run1) } });
    expect(res.status).toBe(409);
    expect(res.body.error.details.current.state).toBe('in_review');
  });

  it('validates the document: unknown node types and bad figure attributes are 400', async () => {
    const bad1 = await as.analyst.request('POST', '/api/bulletins', { body: { objectId, title: 'x', document: { type: 'doc', content: [{ type: 'script' }] } } });
    expect(bad1.status).toBe(400);
    const bad2 = await as.analyst.request('POST', '/api/bulletins', {
      body: { objectId, title: 'x', document: { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'linkedFigure', attrs: { runId: run1, quantity: 'luck' } }] }] } },
    });
    expect(bad2.status).toBe(400);
  });
});

describe('concurrent approval', () => {
  it('two approvals at once (two reviewers, two server processes on one database) make exactly one version', async () => {
    const created = await as.admin.request('POST', '/api/users', { body: { email: 'second.reviewer@hspdo.example', name: 'Oda Lind', role: 'reviewer', password: 'second-reviewer-pass-1' } });
    expect(created.status).toBe(201);
    const other = await startTestServer({ databaseFile: srv.databaseFile, seed: false });
    try {
      const oda = new ApiClient(other.url);
      expect((await oda.signIn('second.reviewer@hspdo.example', 'second-reviewer-pass-1')).status).toBe(200);
      for (let round = 0; round < 3; round++) {
        const b = await createBulletin(as.analyst, objectId, docWithFigures(run1));
        expect((await transition(as.analyst, b, { action: 'submit' })).status).toBe(200);
        const body = { action: 'approve', comment: 'Checked.', confirmedFigures: confirmAll(b) };
        const [a, c] = await Promise.all([transition(as.reviewer, b, body), transition(oda, b, body)]);
        const statuses = [a.status, c.status].sort();
        expect(statuses).toEqual([200, 409]);
        const versions = versionListResponseSchema.parse((await as.reviewer.get(`/api/bulletins/${b.id}/versions`)).body).versions;
        expect(versions).toHaveLength(1);
        expect(srv.db.select().from(bulletinVersions).where(eq(bulletinVersions.bulletinId, b.id)).all()).toHaveLength(1);
        const winner = a.status === 200 ? 'Ines Marrow' : 'Oda Lind';
        expect(versions[0].reviewer?.name).toBe(winner);
      }
    } finally {
      await other.close();
    }
  }, 30_000);
});

describe('locked versions and their hash', () => {
  it('canonical JSON and SHA-256 agree with outside definitions', () => {
    // FIPS 180-2 Appendix B.1: SHA-256("abc").
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    // Sorted keys at every level, no whitespace, array order kept (RFC 8785 §3.2.3 ordering for ASCII keys).
    expect(canonicalJson({ b: 1, a: [true, null, 'x', { d: 2, c: 'é' }], '10': 0 })).toBe('{"10":0,"a":[true,null,"x",{"c":"é","d":2}],"b":1}');
  });

  it('stores the hash of the canonical JSON of the content, stable across reads and later changes', async () => {
    const b = await approvedBulletin(as, objectId, run1);
    const v1 = bulletinVersionDetailSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}/versions/1`)).body);
    // Independent canonical form: a JSON.stringify replacer that sorts the keys of every object.
    const sorted = (_k: string, v: unknown) =>
      v && typeof v === 'object' && !Array.isArray(v) ? Object.fromEntries(Object.keys(v).sort().map((k) => [k, (v as Record<string, unknown>)[k]])) : v;
    const { status: _s, sha256, createdAt: _c, diff: _d, ...content } = v1;
    const expected = createHash('sha256').update(JSON.stringify(content, sorted), 'utf8').digest('hex');
    expect(sha256).toBe(expected);
    expect(sha256).toMatch(/^[0-9a-f]{64}$/);
    // The snapshot holds each figure's value and run.
    expect(v1.figures.map((f) => [f.attrs.quantity, f.value.runId, f.value.text])).toEqual([
      ['palermo', run1, palermoText(0)],
      ['impactProbability', run1, FIXTURE_RUNS[0].result.approaches[0].impactProbability.linear!.toExponential(1).replace('e+', 'e')],
    ]);
    expect(v1.figures[0].value.provenance.engineVersion).toBe(FIXTURE_RUNS[0].result.provenance.engineVersion);
    // Reading again, starting a new version and changing its status (superseded) leave version 1's content and hash alone.
    const again = await as.analyst.get(`/api/bulletins/${b.id}/versions/1`);
    expect(again.body.sha256).toBe(sha256);
    expect((await transition(as.analyst, b, { action: 'amend' })).status).toBe(200);
    const draft = bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}`)).body);
    expect(draft.draftVersion).toBe(2);
    expect(draft.document).toEqual(v1.document);
    expect((await as.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: draft.revision, document: docWithFigures(run1, 'Version 2 lead.') } })).status).toBe(200);
    expect((await transition(as.analyst, b, { action: 'submit' })).status).toBe(200);
    const d2 = bulletinSchema.parse((await as.reviewer.get(`/api/bulletins/${b.id}`)).body);
    expect((await transition(as.reviewer, b, { action: 'approve', comment: 'v2', confirmedFigures: confirmAll(d2) })).status).toBe(200);
    const list = versionListResponseSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}/versions`)).body).versions;
    expect(list.map((v) => [v.version, v.status])).toEqual([
      [1, 'superseded'],
      [2, 'approved'],
    ]);
    const v1After = bulletinVersionDetailSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}/versions/1`)).body);
    expect(v1After.sha256).toBe(sha256);
    expect(v1After.document).toEqual(v1.document);
    expect(srv.services.bulletins.verifyVersion(b.id, 1).matches).toBe(true);
    expect(srv.services.bulletins.verifyVersion(b.id, 2).matches).toBe(true);
  });
});

describe('stale figures and version differences', () => {
  it('marks figures bound to an older run once a newer run exists, needs a kept reason to submit, and shows the change between versions', async () => {
    const s = await startTestServer();
    try {
      const c = await signedIn(s.url);
      const obj = neaIds(s).objectId;
      const older = insertRun(s, 0, new Date('2026-12-01T01:00:00Z'));
      const b = await createBulletin(c.analyst, obj, docWithFigures(older));
      expect(b.staleFigureCount).toBe(0);
      expect(b.figures[0].value?.text).toBe(palermoText(0));
      expect(b.figures.every((f) => !f.stale)).toBe(true);

      // A newer run of the object: every figure bound to the older run is out of date, with the new value beside it.
      const newer = insertRun(s, 1, new Date('2027-12-01T01:00:00Z'));
      const stale = bulletinSchema.parse((await c.analyst.get(`/api/bulletins/${b.id}`)).body);
      expect(stale.staleFigureCount).toBe(2);
      expect(stale.figures[0]).toMatchObject({ stale: true, staleBecause: 'newerRun', latestRunId: newer });
      expect(stale.figures[0].value?.text).toBe(palermoText(0));
      expect(stale.figures[0].latestValue?.text).toBe(palermoText(1));
      expect(palermoText(0)).not.toBe(palermoText(1));

      // Submitting needs a written reason; the reason is kept.
      const refused = await transition(c.analyst, b, { action: 'submit' });
      expect(refused.status).toBe(422);
      expect(refused.body.error.details.guard).toBe('staleReason');
      const reason = 'The newer run only moves the analysis date; the office stands by the December figures.';
      const ok = await transition(c.analyst, b, { action: 'submit', staleReason: reason });
      expect(ok.status).toBe(200);
      expect(ok.body.staleReason).toBe(reason);
      const kept = s.db.select().from(staleFigureConfirmations).where(eq(staleFigureConfirmations.bulletinId, b.id)).all();
      expect(kept).toHaveLength(1);
      expect(kept[0].reason).toBe(reason);
      expect(JSON.parse(kept[0].figuresJson)).toEqual([
        { index: 0, runId: older, latestRunId: newer, quantity: 'palermo' },
        { index: 1, runId: older, latestRunId: newer, quantity: 'impactProbability' },
      ]);
      const approved = await transition(c.reviewer, b, { action: 'approve', comment: 'Accepted with the stated reason.', confirmedFigures: confirmAll(stale) });
      expect(approved.status).toBe(200);
      expect(bulletinVersionDetailSchema.parse((await c.analyst.get(`/api/bulletins/${b.id}/versions/1`)).body).staleReason).toBe(reason);

      // Version 2: rebound to the newer run and the lead rewritten.
      expect((await transition(c.analyst, b, { action: 'amend' })).status).toBe(200);
      const draft = bulletinSchema.parse((await c.analyst.get(`/api/bulletins/${b.id}`)).body);
      const saved = await c.analyst.request('PUT', `/api/bulletins/${b.id}`, { body: { revision: draft.revision, document: docWithFigures(newer, 'The asteroid passes Earth on 17 September 2034.') } });
      expect(saved.status).toBe(200);
      expect(saved.body.staleFigureCount).toBe(0);
      expect((await transition(c.analyst, b, { action: 'submit' })).status).toBe(200);
      expect((await transition(c.reviewer, b, { action: 'approve', comment: 'v2', confirmedFigures: confirmAll(bulletinSchema.parse(saved.body)) })).status).toBe(200);

      const v2 = bulletinVersionDetailSchema.parse((await c.analyst.get(`/api/bulletins/${b.id}/versions/2`)).body);
      expect(v2.diff?.against).toBe(1);
      // A newer solution version without a run yet also marks the figures out of date (no new value to show).
      const opm = fs.readFileSync(path.join(process.cwd(), 'server/db/demo/hso-26-n4.opm'), 'utf8');
      s.services.objects.addSolution(obj, { text: opm, sourceKind: 'opm', fileName: 'hso-26-n4-refit.opm', fit: { observationArcDays: 30, observationCount: 120, fitRmsArcsec: 0.4 } }, null);
      const afterRefit = bulletinSchema.parse((await c.analyst.get(`/api/bulletins/${b.id}`)).body);
      expect(afterRefit.figures.map((f) => [f.stale, f.staleBecause, f.latestValue])).toEqual([
        [true, 'newerSolution', null],
        [true, 'newerSolution', null],
      ]);

      expect(v2.diff?.text.filter((o) => o.op === 'delete').map((o) => o.text)).toEqual(['The asteroid passes Earth in September 2034.', `Palermo scale: «${palermoText(0)}».`]);
      expect(v2.diff?.text.filter((o) => o.op === 'insert').map((o) => o.text)).toEqual(['The asteroid passes Earth on 17 September 2034.', `Palermo scale: «${palermoText(1)}».`]);
      const figs = v2.diff!.figures;
      expect(figs.map((f) => [f.quantity, f.change, f.before?.text, f.after?.text])).toEqual([
        ['palermo', 'changed', palermoText(0), palermoText(1)],
        // Same probability in both runs (the analysis date does not enter it): the figure was only rebound.
        ['impactProbability', 'rebound', figs[1].before?.text, figs[1].before?.text],
      ]);
      expect(figs[1].before?.runId).toBe(older);
      expect(figs[1].after?.runId).toBe(newer);
    } finally {
      await s.close();
    }
  }, 30_000);
});
