// Press releases: created from an approved bulletin version with its figures copied (not live), reviewed by someone
// other than the author, scheduled in UTC, published once at the time by the scheduler, and never visible on a
// public route (JSON, pages, Atom feed) before that; role refusals.
// Sources: the agreed contract (issue 7 items 1-5 and 7, resource list); RFC 4287 (Atom: feed/entry/id/updated);
// ISO 8601 / RFC 3339 (a time with an offset denotes one UTC instant); RFC 9110 §15.5.4 (403), §15.5.2 (401),
// §15.5.5 (404), §15.5.10 (409); XML well-formedness checked with saxes (a strict XML 1.0 parser, installed as a
// dependency of jsdom); transactional outbox and exactly-once by conditional UPDATE: common practice, no source.
import { eq } from 'drizzle-orm';
import { SaxesParser } from 'saxes';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { releaseEvents } from '../../server/db/schema';
import { createReleaseScheduler } from '../../server/services/releases/scheduler';
import { releaseSlug } from '../../server/services/releases/service';
import { PUBLIC_CAUTION, roundForPublic } from '../../shared/releases/plainLanguage';
import { bulletinVersionDetailSchema } from '../../shared/schemas/bulletins';
import { publicReleaseListResponseSchema, publicReleaseSchema, releaseSchema } from '../../shared/schemas/releases';
import { startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';
import { signedIn } from './bulletinsSetup';
import { act, approvedRelease, createRelease, isoWithOffset, PRESS_ADDRESS, publicView, releaseFixture, schedule, until } from './releasesSetup';

let srv: TestServer;
let as: Record<string, ApiClient>;
let bulletinId: number;

beforeAll(async () => {
  srv = await startTestServer();
  as = await signedIn(srv.url);
  ({ bulletinId } = await releaseFixture(srv, as));
  srv.services.releaseScheduler.start();
}, 60_000);
afterAll(async () => {
  srv?.services.releaseScheduler.stop();
  await srv?.close();
});

const publishEvents = (id: number) => srv.db.select().from(releaseEvents).where(eq(releaseEvents.releaseId, id)).all().filter((e) => e.action === 'publish');

describe('drafting', () => {
  it('copies the figures of the bulletin version, states them in plain language and keeps the standing caution', async () => {
    const v = bulletinVersionDetailSchema.parse((await as.communications.get(`/api/bulletins/${bulletinId}/versions/1`)).body);
    const r = await createRelease(as, bulletinId);
    expect(r.state).toBe('draft');
    expect(r.number).toMatch(/^REL-\d{4}$/);
    expect(r.source).toMatchObject({ bulletinId, version: 1, sha256: v.sha256, objectDesignation: v.objectDesignation });
    expect(r.figures).toEqual(v.figures);
    const ip = v.figures.find((f) => f.value.quantity === 'impactProbability')!;
    const stmt = r.plainLanguage.statements.find((s) => s.quantity === 'impactProbability')!;
    expect(stmt.figureIndex).toBe(ip.index);
    expect(stmt.text).toMatch(/^about 1 in [\d,]+/);
    expect(r.plainLanguage.caution).toBe(PUBLIC_CAUTION);
    // The starting summary states the odds without cutting them at the thousands separator.
    // (1/p to two significant digits, grouped: e.g. 1/8.3e-5 -> "12,000").
    expect(r.summary).toBe(`${v.objectDesignation}: chance of impact about 1 in ${roundForPublic(1 / (ip.value.value as number))}.`);
    expect(r.plainLanguage.uncertainty.length).toBeGreaterThan(20);
    // The starting text quotes the copied figures as linked figures.
    expect(JSON.stringify(r.document)).toContain('"linkedFigure"');

    // Edits: a figure that is not one of the copied ones, or a risk table, is refused; a good save moves the revision.
    const bad = { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'linkedFigure', attrs: { runId: 999_999, quantity: 'palermo', body: 'earth', epochTdbJd: 2_460_000.5 } }] }] };
    expect((await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, document: bad } })).status).toBe(422);
    const table = { type: 'doc', content: [{ type: 'riskTable', attrs: { runId: ip.attrs.runId } }] };
    expect((await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, document: table } })).status).toBe(422);
    const ok = await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, summary: 'A close approach in 2034.' } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    expect(releaseSchema.parse(ok.body).revision).toBe(r.revision + 1);
    // A save on the old revision is a conflict that returns the stored copy.
    const stale = await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, summary: 'other' } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.summary).toBe('A close approach in 2034.');

    // A version that does not exist cannot be the source.
    expect((await as.communications.request('POST', '/api/releases', { body: { bulletinId, version: 99 } })).status).toBe(422);
  });
});

describe('review and roles', () => {
  it('liaisons see a release only once its wording is approved; drafts, reviews and cancelled ones answer 404', async () => {
    // Rule of shared/abilities.ts (RELEASE_STATES_FOR_LIAISONS); 404 rather than 403 so existence is not disclosed
    // (RFC 9110 §15.5.5 allows 404 for a resource the server will not reveal).
    const draft = await createRelease(as, bulletinId, 'Liaison visibility draft');
    const approved = await approvedRelease(as, bulletinId, 'Liaison visibility approved');
    const ids = async (c: ApiClient) => ((await c.get('/api/releases')).body.releases as { id: number }[]).map((r) => r.id);
    expect(await ids(as.liaison)).not.toContain(draft.id);
    expect(await ids(as.liaison)).toContain(approved.id);
    expect(await ids(as.analyst)).toEqual(expect.arrayContaining([draft.id, approved.id]));
    expect((await as.liaison.get(`/api/releases/${draft.id}`)).status).toBe(404);
    expect((await as.liaison.get(`/api/releases/${approved.id}`)).status).toBe(200);
    expect((await as.liaison.get(`/api/releases/${approved.id}/versions/1`)).status).toBe(200);
    expect((await act(as.communications, draft.id, { action: 'submit' })).status).toBe(200);
    expect((await as.liaison.get(`/api/releases/${draft.id}`)).status).toBe(404); // in review: still internal
    const cancelled = await as.admin.request('POST', `/api/releases/${approved.id}/cancel`, { body: { comment: 'Superseded by a newer statement.' } });
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
    expect((await as.liaison.get(`/api/releases/${approved.id}`)).status).toBe(404);
    expect((await as.liaison.get(`/api/releases/${approved.id}/versions/1`)).status).toBe(404);
    expect(await ids(as.liaison)).not.toContain(approved.id);
  });

  it('refuses what each role may not do, and locks the wording on approval', async () => {
    // Not signed in: 401 on the office API.
    const anon = new ApiClient(srv.url);
    expect((await anon.get('/api/releases')).status).toBe(401);
    expect((await anon.request('POST', '/api/releases', { body: { bulletinId, version: 1 } })).status).toBe(401);
    // Only communications staff start releases.
    for (const role of ['analyst', 'reviewer', 'liaison', 'admin']) {
      expect((await as[role].request('POST', '/api/releases', { body: { bulletinId, version: 1 } })).status, role).toBe(403);
    }
    const r = await createRelease(as, bulletinId, 'Roles test');
    // Only communications edit; reviewers cannot submit; the author cannot approve (and is not a reviewer).
    expect((await as.analyst.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, title: 'x' } })).status).toBe(403);
    expect((await as.liaison.request('PUT', `/api/releases/${r.id}`, { body: { revision: r.revision, title: 'x' } })).status).toBe(403);
    expect((await act(as.reviewer, r.id, { action: 'submit' })).status).toBe(403);
    expect((await act(as.communications, r.id, { action: 'submit' })).status).toBe(200);
    expect((await act(as.communications, r.id, { action: 'approve' })).status).toBe(403);
    expect((await act(as.analyst, r.id, { action: 'approve' })).status).toBe(403);
    // Request changes needs a comment (422); with it, back to the author.
    expect((await act(as.reviewer, r.id, { action: 'request_changes' })).status).toBe(422);
    expect((await act(as.reviewer, r.id, { action: 'request_changes', comment: 'Say when the next update is due.' })).status).toBe(200);
    expect((await act(as.communications, r.id, { action: 'revise' })).status).toBe(200);
    expect((await act(as.communications, r.id, { action: 'submit' })).status).toBe(200);
    const approved = await act(as.reviewer, r.id, { action: 'approve' });
    expect(approved.status).toBe(200);
    const a = releaseSchema.parse(approved.body);
    expect(a.state).toBe('approved');
    expect(a.latestVersion).toBe(1);
    expect(a.allowedActions).toEqual([]); // the reviewer's view: nothing more to do
    // Locked: no edits; the version is stored with its hash.
    expect((await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: a.revision, title: 'changed' } })).status).toBe(409);
    const v = await as.communications.get(`/api/releases/${r.id}/versions/1`);
    expect(v.status).toBe(200);
    expect(v.body.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(v.body.reviewer.name).not.toBe(v.body.author.name);
    // Scheduling is for communications; publishing is never a user action.
    const later = new Date(Date.now() + 86_400_000).toISOString();
    expect((await schedule(as.reviewer, r.id, later)).status).toBe(403);
    expect((await schedule(as.analyst, r.id, later)).status).toBe(403);
    expect((await act(as.communications, r.id, { action: 'publish' })).status).toBe(403);
    expect((await act(as.admin, r.id, { action: 'publish' })).status).toBe(403);
    // A time in the past is refused (422), a bad time zone too (400/422).
    expect((await schedule(as.communications, r.id, new Date(Date.now() - 3_600_000).toISOString())).status).toBe(422);
    expect([400, 422]).toContain((await schedule(as.communications, r.id, later, 'Mars/Olympus_Mons')).status);
    // Cancel needs a reason; a cancelled release is gone for good.
    expect([400, 422]).toContain((await as.communications.request('POST', `/api/releases/${r.id}/cancel`, { body: { comment: '' } })).status);
    const c = await as.communications.request('POST', `/api/releases/${r.id}/cancel`, { body: { comment: 'Superseded by a newer assessment.' } });
    expect(c.status).toBe(200);
    expect(c.body.state).toBe('cancelled');
    expect((await schedule(as.communications, r.id, later)).status).toBe(409);
  });
});

describe('amending', () => {
  it('starts a new version of an approved wording; version 1 stays as locked and version 2 is what gets published', async () => {
    const r = await approvedRelease(as, bulletinId, 'Amend check');
    const v1 = (await as.communications.get(`/api/releases/${r.id}/versions/1`)).body;
    const amended = await act(as.communications, r.id, { action: 'amend' });
    expect(amended.status, JSON.stringify(amended.body)).toBe(200);
    const d = releaseSchema.parse(amended.body);
    expect([d.state, d.draftVersion, d.latestVersion]).toEqual(['draft', 2, 1]);
    const saved = await as.communications.request('PUT', `/api/releases/${r.id}`, { body: { revision: d.revision, title: 'Amend check, second wording' } });
    expect(saved.status).toBe(200);
    expect((await act(as.communications, r.id, { action: 'submit' })).status).toBe(200);
    expect((await act(as.reviewer, r.id, { action: 'approve' })).status).toBe(200);
    expect((await as.communications.get(`/api/releases/${r.id}/versions/1`)).body).toEqual(v1);
    const v2 = (await as.communications.get(`/api/releases/${r.id}/versions/2`)).body;
    expect(v2.title).toBe('Amend check, second wording');
    expect(v2.sha256).not.toBe(v1.sha256);
    // Published with an injected clock: the public page shows version 2's wording.
    const dueMs = Date.now() + 30 * 86_400_000;
    expect((await schedule(as.communications, r.id, new Date(dueMs).toISOString())).status).toBe(200);
    const out = createReleaseScheduler(srv.services.releases, { now: () => dueMs, log: () => undefined }).tick().filter((p) => p.id === r.id);
    expect(out).toHaveLength(1);
    const item = publicReleaseSchema.parse(await (await fetch(`${srv.url}/api/public/releases/${out[0].slug}`)).json());
    expect([item.title, item.version]).toEqual(['Amend check, second wording', 2]);
    await until('the press e-mail', () => srv.mail.messages(), (m) => m.some((x) => x.subject.includes('Amend check, second wording')), 30_000);
  });
});

describe('withdrawn source', () => {
  it('never publishes figures of a bulletin version that was withdrawn after scheduling', async () => {
    const fresh = await releaseFixture(srv, as);
    const r = await approvedRelease(as, fresh.bulletinId, 'Withdrawn source check');
    const dueMs = Date.now() + 40 * 86_400_000;
    expect((await schedule(as.communications, r.id, new Date(dueMs).toISOString())).status).toBe(200);
    const w = await as.reviewer.request('POST', `/api/bulletins/${fresh.bulletinId}/transitions`, { body: { action: 'withdraw', comment: 'The orbit solution was found to be wrong.' } });
    expect(w.status, JSON.stringify(w.body)).toBe(200);
    const out = createReleaseScheduler(srv.services.releases, { now: () => dueMs + 1, log: () => undefined }).tick().filter((p) => p.id === r.id);
    expect(out).toEqual([]);
    const x = releaseSchema.parse((await as.communications.get(`/api/releases/${r.id}`)).body);
    expect(x.state).toBe('cancelled');
    expect(x.events.at(-1)?.comment).toMatch(/withdrawn/);
    expect(publishEvents(r.id)).toHaveLength(0);
    // And no new release starts from it.
    expect((await as.communications.request('POST', '/api/releases', { body: { bulletinId: fresh.bulletinId, version: 1 } })).status).toBe(422);
  });
});

describe('scheduling and the public site', () => {
  it('keeps a scheduled release off every public route until its time, then publishes it exactly once', async () => {
    const title = `Embargo check ${Date.now()}`;
    const r = await approvedRelease(as, bulletinId, title);
    const slug = releaseSlug(r.number, title);

    // Scheduled far ahead in a zone east of UTC: stored as the same instant in UTC.
    const farMs = Date.UTC(2031, 5, 1, 12, 0, 0);
    const s1 = await schedule(as.communications, r.id, isoWithOffset(farMs, 120), 'Europe/Berlin');
    expect(s1.status, JSON.stringify(s1.body)).toBe(200);
    expect(s1.body.state).toBe('scheduled');
    expect(s1.body.publication).toMatchObject({ publishAt: '2031-06-01T12:00:00.000Z', timeZone: 'Europe/Berlin', publishedAt: null, slug: null });

    // A draft and a cancelled release exist too; none of them may show.
    const draft = await createRelease(as, bulletinId, `Draft only ${Date.now()}`);
    const before = await publicView(srv.url, slug);
    for (const text of [before.list, before.listPage, before.feed]) {
      expect(text).not.toContain(title);
      expect(text).not.toContain(r.number);
      expect(text).not.toContain(draft.title);
    }
    expect(before.item).toBe(404);
    expect(before.page).toBe(404);
    expect(before.pageBody).not.toContain(title);
    expect(before.feed).toMatch(/^<\?xml version="1.0" encoding="utf-8"\?>\s*<feed xmlns="http:\/\/www.w3.org\/2005\/Atom">/);

    // Rescheduled to two seconds from now (a zone west of UTC this time): the scheduler re-arms and publishes.
    const dueMs = Date.now() + 2000;
    const s2 = await schedule(as.communications, r.id, isoWithOffset(dueMs, -300), 'America/New_York');
    expect(s2.status, JSON.stringify(s2.body)).toBe(200);
    expect(Date.parse(s2.body.publication.publishAt)).toBe(dueMs);
    const early = await publicView(srv.url, slug);
    if (Date.now() < dueMs - 200) {
      expect(early.item).toBe(404);
      expect(early.list).not.toContain(title);
      expect(early.feed).not.toContain(title);
    }

    const published = await until(
      'the release to be published',
      async () => releaseSchema.parse((await as.communications.get(`/api/releases/${r.id}`)).body),
      (x) => x.state === 'published',
    );
    expect(Date.parse(published.publication.publishedAt!)).toBeGreaterThanOrEqual(dueMs);
    expect(published.publication.slug).toBe(slug);
    expect(published.publication.publishedOnStart).toBe(false);
    expect(published.publication.lateByMs).toBeGreaterThanOrEqual(0);

    const after = await publicView(srv.url, slug);
    const list = publicReleaseListResponseSchema.parse(JSON.parse(after.list));
    expect(list.releases.map((x) => x.slug)).toContain(slug);
    expect(after.item).toBe(200);
    const item = publicReleaseSchema.parse(JSON.parse(after.itemBody));
    expect(item.title).toBe(title);
    expect(item.plainLanguage.caution).toBe(PUBLIC_CAUTION);
    expect(after.page).toBe(200);
    expect(after.pageBody).toContain(`<h1>${title}</h1>`);
    expect(after.pageBody).toContain('<html lang="en">');
    expect(after.pageBody).toContain('Please note.');
    expect(after.listPage).toContain(title);
    expect(after.feed).toContain(`<title>${title}</title>`);
    expect(after.feed).toContain(`/public/releases/${slug}</id>`);
    // The draft is still nowhere.
    expect(after.list + after.listPage + after.feed).not.toContain(draft.title);

    // Once: the publish event, and one press e-mail to the press list.
    const mails = await until('the press e-mail', () => srv.mail.messages(), (m) => m.some((x) => x.subject.includes(title)), 30_000);
    const mail = mails.find((x) => x.subject.includes(title))!;
    expect(mail.to).toEqual([PRESS_ADDRESS]);
    expect(mail.text).toContain(`/public/releases/${slug}`);
    expect(mail.text).toContain(PUBLIC_CAUTION);
    // Asking again publishes nothing more.
    expect(srv.services.releases.publishDue(Date.now() + 1000)).toEqual([]);
    srv.services.releaseScheduler.tick();
    await new Promise((res) => setTimeout(res, 1500));
    expect(publishEvents(r.id)).toHaveLength(1);
    expect((await srv.mail.messages()).filter((m) => m.subject.includes(title))).toHaveLength(1);
  }, 120_000);

  it('does not publish a cancelled release when its time comes', async () => {
    const title = `Cancelled before its time ${Date.now()}`;
    const r = await approvedRelease(as, bulletinId, title);
    const dueMs = Date.now() + 4000;
    expect((await schedule(as.communications, r.id, new Date(dueMs).toISOString())).status).toBe(200);
    const c = await as.communications.request('POST', `/api/releases/${r.id}/cancel`, { body: { comment: 'Officials asked us to wait.' } });
    expect(c.status).toBe(200);
    expect(Date.now()).toBeLessThan(dueMs); // cancelled before its time
    await new Promise((res) => setTimeout(res, Math.max(0, dueMs - Date.now()) + 1500));
    srv.services.releaseScheduler.tick();
    const x = releaseSchema.parse((await as.communications.get(`/api/releases/${r.id}`)).body);
    expect(x.state).toBe('cancelled');
    expect(publishEvents(r.id)).toHaveLength(0);
    const view = await publicView(srv.url, releaseSlug(r.number, title));
    expect(view.item).toBe(404);
    expect(view.list + view.listPage + view.feed).not.toContain(title);
  }, 60_000);

  it('publishes by an injected clock: not a millisecond early, once at the time; the public markup is escaped and the feed well-formed', async () => {
    const title = `Clock check <b>"quotes" & ampersands</b> ${Date.now()}`;
    const r = await approvedRelease(as, bulletinId, title);
    const dueMs = Date.now() + 7 * 86_400_000; // far enough that the real scheduler never reaches it
    expect((await schedule(as.communications, r.id, new Date(dueMs).toISOString())).status).toBe(200);
    let clock = dueMs - 1;
    const sched = createReleaseScheduler(srv.services.releases, { now: () => clock, log: () => undefined });
    expect(sched.tick().map((p) => p.id)).not.toContain(r.id);
    expect(releaseSchema.parse((await as.communications.get(`/api/releases/${r.id}`)).body).state).toBe('scheduled');
    clock = dueMs + 250;
    const out = sched.tick().filter((p) => p.id === r.id);
    expect(out).toHaveLength(1);
    expect(out[0]).toMatchObject({ lateByMs: 250, onStart: false });
    expect(sched.tick().filter((p) => p.id === r.id)).toHaveLength(0);
    expect(publishEvents(r.id)).toHaveLength(1);

    // Markup in a title is text on the page, in the list and in the feed.
    const view = await publicView(srv.url, out[0].slug);
    const escaped = title.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
    expect(view.pageBody).toContain(`<h1>${escaped}</h1>`);
    expect(view.pageBody).not.toContain('<b>"quotes"');
    expect(view.feed).toContain(`<title>${escaped}</title>`);
    // The feed is well-formed XML (strict parser) and each entry has the elements RFC 4287 §4.1.2 requires.
    const entries: Record<string, number>[] = [];
    const feedElements = new Set<string>();
    let depth = 0;
    const parser = new SaxesParser({ xmlns: true });
    parser.on('opentag', (t) => {
      depth++;
      if (t.local === 'entry') entries.push({});
      else if (depth === 2) feedElements.add(t.local);
      else if (depth === 3 && entries.length) entries[entries.length - 1][t.local] = (entries[entries.length - 1][t.local] ?? 0) + 1;
    });
    parser.on('closetag', () => {
      depth--;
    });
    parser.write(view.feed).close();
    for (const el of ['id', 'title', 'updated', 'author', 'link']) expect(feedElements.has(el), el).toBe(true);
    expect(entries.length).toBeGreaterThanOrEqual(2);
    for (const e of entries) for (const el of ['id', 'title', 'updated', 'link', 'content']) expect(e[el], el).toBe(1);
    // Its press e-mail has gone out (before the server closes).
    await until('the press e-mail', () => srv.mail.messages(), (m) => m.some((x) => x.subject.includes(title)), 30_000);
  });
});
