// Demo bulletins: made once the demo asteroid's run is done (not before), with every figure bound to that run;
// one approved and distributed (to the seeded government list, PDF attached), one in review; made once only.
// Source: the agreed contract (issue 6 item 7). The run is the real engine-run fixture stored directly.
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { assessmentRuns } from '../../server/db/schema';
import { DEMO_OFFICE } from '../../server/db/seed';
import { DEMO_LISTS, seedDemoBulletins } from '../../server/services/bulletins/demo';
import { bulletinListResponseSchema, bulletinSchema, distributionSchema } from '../../shared/schemas/bulletins';
import { startTestServer, type TestServer } from '../helpers/testServer';
import type { ApiClient } from './apiClient';
import { insertRun, signedIn } from './bulletinsSetup';

let srv: TestServer;
beforeAll(async () => {
  srv = await startTestServer();
});
afterAll(() => srv?.close());

describe('demo bulletins', () => {
  it('waits for the demo run, then makes one distributed and one in-review bulletin bound to it, once', async () => {
    // No run at all: nothing to wait for, nothing made. A queued run: wait for it.
    expect(await seedDemoBulletins(srv.services, DEMO_OFFICE.emailDomain)).toBe('done');
    const queued = insertRun(srv, 0, new Date('2026-12-01T00:30:00Z'));
    srv.db.update(assessmentRuns).set({ status: 'queued', resultJson: null, finishedAt: null }).where(eq(assessmentRuns.id, queued)).run();
    expect(await seedDemoBulletins(srv.services, DEMO_OFFICE.emailDomain)).toBe('waiting');
    expect(srv.services.bulletins.list({}).bulletins).toHaveLength(0);

    const runId = insertRun(srv, 0, new Date('2026-12-01T01:00:00Z'));
    srv.db.update(assessmentRuns).set({ status: 'cancelled' }).where(eq(assessmentRuns.id, queued)).run();
    expect(await seedDemoBulletins(srv.services, DEMO_OFFICE.emailDomain)).toBe('done');
    expect(await seedDemoBulletins(srv.services, DEMO_OFFICE.emailDomain)).toBe('done');
    // Signed in after the seeding (its first PDF render holds the event loop for a moment).
    const as: Record<string, ApiClient> = await signedIn(srv.url);
    const lists = (await as.communications.get('/api/stakeholder-lists')).body.lists as { name: string; members: unknown[] }[];
    expect(lists.map((l) => l.name).sort()).toEqual(DEMO_LISTS.map((l) => l.name).sort());
    const all = bulletinListResponseSchema.parse((await as.analyst.get('/api/bulletins')).body).bulletins;
    expect(all.map((b) => b.state).sort()).toEqual(['distributed', 'in_review']);
    for (const s of all) {
      const b = bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${s.id}`)).body);
      expect(b.figures.length).toBeGreaterThanOrEqual(5);
      for (const f of b.figures) {
        expect(f.attrs.runId).toBe(runId);
        expect(f.value, f.problem ?? '').not.toBeNull();
      }
    }
    const distributed = all.find((b) => b.state === 'distributed')!;
    const d = distributionSchema.parse((await as.communications.get(`/api/distributions?bulletinId=${distributed.id}`)).body.distributions[0]);
    expect(d.list.name).toBe(DEMO_LISTS[0].name);
    expect(d.recipients.map((r) => r.email).sort()).toEqual([`liaison@${DEMO_OFFICE.emailDomain}`, ...DEMO_LISTS[0].external.map((e) => e.email)].sort());
    const mail = await srv.mail.waitFor(`liaison@${DEMO_OFFICE.emailDomain}`, 15_000);
    expect(mail.attachments[0].content.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect((await as.liaison.get('/api/briefings')).body.briefings).toHaveLength(1);
  }, 30_000);
});
