// Distribution of a locked bulletin version: stakeholder lists (a liaison user and an outside address), the e-mail
// through the outbox with the SMTP server down and then up again (nothing lost, nothing sent twice), the message
// read back from the SMTP fake with its PDF attachment (the same bytes as the version's PDF), the delivery log per
// recipient, the liaison's briefing inbox and acknowledgement, and what the sender sees.
// Sources: the agreed contract (issue 6 item 6 and the resource list); transactional outbox and at-most-once per row:
// common practice, no source; PDF files start with "%PDF-" (ISO 32000-1 §7.5.2, file header); RFC 9110 §15.5.10 (409).
import { eq } from 'drizzle-orm';
import nodemailer from 'nodemailer';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mailOutbox } from '../../server/db/schema';
import { createMailService } from '../../server/services/mail';
import { render } from '../../server/services/templates';
import { bulletinSchema, briefingDetailSchema, briefingListResponseSchema, distributionSchema, stakeholderListSchema, type Distribution } from '../../shared/schemas/bulletins';
import { DEMO_USERS, startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';
import { approvedBulletin, FIXTURE_RUNS, insertRun, neaIds, signedIn } from './bulletinsSetup';

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

const LIAISON = DEMO_USERS.find((u) => u.role === 'liaison')!;
const OUTSIDE = 'duty.officer@coastal-authority.example';

async function poll(client: ApiClient, id: number, pred: (d: Distribution) => boolean, timeoutMs = 10_000): Promise<Distribution> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const d = distributionSchema.parse((await client.get(`/api/distributions/${id}`)).body);
    if (pred(d)) return d;
    if (Date.now() > until) throw new Error(`distribution ${id} did not reach the expected state: ${JSON.stringify(d.recipients)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('distribution', () => {
  it('sends the approved version to a list through the outbox, waits out an SMTP outage, and records acknowledgements', async () => {
    const liaisonId = (await as.liaison.get('/api/session')).body.user.id as number;
    const listRes = await as.communications.request('POST', '/api/stakeholder-lists', {
      body: { name: 'Coastal liaisons', kind: 'government', description: 'Regional government contacts', members: [{ userId: liaisonId }, { email: OUTSIDE, name: 'Coastal Authority duty officer' }] },
    });
    expect(listRes.status, JSON.stringify(listRes.body)).toBe(201);
    const list = stakeholderListSchema.parse(listRes.body);
    expect(list.members.map((m) => [m.email, m.role])).toEqual([
      [LIAISON.email, 'liaison'],
      [OUTSIDE, null],
    ]);

    const b = await approvedBulletin(as, objectId, run1);
    const pdfRes = await fetch(`${srv.url}/api/bulletins/${b.id}/versions/1/pdf`, { headers: { cookie: as.communications.cookieHeader() } });
    expect(pdfRes.status).toBe(200);
    expect(pdfRes.headers.get('content-type')).toMatch(/^application\/pdf/);
    const pdf = Buffer.from(await pdfRes.arrayBuffer());
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');

    // SMTP down: the distribution is accepted, every message waits in the outbox with its failed attempt logged.
    await srv.mail.stop();
    srv.mail.clear();
    const sent = await as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId: list.id } });
    expect(sent.status, JSON.stringify(sent.body)).toBe(201);
    const dist = distributionSchema.parse(sent.body);
    expect(dist.recipients).toHaveLength(2);
    const failedOnce = await poll(as.communications, dist.id, (d) => d.recipients.every((r) => r.attempts >= 1));
    for (const r of failedOnce.recipients) {
      expect(r.status).toBe('pending');
      expect(r.lastError).toBeTruthy();
      expect(r.sentAt).toBeNull();
    }
    expect(await srv.mail.messages()).toHaveLength(0);
    // A second attempt (the retry pass, or the row's own 1 s retry timer, whichever comes first) fails again and
    // schedules the next attempt 30 s later (backoff); nothing retries it before then.
    await srv.services.mail.deliverPending();
    const ours = () => srv.db.select().from(mailOutbox).all().filter((r) => failedOnce.recipients.some((x) => x.email === r.toAddress));
    for (const until = Date.now() + 10_000; !ours().every((r) => r.attempts >= 2 && r.claimedUntil === null) && Date.now() < until; ) await new Promise((r) => setTimeout(r, 50));
    await srv.services.mail.deliverPending();
    const rows = ours();
    expect(rows.every((r) => r.status === 'pending' && r.attempts === 2 && r.nextAttemptAt !== null && r.nextAttemptAt.getTime() > Date.now())).toBe(true);

    // SMTP back: the retry pass (what the server's timer runs) sends each message once.
    await srv.mail.start();
    for (const r of rows) srv.db.update(mailOutbox).set({ nextAttemptAt: new Date(Date.now() - 1) }).where(eq(mailOutbox.id, r.id)).run();
    // Two senders at once (this server's outbox and a second one on the same database, as a second process would
    // have): the atomic claim lets only one of them send each row.
    const otherTransport = nodemailer.createTransport({ host: '127.0.0.1', port: srv.mail.port, ignoreTLS: true });
    const otherSender = createMailService(srv.db, otherTransport, srv.config.mailFrom);
    await Promise.all([srv.services.mail.deliverPending(), otherSender.deliverPending(), srv.services.mail.deliverPending()]);
    otherTransport.close();
    const delivered = await poll(as.communications, dist.id, (d) => d.recipients.every((r) => r.status === 'sent'));
    expect(delivered.counts).toMatchObject({ total: 2, sent: 2, pending: 0, failed: 0, acknowledged: 0 });
    expect(delivered.recipients.every((r) => r.attempts === 3)).toBe(true);
    await srv.services.mail.deliverPending();
    const messages = await srv.mail.messages();
    expect(messages.map((m) => m.to[0]).sort()).toEqual([LIAISON.email, OUTSIDE].sort());

    // The e-mail as received: subject, both bodies with the figures and the hash, the PDF attached byte for byte.
    const v = (await as.communications.get(`/api/bulletins/${b.id}/versions/1`)).body;
    const toLiaison = messages.find((m) => m.to[0] === LIAISON.email)!;
    expect(toLiaison.subject).toContain(`${b.number} v1`);
    const palermo = FIXTURE_RUNS[0].result.approaches[0].palermo!.toFixed(2);
    for (const body of [toLiaison.text, toLiaison.html]) {
      expect(body).toContain(`Palermo scale (earth, 2034-09-17): ${palermo} [run ${run1}]`);
      expect(body).toContain(v.sha256);
    }
    expect(toLiaison.text).toContain(`/briefings/${delivered.recipients.find((r) => r.email === LIAISON.email)!.id}`);
    expect(toLiaison.attachments).toHaveLength(1);
    expect(toLiaison.attachments[0].filename).toBe(`${b.number}-v1.pdf`);
    expect(toLiaison.attachments[0].contentType).toBe('application/pdf');
    expect(toLiaison.attachments[0].content.equals(pdf)).toBe(true);
    const toOutside = messages.find((m) => m.to[0] === OUTSIDE)!;
    expect(toOutside.text).not.toContain('/briefings/');
    expect(toOutside.attachments[0].content.equals(pdf)).toBe(true);

    // The bulletin and the version are distributed; the same version to the same list again is refused.
    expect(bulletinSchema.parse((await as.analyst.get(`/api/bulletins/${b.id}`)).body).state).toBe('distributed');
    expect((await as.analyst.get(`/api/bulletins/${b.id}/versions`)).body.versions[0].status).toBe('distributed');
    expect((await as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId: list.id } })).status).toBe(409);

    // The liaison's inbox: what was sent to them, the PDF, and the acknowledgement.
    const inbox = briefingListResponseSchema.parse((await as.liaison.get('/api/briefings')).body).briefings;
    expect(inbox).toHaveLength(1);
    expect(inbox[0]).toMatchObject({ bulletinId: b.id, version: 1, sha256: v.sha256, acknowledgedAt: null, objectDesignation: 'HSO-26-N4' });
    const detail = briefingDetailSchema.parse((await as.liaison.get(`/api/briefings/${inbox[0].id}`)).body);
    expect(detail.figures.map((f) => f.value.text)[0]).toBe(palermo);
    const briefPdf = await fetch(`${srv.url}${detail.pdfUrl}`, { headers: { cookie: as.liaison.cookieHeader() } });
    expect(Buffer.from(await briefPdf.arrayBuffer()).equals(pdf)).toBe(true);
    // Nobody else can see or acknowledge it (answered as missing); liaisons do not read bulletins directly.
    expect((await as.analyst.request('POST', `/api/briefings/${inbox[0].id}/acknowledge`, { body: {} })).status).toBe(403);
    expect((await as.liaison.get(`/api/bulletins/${b.id}`)).status).toBe(403);
    const ack = await as.liaison.request('POST', `/api/briefings/${inbox[0].id}/acknowledge`, { body: { comment: 'Received; passed to the duty desk.' } });
    expect(ack.status).toBe(200);
    expect(ack.body.acknowledgedAt).toBeTruthy();
    const again = await as.liaison.request('POST', `/api/briefings/${inbox[0].id}/acknowledge`, { body: { comment: 'twice' } });
    expect(again.body.acknowledgedAt).toBe(ack.body.acknowledgedAt);
    expect(again.body.acknowledgeComment).toBe('Received; passed to the duty desk.');

    // The sender sees who acknowledged and who has not.
    const seen = distributionSchema.parse((await as.communications.get(`/api/distributions/${dist.id}`)).body);
    expect(seen.counts.acknowledged).toBe(1);
    expect(seen.recipients.map((r) => [r.email, r.acknowledgedAt !== null])).toEqual([
      [LIAISON.email, true],
      [OUTSIDE, false],
    ]);
    const byBulletin = (await as.reviewer.get(`/api/distributions?bulletinId=${b.id}`)).body.distributions;
    expect(byBulletin).toHaveLength(1);
  }, 60_000);

  it('refuses distribution by roles the workflow does not list, of versions that are not the latest, and to empty lists', async () => {
    const b = await approvedBulletin(as, objectId, run1);
    const lists = (await as.communications.get('/api/stakeholder-lists')).body.lists as { id: number; name: string }[];
    const listId = lists.find((l) => l.name === 'Coastal liaisons')!.id;
    // Analysts and reviewers have no Distribution create ability (403 from the route table).
    expect((await as.analyst.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId } })).status).toBe(403);
    expect((await as.reviewer.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId } })).status).toBe(403);
    expect((await as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 2, listId } })).status).toBe(409);
    const empty = await as.communications.request('POST', '/api/stakeholder-lists', { body: { name: 'Empty', kind: 'internal', members: [] } });
    expect(empty.status).toBe(201);
    expect((await as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId: empty.body.id } })).status).toBe(422);
    // The same send twice at once (double click, two tabs): one distribution, one 409.
    const [x, y] = await Promise.all([
      as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId } }),
      as.communications.request('POST', '/api/distributions', { body: { bulletinId: b.id, version: 1, listId } }),
    ]);
    expect([x.status, y.status].sort()).toEqual([201, 409]);
    expect((await as.communications.get(`/api/distributions?bulletinId=${b.id}`)).body.distributions).toHaveLength(1);
    // A draft in review cannot be distributed.
    const draft = await as.analyst.request('POST', '/api/bulletins', { body: { objectId, title: 'Draft only' } });
    expect((await as.communications.request('POST', '/api/distributions', { body: { bulletinId: draft.body.id, version: 1, listId } })).status).toBe(409);
  });

  it('escapes what users typed in the HTML e-mail (OWASP XSS Prevention Cheat Sheet, rule 1) and not in the text one', () => {
    const values = { officeName: 'HSPDO', marking: 'M', number: 'BUL-0001', version: '1', title: '<script>alert(1)</script>', objectDesignation: 'X', approvedAt: 'now', reviewerName: 'R', figures: '- a', summary: '<img src=x onerror=1>', pdfName: 'f.pdf', ackLine: '', sha256: 'h' };
    const html = render('email/briefing.html', values);
    expect(html).not.toContain('<script>');
    expect(html).not.toContain('<img');
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(render('email/briefing.txt', values)).toContain('<script>alert(1)</script>');
  });
});
