// Bulletins in the browser (issue 6 item 8): an analyst drafts a bulletin about the demo asteroid with a linked
// figure (autosaved with revision numbers), submits it; a reviewer (a different user) confirms the figure and
// approves; the PDF of the locked version downloads and is a PDF (starts with "%PDF-", ISO 32000-1 §7.5.2 file
// header). The run behind the figure is a linear run queued through the API.
// Sources: the agreed contract (issue 6); the demo asteroid's designed encounter (server/db/demo/make-nea.ts:
// about 26 000 km from Earth on 2034-09-17).
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startTestServer } from '../helpers/testServer';
import { demoCredentials, ensureClientBuilt, launchBrowser, newContext, screenshot, signIn, signOut, waitForHeading, watchPageErrors } from './harness';

let server: Awaited<ReturnType<typeof startTestServer>>;
let browser: Browser;

beforeAll(async () => {
  await ensureClientBuilt();
  server = await startTestServer({ runner: { pollMs: 200 } });
  browser = await launchBrowser();
}, 300_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

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

describe('bulletins in the browser', () => {
  it('an analyst drafts with a linked figure and submits; another user approves; the PDF downloads', async () => {
    const context = await newContext(browser, server.url);
    const page = await context.newPage();
    const errors = watchPageErrors(page);
    const refused: string[] = [];
    page.on('response', (r) => {
      if (r.status() >= 400 && r.status() !== 401) refused.push(`${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
    });

    // --- the analyst drafts
    const analyst = demoCredentials('analyst');
    await signIn(page, analyst.email, analyst.password);
    await page.waitForURL((u) => u.pathname === '/');
    const objects = await apiJson(page, 'GET', '/api/objects?q=HSO-26-N4');
    const objectId = objects.items[0].id as number;
    const runId = await finishedRun(page, objectId);

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Bulletins', exact: true }).click();
    expect(await waitForHeading(page, 'Bulletins')).toBe('Bulletins');
    await page.getByLabel('Object').selectOption({ label: 'HSO-26-N4' });
    await page.getByLabel('Title').fill('Close approach of HSO-26-N4 in September 2034');
    await page.getByRole('button', { name: 'Create draft' }).click();
    await page.waitForURL(/\/bulletins\/\d+$/);
    const bulletinId = Number(new URL(page.url()).pathname.split('/').pop());
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
    const reviewer = demoCredentials('reviewer');
    await signIn(page, reviewer.email, reviewer.password);
    await page.waitForURL((u) => u.pathname === '/');
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
});
