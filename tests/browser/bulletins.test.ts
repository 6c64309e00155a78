// Bulletins in the browser (issue 6 item 8): an analyst drafts a bulletin about the demo asteroid with a linked
// figure (autosaved with revision numbers), submits it; a reviewer (a different user) confirms the figure and
// approves; the PDF of the locked version downloads and is a PDF (starts with "%PDF-", ISO 32000-1 §7.5.2 file
// header). The run behind the figure is a linear run queued through the API.
// Sources: the agreed contract (issue 6); the demo asteroid's designed encounter (server/db/demo/make-nea.ts:
// about 26 000 km from Earth on 2034-09-17).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { browserSuite, demoCredentials, screenshot, signedInPage, signInAs, signOut, waitForHeading, type DemoRole } from './harness';

const suite = browserSuite({ runner: { pollMs: 200 } }, { setupTimeoutMs: 300_000 });

async function apiJson(page: Page, method: 'GET' | 'POST', path: string, body?: unknown) {
  const { csrfToken } = await (await page.request.get('/api/csrf')).json();
  const res = method === 'GET' ? await page.request.get(path) : await page.request.post(path, { data: body, headers: { 'x-csrf-token': csrfToken } });
  if (!res.ok()) throw new Error(`${method} ${path}: ${res.status()} ${await res.text()}`);
  return res.json();
}

/** Queue a linear run of the object's first solution and wait until it is done. */
async function finishedRun(page: Page, objectId: number): Promise<number> {
  const { solutions } = await apiJson(page, 'GET', `/api/objects/${objectId}/solutions`);
  const run = await apiJson(page, 'POST', '/api/runs', { solutionId: solutions[0].id, until: '2035-01-01T00:00:00Z', methods: ['linear'] });
  const deadline = Date.now() + 120_000;
  for (;;) {
    const r = await apiJson(page, 'GET', `/api/runs/${run.id}`);
    if (r.status === 'done') return r.id as number;
    if (r.status === 'failed' || r.status === 'cancelled' || Date.now() > deadline) throw new Error(`run ${run.id} ended ${r.status}: ${r.error}`);
    await page.waitForTimeout(250);
  }
}

/** Shared between the tests below (they run in order on one server). */
let firstRunId = 0;
let approvedBulletinId = 0;
let objectIdOfN4 = 0;

const signedIn = (role: DemoRole) => signedInPage(suite.browser, suite.server.url, role, { expectedStatuses: [401, 409] });

describe('bulletins in the browser', () => {
  it('an analyst drafts with a linked figure and submits; another user approves; the PDF downloads', async () => {
    // --- the analyst drafts
    const { context, page, errors, refused } = await signedInPage(suite.browser, suite.server.url, 'analyst');
    const objects = await apiJson(page, 'GET', '/api/objects?q=HSO-26-N4');
    const objectId = objects.items[0].id as number;
    const runId = await finishedRun(page, objectId);
    firstRunId = runId;
    objectIdOfN4 = objectId;

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Bulletins', exact: true }).click();
    expect(await waitForHeading(page, 'Bulletins')).toBe('Bulletins');
    await page.getByLabel('Object').selectOption({ label: 'HSO-26-N4' });
    await page.getByLabel('Title').fill('Close approach of HSO-26-N4 in September 2034');
    await page.getByRole('button', { name: 'Create draft' }).click();
    await page.waitForURL(/\/bulletins\/\d+$/);
    const bulletinId = Number(new URL(page.url()).pathname.split('/').pop());
    approvedBulletinId = bulletinId;
    expect(await waitForHeading(page, /Close approach of HSO-26-N4/)).toMatch(/^\S+: Close approach of HSO-26-N4 in September 2034$/);

    const editor = page.getByTestId('bulletin-editor');
    await editor.click();
    await page.keyboard.type('On 17 September 2034 the asteroid passes Earth at a nominal distance of ');
    await page.getByRole('button', { name: 'Insert figure' }).click();
    const dialog = page.getByRole('dialog', { name: 'Insert a linked figure' });
    await dialog.getByLabel('Run').selectOption(String(runId));
    await dialog.getByLabel('Quantity').selectOption({ label: 'Miss distance' });
    await dialog.getByLabel('Approach').selectOption({ index: 0 });
    const preview = dialog.getByTestId('figure-preview');
    await preview.waitFor();
    expect(await preview.textContent()).toMatch(/km/);
    await screenshot(page, 'bulletin-insert-figure');
    await dialog.getByRole('button', { name: 'Insert' }).click();
    await page.keyboard.type('from the centre of the Earth. An impact is ruled out for this passage.');

    // the figure renders its value with units from the run, and names the run on hover
    const figure = page.getByTestId('linked-figure').first();
    await figure.waitFor();
    const figureText = ((await figure.locator('span[tabindex="0"]').textContent()) ?? '').trim();
    // designed miss distance about 26 000 km (make-nea.ts): the formatted value carries a km unit
    expect(figureText).toMatch(/^2[56],\d{3} km/);
    await figure.locator('span[tabindex="0"]').hover();
    const tip = figure.getByRole('tooltip');
    await tip.waitFor({ state: 'visible' });
    expect(await tip.textContent()).toContain(`Run #${runId}`);
    expect(await tip.textContent()).toContain('solution v1');

    // a distance plot of the same approach, chosen in the insert dialog, drawn by the shared SVG renderer
    await page.keyboard.press('Enter');
    await page.getByRole('button', { name: 'Insert plot' }).click();
    const plotDialog = page.getByRole('dialog', { name: 'Insert a plot' });
    await plotDialog.getByLabel('Run').selectOption(String(runId));
    await plotDialog.getByLabel('Plot').selectOption('distance');
    await plotDialog.getByLabel('Approach').selectOption({ index: 0 });
    await plotDialog.getByRole('button', { name: 'Insert' }).click();
    const plot = page.getByTestId('plot-block');
    await plot.locator('svg').waitFor();
    expect(await plot.textContent()).toContain(`Distance plot · earth · run #${runId}`);

    // autosave: the indicator reaches "Saved" with a revision above the first
    const status = page.getByTestId('save-status');
    await page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'saved' && /revision [2-9]|revision \d{2,}/.test(document.querySelector('[data-testid="save-status"]')?.textContent ?? ''), null, { timeout: 10_000 });
    expect(await status.textContent()).toMatch(/^✓Saved · revision \d+$/);
    const stored = await apiJson(page, 'GET', `/api/bulletins/${bulletinId}`);
    expect(stored.figures).toHaveLength(1);
    expect(stored.figures[0].attrs).toMatchObject({ runId, quantity: 'missDistance', body: 'earth' });
    expect(stored.figures[0].value.text).toBe(figureText);
    await screenshot(page, 'bulletin-draft');

    // the author never gets the sign-off panel
    expect(await page.getByTestId('review-panel').count()).toBe(0);
    await page.getByRole('button', { name: 'Submit for review' }).click();
    const submit = page.getByRole('dialog', { name: 'Submit for review' });
    await submit.getByRole('button', { name: 'Submit for review' }).click();
    await page.getByTestId('bulletin-state').filter({ hasText: 'In review' }).first().waitFor();
    expect(await page.getByTestId('bulletin-editor').count()).toBe(0);
    await signOut(page);

    // --- a reviewer signs off
    await signInAs(page, 'reviewer');
    await page.goto(`/bulletins/${bulletinId}`);
    const panel = page.getByTestId('review-panel');
    await panel.waitFor();
    const approve = panel.getByRole('button', { name: 'Approve and sign off' });
    expect(await approve.isDisabled()).toBe(true); // every figure must be confirmed first
    const boxes = panel.getByRole('checkbox');
    expect(await boxes.count()).toBe(1);
    await boxes.first().check();
    await panel.getByLabel('Comment').fill('Checked against the run: distance and date agree.');
    await screenshot(page, 'bulletin-review');
    expect(await approve.isDisabled()).toBe(false);
    await approve.click();
    await page.getByTestId('bulletin-state').filter({ hasText: 'Approved' }).first().waitFor();

    // --- the locked version and its PDF
    await page.getByRole('link', { name: 'Version 1', exact: true }).click();
    await page.waitForURL(new RegExp(`/bulletins/${bulletinId}/versions/1$`));
    expect(await waitForHeading(page, /version 1:/)).toMatch(/version 1: Close approach of HSO-26-N4/);
    expect(((await page.getByTestId('version-sha256').textContent()) ?? '').trim()).toMatch(/^[0-9a-f]{64}$/);
    expect(await page.getByTestId('linked-figure').first().textContent()).toContain(figureText);
    await screenshot(page, 'bulletin-version');
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download PDF' }).click()]);
    const file = await download.path();
    const bytes = readFileSync(file!);
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(bytes.length).toBeGreaterThan(1000);

    expect(refused).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  }, 240_000);

  it('communications sends the approved version to a list; the liaison acknowledges; the sender sees it', async () => {
    expect(approvedBulletinId).toBeGreaterThan(0);
    // a government list with the demo liaison (admins manage stakeholder lists)
    const admin = await signedIn('admin');
    const { users } = await apiJson(admin.page, 'GET', '/api/users');
    const liaison = (users as { id: number; email: string; name: string }[]).find((u) => u.email === demoCredentials('liaison').email)!;
    await admin.page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Bulletins', exact: true }).click();
    await admin.page.getByRole('link', { name: 'Stakeholder lists' }).click();
    expect(await waitForHeading(admin.page, 'Stakeholder lists')).toBe('Stakeholder lists');
    await admin.page.getByLabel('Name', { exact: true }).fill('Browser-test liaisons');
    await admin.page.getByLabel('Kind').selectOption('government');
    await admin.page.getByLabel(new RegExp(`^${liaison.name}`)).check();
    await admin.page.getByLabel('Outside addresses').fill('not an address');
    await admin.page.getByText('Cannot read: not an address').waitFor();
    await admin.page.getByLabel('Outside addresses').fill('Partner duty desk <duty@partner.example>');
    await admin.page.getByRole('button', { name: 'Create list' }).click();
    const created = admin.page.locator('[data-testid^="stakeholder-list-"]', { hasText: 'Browser-test liaisons' });
    await created.waitFor();
    expect(await created.textContent()).toContain('2 recipients');
    expect(await created.textContent()).toContain('duty@partner.example');
    await screenshot(admin.page, 'stakeholder-lists');
    expect(admin.errors).toEqual([]);
    await admin.context.close();

    const comms = await signedIn('communications');
    await comms.page.goto(`/bulletins/${approvedBulletinId}`);
    await comms.page.getByRole('button', { name: 'Distribute…' }).click();
    const dialog = comms.page.getByRole('dialog', { name: 'Distribute version 1' });
    const listSelect = dialog.getByLabel('Stakeholder list');
    const optionValue = await listSelect.locator('option', { hasText: 'Browser-test liaisons' }).getAttribute('value');
    await listSelect.selectOption(optionValue!);
    expect(await dialog.textContent()).toContain(demoCredentials('liaison').email);
    await dialog.getByRole('button', { name: 'Send' }).click();
    const card = comms.page.locator('[data-testid^="distribution-"]').first();
    await card.waitFor();
    await comms.page.getByTestId('bulletin-state').filter({ hasText: 'Distributed' }).first().waitFor();
    expect(await card.textContent()).toContain('not yet');
    expect(await card.textContent()).toContain('outside address');

    const liaisonPage = await signedIn('liaison');
    const lp = liaisonPage.page;
    await lp.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Briefings', exact: true }).click();
    expect(await waitForHeading(lp, 'Briefings')).toBe('Briefings');
    await lp.getByRole('link', { name: /Close approach of HSO-26-N4 in September 2034/ }).first().click();
    await lp.getByTestId('acknowledge-card').waitFor();
    expect(await lp.getByTestId('linked-figure').first().textContent()).toMatch(/km/);
    await lp.getByLabel('Note to the office (optional)').fill('Received; passed to the duty officer.');
    await screenshot(lp, 'liaison-briefing');
    await lp.getByRole('button', { name: 'Acknowledge receipt' }).click();
    await lp.getByText(/You acknowledged this briefing on/).waitFor();
    await lp.getByRole('link', { name: '← Briefings' }).click();
    await lp.getByText(/^Acknowledged /).first().waitFor();
    await screenshot(lp, 'liaison-inbox');
    expect(liaisonPage.errors).toEqual([]);
    await liaisonPage.context.close();

    // the sender sees the acknowledgement (after a reload; the list polls only while deliveries are pending)
    await comms.page.reload();
    const after = comms.page.locator('[data-testid^="distribution-"]').first();
    await after.waitFor();
    await comms.page.waitForFunction(() => /1 acknowledged/.test(document.querySelector('[data-testid^="distribution-"]')?.textContent ?? ''), null, { timeout: 15_000 });
    expect(await after.textContent()).toContain('passed to the duty officer');
    await screenshot(comms.page, 'bulletin-distributed');
    expect(comms.errors).toEqual([]);
    await comms.context.close();
  }, 120_000);

  it('marks a figure out of date after a newer run, asks for a reason to submit, rebinds; a concurrent save keeps both copies', async () => {
    expect(firstRunId).toBeGreaterThan(0);
    const { context, page, errors } = await signedIn('analyst');
    const doc = {
      type: 'doc',
      content: [
        { type: 'heading', attrs: { level: 2 }, content: [{ type: 'text', text: 'Assessment' }] },
        {
          type: 'paragraph',
          content: [
            { type: 'text', text: 'Nominal miss distance ' },
            { type: 'linkedFigure', attrs: { runId: firstRunId, quantity: 'missDistance', body: 'earth', epochTdbJd: 2464222.75 } },
            { type: 'text', text: '.' },
          ],
        },
        { type: 'riskTable', attrs: { runId: firstRunId } },
        { type: 'plot', attrs: { runId: firstRunId, kind: 'bplane', body: 'earth', epochTdbJd: 2464222.75 } },
      ],
    };
    // the figure's epoch is matched to the nearest Earth approach within 30 days (shared/bulletins/document.ts)
    const created = await apiJson(page, 'POST', '/api/bulletins', { objectId: objectIdOfN4, title: 'Update after new observations', document: doc });
    const secondRunId = await finishedRun(page, objectIdOfN4);
    expect(secondRunId).toBeGreaterThan(firstRunId);

    await page.goto(`/bulletins/${created.id}`);
    const figure = page.getByTestId('linked-figure').first();
    await figure.waitFor();
    expect(await figure.getAttribute('data-figure-state')).toBe('stale');
    const stale = figure.getByTestId('stale-figure');
    expect(await stale.textContent()).toContain(`run #${secondRunId}`);
    await page.getByTestId('risk-table-block').getByTestId('encounter-table').waitFor();
    // the plot block draws the shared b-plane SVG (capture disk marked data-role="capture-disk")
    await page.getByTestId('plot-block').locator('svg [data-role="capture-disk"]').waitFor();
    // embedded blocks of the older run say so too, with one action each
    await page.getByTestId('risk-table-block').getByTestId('stale-block').waitFor();
    expect(await page.getByTestId('plot-block').getByTestId('stale-block').count()).toBe(1);
    await screenshot(page, 'bulletin-stale-figure');
    await page.getByTestId('risk-table-block').getByRole('button', { name: `Show run #${secondRunId} instead` }).click();
    await page.getByTestId('risk-table-block').getByText(`Close approaches · run #${secondRunId}`).waitFor();
    expect(await page.getByTestId('risk-table-block').getByTestId('stale-block').count()).toBe(0);

    // submitting needs a written reason while a figure is out of date
    await page.getByRole('button', { name: 'Submit for review' }).click();
    const submit = page.getByRole('dialog', { name: 'Submit for review' });
    const confirm = submit.getByRole('button', { name: 'Submit for review' });
    expect(await confirm.isDisabled()).toBe(true);
    await submit.getByLabel(/Why submit with these figures/).fill('too short');
    expect(await confirm.isDisabled()).toBe(true);
    await submit.getByLabel(/Why submit with these figures/).fill('The new run only refines the orbit; the statement stands.');
    expect(await confirm.isDisabled()).toBe(false);
    await submit.getByRole('button', { name: 'Cancel' }).click();

    // one action rebinds the figure to the newer run; the autosave stores it
    await stale.getByRole('button', { name: `Rebind to run #${secondRunId}` }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="linked-figure"]')?.getAttribute('data-figure-state') === 'current');
    await page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'saved' && !/revision 1$/.test(document.querySelector('[data-testid="save-status"]')?.textContent ?? ''));
    const rebound = await apiJson(page, 'GET', `/api/bulletins/${created.id}`);
    expect(rebound.figures[0].attrs.runId).toBe(secondRunId);
    expect(rebound.staleFigureCount).toBe(0);

    // someone else saves meanwhile (another tab): our next save is refused with 409 and both copies stay
    const { csrfToken } = await (await page.request.get('/api/csrf')).json();
    const other = await page.request.put(`/api/bulletins/${created.id}`, {
      data: { revision: rebound.revision, title: rebound.title, document: { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'text', text: 'Text written in the other tab.' }] }] } },
      headers: { 'x-csrf-token': csrfToken },
    });
    expect(other.status()).toBe(200);
    await page.getByTestId('bulletin-editor').click();
    await page.keyboard.press('Control+End');
    await page.keyboard.type(' My closing sentence.');
    await page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'conflict');
    const theirs = page.getByTestId('conflict-current-copy');
    expect(await theirs.textContent()).toContain('Text written in the other tab.');
    expect(await page.getByTestId('bulletin-editor').textContent()).toContain('My closing sentence.');
    await screenshot(page, 'bulletin-conflict');
    await page.getByRole('button', { name: /^Keep my version/ }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'saved');
    const kept = await apiJson(page, 'GET', `/api/bulletins/${created.id}`);
    expect(JSON.stringify(kept.document)).toContain('My closing sentence.');
    expect(kept.revision).toBe(rebound.revision + 2);

    // a second conflict, resolved the other way: continue from the stored copy, the user's text stays readable
    const other2 = await page.request.put(`/api/bulletins/${created.id}`, {
      data: { revision: kept.revision, title: kept.title, document: { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'text', text: 'Second text from the other tab.' }] }] } },
      headers: { 'x-csrf-token': csrfToken },
    });
    expect(other2.status()).toBe(200);
    await page.getByTestId('bulletin-editor').click();
    await page.keyboard.press('Control+End');
    await page.keyboard.type(' Another sentence of mine.');
    await page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'conflict');
    await page.getByRole('button', { name: 'Continue from their copy' }).click();
    expect(await page.getByTestId('bulletin-editor').textContent()).toBe('Second text from the other tab.');
    expect(await page.getByTestId('previous-copy').textContent()).toContain('Another sentence of mine.');
    await page.getByTestId('bulletin-editor').click();
    await page.keyboard.press('Control+End');
    await page.keyboard.type(' Merged.');
    await page.waitForFunction(
      (rev) => document.querySelector('[data-testid="save-status"]')?.textContent?.endsWith(`revision ${rev}`) ?? false,
      kept.revision + 2,
    );
    const merged = await apiJson(page, 'GET', `/api/bulletins/${created.id}`);
    expect(JSON.stringify(merged.document)).toContain('Second text from the other tab. Merged.');
    expect(errors).toEqual([]);
    await context.close();
  }, 240_000);

  it('amending the distributed bulletin and approving again gives version 2 with readable differences', async () => {
    expect(approvedBulletinId).toBeGreaterThan(0);
    const a = await signedIn('analyst');
    await a.page.goto('/bulletins');
    await a.page.getByTestId(`bulletin-row-${approvedBulletinId}`).waitFor();
    expect(await a.page.getByTestId(`bulletin-row-${approvedBulletinId}`).textContent()).toContain('Distributed');
    await screenshot(a.page, 'bulletins-list');
    await a.page.goto(`/bulletins/${approvedBulletinId}`);
    await a.page.getByRole('button', { name: 'Start a new version' }).click();
    await a.page.getByRole('dialog', { name: 'Start a new version' }).getByRole('button', { name: 'Start a new version' }).click();
    const editor = a.page.getByTestId('bulletin-editor');
    await editor.waitFor();
    await editor.click();
    await a.page.keyboard.press('Control+End');
    await a.page.keyboard.press('Enter');
    await a.page.keyboard.type('Further observations are planned for next month.');
    await a.page.waitForFunction(() => document.querySelector('[data-testid="save-status"]')?.getAttribute('data-save-state') === 'saved' && /revision [2-9]/.test(document.querySelector('[data-testid="save-status"]')?.textContent ?? ''));
    // the previous test made a newer run: the figure is out of date, so the submission needs a written reason
    await a.page.getByRole('button', { name: 'Submit for review' }).click();
    const submit = a.page.getByRole('dialog', { name: 'Submit for review' });
    await submit.getByLabel(/Why submit with these figures/).fill('Distance unchanged to the stated precision by the newer run.');
    await submit.getByRole('button', { name: 'Submit for review' }).click();
    await a.page.getByTestId('bulletin-state').filter({ hasText: 'In review' }).first().waitFor();
    expect(a.errors).toEqual([]);
    await a.context.close();

    const r = await signedIn('reviewer');
    await r.page.goto(`/bulletins/${approvedBulletinId}`);
    const panel = r.page.getByTestId('review-panel');
    await panel.waitFor();
    for (const box of await panel.getByRole('checkbox').all()) await box.check();
    await panel.getByRole('button', { name: 'Approve and sign off' }).click();
    await r.page.getByTestId('version-2').waitFor();
    await r.page.getByRole('link', { name: 'Version 2', exact: true }).click();
    const diff = r.page.getByTestId('version-diff');
    await diff.waitFor();
    // the added sentence is marked as an insertion against version 1; the figure is unchanged
    expect(await diff.locator('p.border-ok-700').allTextContents()).toEqual(['Added: Further observations are planned for next month.']);
    expect(await diff.textContent()).toContain('No figure changed (1 unchanged).');
    // the reason given for the out-of-date figure is kept with the version
    expect(await r.page.getByText('Distance unchanged to the stated precision by the newer run.').count()).toBe(1);
    await screenshot(r.page, 'bulletin-version-2-diff');
    // version 1 is now superseded in the list on the bulletin page
    await r.page.goto(`/bulletins/${approvedBulletinId}`);
    expect(await r.page.getByTestId('version-1').getByTestId('bulletin-state').textContent()).toBe('Superseded');
    expect(r.errors).toEqual([]);
    await r.context.close();
  }, 120_000);

  it('a reviewer requests changes with a comment; the author sees it and revises; on a phone the editor still fits', async () => {
    const a = await signedIn('analyst');
    const created = await apiJson(a.page, 'POST', '/api/bulletins', {
      objectId: objectIdOfN4,
      title: 'Draft for a change request',
      document: { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'text', text: 'A first statement without figures.' }] }] },
    });
    await a.page.goto(`/bulletins/${created.id}`);
    await a.page.getByRole('button', { name: 'Submit for review' }).click();
    await a.page.getByRole('dialog', { name: 'Submit for review' }).getByRole('button', { name: 'Submit for review' }).click();
    await a.page.getByTestId('bulletin-state').filter({ hasText: 'In review' }).first().waitFor();

    const r = await signedIn('reviewer');
    await r.page.goto(`/bulletins/${created.id}`);
    const panel = r.page.getByTestId('review-panel');
    await panel.waitFor();
    // requesting changes without saying what is refused in the form, nothing is sent
    await panel.getByRole('button', { name: 'Request changes' }).click();
    await panel.getByText('Write what should change before requesting changes.').waitFor();
    await panel.getByLabel('Comment').fill('Add the miss distance as a linked figure.');
    await panel.getByRole('button', { name: 'Request changes' }).click();
    await r.page.getByTestId('bulletin-state').filter({ hasText: 'Changes requested' }).first().waitFor();
    expect(r.errors).toEqual([]);
    await r.context.close();

    await a.page.reload();
    await a.page.getByText('Add the miss distance as a linked figure.').first().waitFor();
    await a.page.getByRole('button', { name: 'Revise' }).click();
    await a.page.getByRole('dialog', { name: 'Revise' }).getByRole('button', { name: 'Revise' }).click();
    await a.page.getByTestId('bulletin-editor').waitFor();
    expect(await a.page.getByTestId('bulletin-state').first().textContent()).toBe('Draft');
    await a.page.setViewportSize({ width: 390, height: 844 });
    await a.page.getByTestId('bulletin-editor').click();
    await screenshot(a.page, 'bulletin-draft-phone');
    // nothing wider than the screen but the editor's own scrolling parts
    const overflow = await a.page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    expect(a.errors).toEqual([]);
    await a.context.close();
  }, 120_000);
});
