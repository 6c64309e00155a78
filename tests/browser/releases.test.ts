// Press releases in the browser (issue 7 item 7): communications staff start a release from an approved bulletin
// version, see the standing public caution and the plain-language statements, write the wording with a copied figure
// and submit it; a reviewer (not the author) approves the wording; communications staff, whose browser runs in the
// Europe/Berlin time zone, schedule publication a few seconds ahead by entering the time on their own clock; the
// release is absent from the public site, its JSON and the feed before that time, and the public page shows it after.
// Sources: the agreed contract (issue 7); the demo asteroid's designed encounter (server/db/demo/make-nea.ts: about
// 26 000 km from the centre of the Earth on 2034-09-17, i.e. well inside the Moon's distance); EU summer time
// (Directive 2000/84/EC: from 01:00 UTC on the last Sunday of March to 01:00 UTC on the last Sunday of October;
// Europe/Berlin is UTC+1 outside it and UTC+2 inside), computed below without Intl as an independent check of the
// form's conversion.
import { eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { users } from '../../server/db/schema';
import { PUBLIC_CAUTION } from '../../shared/releases/plainLanguage';
import { browserSuite, demoCredentials, newContext, screenshot, signedInPage, waitForHeading, watchPageErrors } from './harness';

const suite = browserSuite(
  { runner: { pollMs: 200 } },
  {
    setupTimeoutMs: 300_000,
    // the durable release scheduler, as server/index.ts starts it
    afterStart: (server) => server.services.releaseScheduler.start(),
    beforeClose: (server) => server.services.releaseScheduler.stop(),
  },
);

const pad = (n: number, w = 2) => String(n).padStart(w, '0');

/** Last Sunday of a month, 01:00 UTC, as epoch ms (EU summer-time switch instants). */
function lastSundayOneUtc(year: number, month0: number): number {
  const last = new Date(Date.UTC(year, month0 + 1, 0, 1, 0, 0));
  return last.getTime() - last.getUTCDay() * 86_400_000;
}

/** Europe/Berlin wall-clock "YYYY-MM-DDTHH:mm:ss" of a UTC instant, from the EU rule (no Intl). */
function berlinWall(utcMs: number): string {
  const y = new Date(utcMs).getUTCFullYear();
  const summer = utcMs >= lastSundayOneUtc(y, 2) && utcMs < lastSundayOneUtc(y, 9);
  const d = new Date(utcMs + (summer ? 2 : 1) * 3_600_000);
  return `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}T${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}:${pad(d.getUTCSeconds())}`;
}

async function apiJson(page: Page, method: 'GET' | 'POST', path: string, body?: unknown) {
  const { csrfToken } = await (await page.request.get('/api/csrf')).json();
  const res = method === 'GET' ? await page.request.get(path) : await page.request.post(path, { data: body, headers: { 'x-csrf-token': csrfToken } });
  if (!res.ok()) throw new Error(`${method} ${path}: ${res.status()} ${await res.text()}`);
  return res.json();
}

function actor(role: 'analyst' | 'reviewer' | 'communications') {
  const u = suite.server.db.select().from(users).where(eq(users.email, demoCredentials(role).email)).get();
  if (!u) throw new Error(`no demo ${role}`);
  return { id: u.id, role: u.role, name: u.name };
}

/**
 * An approved bulletin about the demo asteroid with its miss distance as a linked figure: a linear run queued through
 * the API (as the analyst), then the bulletin written, submitted and approved through the bulletin service.
 */
async function approvedBulletin(page: Page): Promise<{ id: number; title: string }> {
  const objects = await apiJson(page, 'GET', '/api/objects?q=HSO-26-N4');
  const objectId = objects.items[0].id as number;
  const { solutions } = await apiJson(page, 'GET', `/api/objects/${objectId}/solutions`);
  const queued = await apiJson(page, 'POST', '/api/runs', { solutionId: solutions[0].id, until: '2035-01-01T00:00:00Z', methods: ['linear'] });
  const deadline = Date.now() + 150_000;
  let run: { id: number; status: string; error?: string; result?: { approaches: { body: string; epochTdbJd: number }[] } };
  for (;;) {
    run = await apiJson(page, 'GET', `/api/runs/${queued.id}`);
    if (run.status === 'done') break;
    if (run.status === 'failed' || run.status === 'cancelled' || Date.now() > deadline) throw new Error(`run ${queued.id} ended ${run.status}: ${run.error}`);
    await page.waitForTimeout(250);
  }
  const approach = run.result!.approaches.find((a) => a.body === 'earth')!;
  const figure = { type: 'linkedFigure', attrs: { runId: run.id, quantity: 'missDistance', body: 'earth', epochTdbJd: approach.epochTdbJd } };
  const title = 'HSO-26-N4 passes the Earth in September 2034';
  const document = {
    type: 'doc',
    content: [{ type: 'paragraph', content: [{ type: 'text', text: 'Nominal miss distance from the centre of the Earth: ' }, figure, { type: 'text', text: '.' }] }],
  };
  const analyst = actor('analyst');
  const b = suite.server.services.bulletins.create({ objectId, title, document: document as never }, analyst);
  suite.server.services.bulletins.transition(b.id, { action: 'submit' }, analyst);
  suite.server.services.bulletins.transition(
    b.id,
    { action: 'approve', confirmedFigures: b.figures.map((f) => ({ index: f.index, runId: f.attrs.runId, quantity: f.attrs.quantity })) },
    actor('reviewer'),
  );
  return { id: b.id, title };
}

const signedIn = (role: 'analyst' | 'reviewer' | 'communications', timezoneId = 'UTC') =>
  signedInPage(suite.browser, suite.server.url, role, { viewport: { width: 1280, height: 900 }, timezoneId, timeoutMs: 20_000 });

/** Poll `check` (each call may reload) until it returns true or the time is up. */
async function eventually(what: string, check: () => Promise<boolean>, timeoutMs: number, everyMs = 500): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    if (await check()) return;
    if (Date.now() > deadline) throw new Error(`Timed out after ${timeoutMs} ms waiting for: ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

/** The approved bulletin of the first test (the second makes its own when run alone). */
let sharedBulletin: { id: number; title: string } | null = null;
let publishedReleaseId = 0;

describe('press releases in the browser', () => {
  it('communications schedule a reviewed release a few seconds ahead; the public page shows it only after its time', async () => {
    // ---- an approved bulletin version to start from
    const analyst = await signedIn('analyst');
    const bulletin = await approvedBulletin(analyst.page);
    sharedBulletin = bulletin;
    await analyst.context.close();

    // ---- communications staff start the release from version 1
    const comms = await signedIn('communications');
    let page = comms.page;
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Releases', exact: true }).click();
    expect(await waitForHeading(page, 'Releases')).toBe('Releases');
    expect(((await page.getByTestId('public-caution').textContent()) ?? '')).toContain(PUBLIC_CAUTION);
    const bulletinSelect = page.getByLabel('Bulletin');
    await bulletinSelect.locator('option', { hasText: bulletin.title }).first().waitFor({ state: 'attached' });
    await bulletinSelect.selectOption(String(bulletin.id));
    await page.getByLabel('Approved version').locator('option[value="1"]').waitFor({ state: 'attached' });
    await page.getByLabel('Approved version').selectOption('1');
    await screenshot(page, 'releases-new');
    await page.getByRole('button', { name: 'Create release draft' }).click();
    await page.waitForURL(/\/releases\/\d+$/);
    const releaseId = Number(new URL(page.url()).pathname.split('/').pop());
    publishedReleaseId = releaseId;
    expect(await waitForHeading(page, /:/, 20_000)).toMatch(/^\S+: /);

    // the standing caution, the copied figure and its plain-language statement are on the draft screen
    expect((await page.getByTestId('public-caution').textContent()) ?? '').toContain(PUBLIC_CAUTION);
    const copied = page.getByTestId('copied-figures');
    await copied.waitFor();
    // about 26 000 km (make-nea.ts), copied with its unit as approved
    expect(await copied.textContent()).toMatch(/2[56],\d{3} km/);
    const statements = await page.getByTestId('plain-statement').allTextContents();
    expect(statements.some((s) => /Moon's distance/.test(s))).toBe(true);
    expect(((await page.getByTestId('plain-uncertainty').textContent()) ?? '').trim().length).toBeGreaterThan(20);

    // the wording: headline, summary, a sentence with the copied figure inserted; autosaved with a new revision
    const headline = `Asteroid HSO-26-N4 will pass the Earth safely in 2034 (${releaseId})`;
    await page.getByLabel('Headline').fill(headline);
    await page.getByLabel('Summary (list and feed)').fill('The office has assessed the close approach of asteroid HSO-26-N4 in September 2034.');
    const editor = page.getByTestId('bulletin-editor');
    await editor.click();
    await page.keyboard.press('Control+End');
    await page.keyboard.press('Enter');
    await page.keyboard.type('At its closest the asteroid passes at ');
    await copied.getByRole('button', { name: /Insert .* into the text/ }).first().click();
    await page.keyboard.type('from the centre of the Earth. ');
    // the generated sentence about the uncertainty, put in at the cursor
    const uncertainty = ((await page.getByTestId('plain-uncertainty').textContent()) ?? '').trim();
    await page.getByTestId('plain-sentences').getByRole('button', { name: 'Insert the sentence "How certain" into the text' }).click();
    await page.waitForFunction(
      () => {
        const el = document.querySelector('[data-testid="release-save-status"]');
        return el?.getAttribute('data-save-state') === 'saved' && !/revision 1$/.test(el.textContent ?? '');
      },
      null,
      { timeout: 20_000 },
    );
    const saved = await apiJson(page, 'GET', `/api/releases/${releaseId}`);
    expect(saved.title).toBe(headline);
    expect(JSON.stringify(saved.document)).toContain('At its closest the asteroid passes at');
    expect(JSON.stringify(saved.document)).toContain('"linkedFigure"');
    expect(JSON.stringify(saved.document)).toContain(`from the centre of the Earth. ${uncertainty}`);
    await screenshot(page, 'release-draft');

    await page.getByRole('button', { name: 'Submit the wording for review' }).click();
    await page.getByRole('dialog', { name: 'Submit the wording for review' }).getByRole('button', { name: 'Submit the wording for review' }).click();
    await page.getByTestId('release-state').filter({ hasText: 'In review' }).first().waitFor();
    // the author is never offered the approval
    expect(await page.getByRole('button', { name: 'Approve the public wording' }).count()).toBe(0);
    expect(comms.refused).toEqual([]);
    expect(comms.errors).toEqual([]);
    await comms.context.close();

    // ---- a reviewer approves the public wording
    const reviewer = await signedIn('reviewer');
    page = reviewer.page;
    await page.goto(`/releases/${releaseId}`);
    expect(await waitForHeading(page, new RegExp(headline.replace(/[()]/g, '\\$&')), 20_000)).toContain(headline);
    expect((await page.getByTestId('public-caution').textContent()) ?? '').toContain(PUBLIC_CAUTION);
    expect(await page.getByTestId('release-wording').textContent()).toContain('At its closest the asteroid passes at');
    await page.getByRole('button', { name: 'Approve the public wording' }).click();
    const approveDialog = page.getByRole('dialog', { name: 'Approve the public wording' });
    await approveDialog.getByLabel(/Comment/).fill('Same figures as bulletin version 1; wording is plain and careful.');
    await screenshot(page, 'release-review');
    await approveDialog.getByRole('button', { name: 'Approve the public wording' }).click();
    await page.getByTestId('release-state').filter({ hasText: 'Approved' }).first().waitFor();
    expect(await page.getByRole('button', { name: /Schedule publication/ }).count()).toBe(0); // scheduling is communications' job
    expect(reviewer.refused).toEqual([]);
    expect(reviewer.errors).toEqual([]);
    await reviewer.context.close();

    // ---- communications staff in Berlin schedule it a few seconds ahead, on their own clock
    const berlin = await signedIn('communications', 'Europe/Berlin');
    page = berlin.page;
    await page.goto(`/releases/${releaseId}`);
    await page.getByRole('button', { name: 'Schedule publication…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Schedule publication' });
    expect(await dialog.getByLabel('Time zone').inputValue()).toBe('Europe/Berlin');
    // far enough ahead for the steps up to the absence check below on a loaded machine
    const publishAtMs = Math.ceil((Date.now() + 30_000) / 1000) * 1000;
    const wall = berlinWall(publishAtMs);
    await dialog.getByLabel(/Date and time/).fill(wall);
    const utcText = `${new Date(publishAtMs).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
    await dialog.getByTestId('schedule-utc').filter({ hasText: utcText }).waitFor();
    expect(await dialog.getByTestId('schedule-conversion').textContent()).toContain(`${wall.replace('T', ' ')} Europe/Berlin`);
    await screenshot(page, 'release-schedule');
    await dialog.getByRole('button', { name: 'Schedule', exact: true }).click();
    await page.getByTestId('release-state').filter({ hasText: 'Scheduled' }).first().waitFor();
    const scheduled = await apiJson(page, 'GET', `/api/releases/${releaseId}`);
    expect(scheduled.publication.publishAt).toBe(new Date(publishAtMs).toISOString());
    expect(scheduled.publication.timeZone).toBe('Europe/Berlin');
    expect(await page.getByTestId('publish-at-utc').textContent()).toBe(utcText);
    expect((await page.getByTestId('publish-at-zone').first().textContent()) ?? '').toContain(`${wall.replace('T', ' ')} Europe/Berlin`);

    // ---- before its time: absent from the public site, the public JSON and the feed (checked from a signed-out context)
    const visitor = await newContext(suite.browser, suite.server.url);
    const pub = await visitor.newPage();
    const pubErrors = watchPageErrors(pub, [404]);
    const checkedAt = Date.now();
    const listBefore = await pub.request.get('/api/public/releases');
    expect(listBefore.status()).toBe(200);
    expect(JSON.stringify(await listBefore.json())).not.toContain(headline);
    expect(await (await pub.request.get('/public/feed.atom')).text()).not.toContain(headline);
    await pub.goto('/public');
    expect(await pub.content()).not.toContain(headline);
    // the absence above only means something if it was seen before the publication time
    expect(Date.now(), 'the public routes were checked after the publication time (machine too slow)').toBeLessThan(publishAtMs);
    expect(checkedAt).toBeLessThan(publishAtMs);
    await screenshot(page, 'release-scheduled');

    // ---- after its time: the public list links to the release page, which shows the wording and the caution
    await eventually(
      'the release on the public list',
      async () => {
        await pub.goto('/public');
        return (await pub.getByRole('link', { name: headline }).count()) > 0;
      },
      90_000,
      1000,
    );
    expect(Date.now()).toBeGreaterThanOrEqual(publishAtMs);
    await pub.getByRole('link', { name: headline }).click();
    await pub.waitForURL(/\/public\/releases\/[^/]+$/);
    expect(((await pub.locator('h1').first().textContent()) ?? '').trim()).toBe(headline);
    const body = (await pub.locator('body').textContent()) ?? '';
    expect(body).toContain('At its closest the asteroid passes at');
    expect(body).toMatch(/2[56],\d{3} km/);
    expect(body.replace(/\s+/g, ' ')).toContain(PUBLIC_CAUTION);
    await screenshot(pub, 'public-release');
    expect(await (await pub.request.get('/public/feed.atom')).text()).toContain(headline);
    expect(pubErrors).toEqual([]);
    await visitor.close();

    // the office's page follows: published, on time, with the public link
    await page.getByTestId('release-state').filter({ hasText: 'Published' }).first().waitFor({ timeout: 60_000 });
    const published = await apiJson(page, 'GET', `/api/releases/${releaseId}`);
    expect(Date.parse(published.publication.publishedAt)).toBeGreaterThanOrEqual(publishAtMs);
    expect(published.publication.publishedOnStart).toBe(false);
    expect(await page.getByTestId('public-link').getAttribute('href')).toBe(`/public/releases/${published.publication.slug}`);
    await screenshot(page, 'release-published');
    expect(berlin.refused).toEqual([]);
    expect(berlin.errors).toEqual([]);
    await berlin.context.close();
  }, 420_000);
  it('communications revise after a change request, reschedule in their own zone, take a release off the schedule and cancel it; it never appears publicly', async () => {
    if (!sharedBulletin) {
      const analyst = await signedIn('analyst');
      sharedBulletin = await approvedBulletin(analyst.page);
      await analyst.context.close();
    }
    const title = 'Second statement on HSO-26-N4, never to be published';
    const comms = actor('communications');
    const created = suite.server.services.releases.create({ bulletinId: sharedBulletin.id, version: 1, title }, comms);
    suite.server.services.releases.transition(created.id, { action: 'submit' }, comms);
    const askedFor = 'Say "about" before the distance, as in the plain-language sentence.';
    suite.server.services.releases.transition(created.id, { action: 'request_changes', comment: askedFor }, actor('reviewer'));

    // communications staff in New York: US daylight time (UTC-4) in July, standard time (UTC-5) in December
    const ny = await signedIn('communications', 'America/New_York');
    const page = ny.page;
    await page.goto(`/releases/${created.id}`);
    // the reviewer's request is shown with the one action that takes the wording back to editing
    await page.getByTestId('release-state').filter({ hasText: 'Changes requested' }).first().waitFor();
    expect(await page.getByRole('status').filter({ hasText: askedFor }).count()).toBe(1);
    await page.getByRole('button', { name: 'Revise', exact: true }).click();
    await page.getByRole('dialog', { name: 'Revise' }).getByRole('button', { name: 'Revise' }).click();
    await page.getByTestId('release-state').filter({ hasText: 'Draft' }).first().waitFor();
    await page.getByTestId('bulletin-editor').waitFor();
    suite.server.services.releases.transition(created.id, { action: 'submit' }, comms);
    suite.server.services.releases.transition(created.id, { action: 'approve' }, actor('reviewer'));
    await page.reload();
    await page.getByTestId('release-state').filter({ hasText: 'Approved' }).first().waitFor();
    expect((await page.getByTestId('public-caution').textContent()) ?? '').toContain(PUBLIC_CAUTION);

    await page.getByRole('button', { name: 'Schedule publication…' }).click();
    let dialog = page.getByRole('dialog', { name: 'Schedule publication' });
    expect(await dialog.getByLabel('Time zone').inputValue()).toBe('America/New_York');
    await dialog.getByLabel(/Date and time/).fill('2030-07-04T09:30:00');
    await dialog.getByTestId('schedule-utc').filter({ hasText: '2030-07-04 13:30:00 UTC' }).waitFor();
    await dialog.getByRole('button', { name: 'Schedule', exact: true }).click();
    await page.getByTestId('release-state').filter({ hasText: 'Scheduled' }).first().waitFor();
    let stored = await apiJson(page, 'GET', `/api/releases/${created.id}`);
    expect(stored.publication.publishAt).toBe('2030-07-04T13:30:00.000Z');
    expect(stored.publication.timeZone).toBe('America/New_York');

    // reschedule: the form opens on the time as entered, in the zone it was entered in
    await page.getByRole('button', { name: 'Reschedule…' }).click();
    dialog = page.getByRole('dialog', { name: 'Reschedule' });
    // (Chromium normalises a datetime-local value with zero seconds to HH:mm)
    expect(await dialog.getByLabel(/Date and time/).inputValue()).toMatch(/^2030-07-04T09:30(:00)?$/);
    await dialog.getByLabel(/Date and time/).fill('2030-12-04T09:30:00');
    await dialog.getByTestId('schedule-utc').filter({ hasText: '2030-12-04 14:30:00 UTC' }).waitFor();
    await dialog.getByRole('button', { name: 'Reschedule', exact: true }).click();
    await page.getByTestId('publish-at-utc').filter({ hasText: '2030-12-04 14:30:00 UTC' }).waitFor();
    stored = await apiJson(page, 'GET', `/api/releases/${created.id}`);
    expect(stored.publication.publishAt).toBe('2030-12-04T14:30:00.000Z');
    expect((await page.getByTestId('publish-at-zone').first().textContent()) ?? '').toContain('2030-12-04 09:30:00 America/New_York (UTC-05:00)');
    await screenshot(page, 'release-rescheduled');

    // off the schedule, back to approved
    await page.getByRole('button', { name: 'Take off the schedule' }).click();
    dialog = page.getByRole('dialog', { name: 'Take off the schedule' });
    await dialog.getByRole('button', { name: 'Take off the schedule' }).click();
    await page.getByTestId('release-state').filter({ hasText: 'Approved' }).first().waitFor();

    // cancel: a reason is required
    await page.getByRole('button', { name: 'Cancel the release' }).click();
    dialog = page.getByRole('dialog', { name: 'Cancel the release' });
    const confirm = dialog.getByRole('button', { name: 'Cancel the release' });
    expect(await confirm.isDisabled()).toBe(true);
    await dialog.getByLabel(/Comment/).fill('Superseded by the first statement; agreed with the ministry.');
    expect(await confirm.isDisabled()).toBe(false);
    await confirm.click();
    await page.getByTestId('release-state').filter({ hasText: 'Cancelled' }).first().waitFor();
    expect(await page.getByRole('button', { name: /Schedule publication|Reschedule|Cancel the release/ }).count()).toBe(0);
    await screenshot(page, 'release-cancelled');
    expect(ny.refused).toEqual([]);
    expect(ny.errors).toEqual([]);
    await ny.context.close();

    // nothing of it on the public side
    const list = await fetch(`${suite.server.url}/api/public/releases`);
    expect(list.status).toBe(200);
    expect(await list.text()).not.toContain(title);
    expect(await (await fetch(`${suite.server.url}/public/feed.atom`)).text()).not.toContain(title);
    expect(await (await fetch(`${suite.server.url}/public`)).text()).not.toContain(title);

    // an analyst reads the release but is offered no action (the route table's ability for transitions)
    const analyst = await signedIn('analyst');
    await analyst.page.goto(`/releases/${created.id}`);
    await analyst.page.getByTestId('release-state').filter({ hasText: 'Cancelled' }).first().waitFor();
    expect(await analyst.page.locator('main').getByRole('button').count()).toBe(0);
    // the list: the published release links to its public page, the cancelled one says so
    await analyst.page.goto('/releases');
    const cancelledRow = analyst.page.getByTestId(`release-row-${created.id}`);
    await cancelledRow.waitFor();
    expect(await cancelledRow.getByTestId('release-state').textContent()).toBe('Cancelled');
    if (publishedReleaseId) {
      const row = analyst.page.getByTestId(`release-row-${publishedReleaseId}`);
      expect(await row.getByTestId('release-state').textContent()).toBe('Published');
      expect(await row.getByRole('link', { name: 'public page' }).getAttribute('href')).toMatch(/^\/public\/releases\/[^/]+$/);
    }
    await screenshot(analyst.page, 'releases-list');
    // a phone-sized screen: the caution and the state stay readable
    await analyst.page.setViewportSize({ width: 390, height: 844 });
    await analyst.page.goto(`/releases/${created.id}`);
    await analyst.page.getByTestId('public-caution').waitFor();
    await screenshot(analyst.page, 'release-phone');
    expect(analyst.errors).toEqual([]);
    await analyst.context.close();
  }, 300_000);
});
