// Demo releases: after the demo bulletins exist, one release published (on the public site and in the feed, press
// e-mail sent) and one scheduled for a future time (embargoed: on no public route); made once only.
// Source: the agreed contract (issue 7 item 6). The run is the real engine-run fixture stored directly.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_OFFICE } from '../../server/db/seed';
import { seedDemoBulletins } from '../../server/services/bulletins/demo';
import { DEMO_PRESS_LIST, seedDemoReleases } from '../../server/services/releases/demo';
import { releaseListResponseSchema } from '../../shared/schemas/releases';
import { startTestServer, type TestServer } from '../helpers/testServer';
import { insertRun, signedIn } from './bulletinsSetup';

let srv: TestServer;
beforeAll(async () => {
  srv = await startTestServer();
});
afterAll(() => srv?.close());

describe('demo releases', () => {
  it('waits for an approved bulletin, then publishes one release and schedules another, once', async () => {
    expect(seedDemoReleases(srv.services, DEMO_OFFICE.emailDomain)).toBe('waiting');
    insertRun(srv, 0, new Date('2026-12-01T01:00:00Z'));
    expect(await seedDemoBulletins(srv.services, DEMO_OFFICE.emailDomain)).toBe('done');
    const now = Date.now();
    expect(seedDemoReleases(srv.services, DEMO_OFFICE.emailDomain, now)).toBe('done');
    expect(seedDemoReleases(srv.services, DEMO_OFFICE.emailDomain, now)).toBe('done');
    const as = await signedIn(srv.url);
    const all = releaseListResponseSchema.parse((await as.communications.get('/api/releases')).body).releases;
    expect(all.map((r) => r.state).sort()).toEqual(['published', 'scheduled']);
    const pub = all.find((r) => r.state === 'published')!;
    const sch = all.find((r) => r.state === 'scheduled')!;
    expect(Date.parse(sch.publication.publishAt!)).toBeGreaterThan(now + 86_400_000);
    const list = (await (await fetch(`${srv.url}/api/public/releases`)).json()) as { releases: { slug: string; title: string }[] };
    expect(list.releases.map((r) => r.slug)).toEqual([pub.publication.slug]);
    const feed = await (await fetch(`${srv.url}/public/feed.atom`)).text();
    expect(feed).toContain(`<title>${pub.title}</title>`);
    expect(feed).not.toContain(sch.title);
    const page = await fetch(`${srv.url}/public/releases/${pub.publication.slug}`);
    expect(page.status).toBe(200);
    const mail = await srv.mail.waitFor(DEMO_PRESS_LIST.external[0].email, 15_000);
    expect(mail.subject).toBe(`Press release ${pub.number}: ${pub.title}`);
  }, 60_000);
});
