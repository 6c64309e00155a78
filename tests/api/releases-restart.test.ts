// The scheduler is durable: a release scheduled on one server is published by the next one started on the same
// database, exactly once, both when the new server is up at the release's time and when no server was running then
// (published on start, with how late recorded); two servers running on one database publish a release once.
// Sources: the agreed contract (issue 7 item 3 and item 7); the database as the source of truth for what is
// scheduled, re-armed on start, and idempotent sending: the team handbook's architecture notes (common practice,
// no source).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { releaseEvents } from '../../server/db/schema';
import { releaseSchema } from '../../shared/schemas/releases';
import { startTestServer, type TestServer } from '../helpers/testServer';
import { signedIn } from './bulletinsSetup';
import { approvedRelease, PRESS_ADDRESS, releaseFixture, schedule, until } from './releasesSetup';

const servers: TestServer[] = [];
// Our own database folder: a server given `databaseFile` leaves the file in place when it closes (a restart).
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-releases-restart-'));
afterAll(async () => {
  for (const s of servers.reverse()) {
    s.services.releaseScheduler.stop();
    await s.close().catch(() => undefined);
  }
  fs.rmSync(dir, { recursive: true, force: true });
});

function publishEvents(srv: TestServer, id: number) {
  return srv.db.select().from(releaseEvents).where(eq(releaseEvents.releaseId, id)).all().filter((e) => e.action === 'publish');
}

describe('restart', () => {
  it('publishes once after a restart between scheduling and the time, also when the server was down at the time', async () => {
    const a = await startTestServer({ databaseFile: path.join(dir, 'restart.sqlite') });
    servers.push(a);
    const asA = await signedIn(a.url);
    const { bulletinId } = await releaseFixture(a, asA);
    a.services.releaseScheduler.start();
    const down = await approvedRelease(asA, bulletinId, 'Due while the server is down');
    const up = await approvedRelease(asA, bulletinId, 'Due after the restart');
    const downDue = Date.now() + 6000;
    const upDue = Date.now() + 16_000;
    expect((await schedule(asA.communications, down.id, new Date(downDue).toISOString())).status).toBe(200);
    expect((await schedule(asA.communications, up.id, new Date(upDue).toISOString())).status).toBe(200);
    // Server A goes away before either time (its scheduler first, then HTTP and SMTP fake); its database file stays.
    a.services.releaseScheduler.stop();
    expect(Date.now()).toBeLessThan(downDue);
    await a.close();
    servers.splice(servers.indexOf(a), 1);
    // Nothing runs at downDue.
    await new Promise((r) => setTimeout(r, Math.max(0, downDue - Date.now()) + 1000));

    const b = await startTestServer({ databaseFile: a.databaseFile, seed: false });
    servers.push(b);
    const startedAt = Date.now();
    const onStart = b.services.releaseScheduler.start();
    expect(onStart.map((p) => p.id)).toContain(down.id);
    const asB = await signedIn(b.url);

    const d = releaseSchema.parse((await asB.communications.get(`/api/releases/${down.id}`)).body);
    expect(d.state).toBe('published');
    expect(d.publication.publishedOnStart).toBe(true);
    expect(d.publication.lateByMs).toBeGreaterThanOrEqual(1000);
    expect(d.publication.lateByMs).toBe(Date.parse(d.publication.publishedAt!) - downDue);
    expect(d.events.filter((e) => e.action === 'publish')[0].comment).toMatch(/on start/);

    const u = await until(
      'the second release to be published by the new server',
      async () => releaseSchema.parse((await asB.communications.get(`/api/releases/${up.id}`)).body),
      (x) => x.state === 'published',
      90_000,
    );
    expect(Date.parse(u.publication.publishedAt!)).toBeGreaterThanOrEqual(upDue);
    // Published at its time by the re-armed timer, unless this loaded machine took longer than that to start B.
    expect(u.publication.publishedOnStart).toBe(startedAt > upDue);

    const pub = (await (await fetch(`${b.url}/api/public/releases`)).json()) as { releases: { slug: string }[] };
    expect(pub.releases.map((x) => x.slug).sort()).toEqual([d.publication.slug, u.publication.slug].sort());
    // Exactly once each: one publish event and one press e-mail per release.
    expect(publishEvents(b, down.id)).toHaveLength(1);
    expect(publishEvents(b, up.id)).toHaveLength(1);
    await until('two press e-mails', () => b.mail.messages(), (m) => m.filter((x) => x.to.includes(PRESS_ADDRESS)).length >= 2, 30_000);
    b.services.releaseScheduler.tick();
    await new Promise((r) => setTimeout(r, 1000));
    const press = (await b.mail.messages()).filter((x) => x.to.includes(PRESS_ADDRESS));
    expect(press.map((m) => m.subject).sort()).toEqual([`Press release ${down.number}: Due while the server is down`, `Press release ${up.number}: Due after the restart`].sort());
  }, 240_000);

  it('two servers on one database publish a release once', async () => {
    const a = await startTestServer({ databaseFile: path.join(dir, 'two.sqlite') });
    servers.push(a);
    const b = await startTestServer({ databaseFile: a.databaseFile, seed: false });
    servers.push(b);
    const asA = await signedIn(a.url);
    const { bulletinId } = await releaseFixture(a, asA);
    a.services.releaseScheduler.start();
    b.services.releaseScheduler.start();
    const r = await approvedRelease(asA, bulletinId, 'Two schedulers');
    const due = Date.now() + 2000;
    expect((await schedule(asA.communications, r.id, new Date(due).toISOString())).status).toBe(200);
    // B did not see the schedule change notification: it finds the release on its own look at the database (at most
    // maxSleepMs later) or A publishes it first; either way once.
    await until('publication', async () => releaseSchema.parse((await asA.communications.get(`/api/releases/${r.id}`)).body), (x) => x.state === 'published', 60_000);
    b.services.releaseScheduler.tick();
    a.services.releaseScheduler.tick();
    await until('the press e-mail', async () => [...(await a.mail.messages()), ...(await b.mail.messages())], (m) => m.some((x) => x.subject.includes('Two schedulers')), 30_000);
    await new Promise((res) => setTimeout(res, 1000));
    expect(publishEvents(a, r.id)).toHaveLength(1);
    const all = [...(await a.mail.messages()), ...(await b.mail.messages())].filter((x) => x.subject.includes('Two schedulers'));
    expect(all).toHaveLength(1);
  }, 180_000);
});
