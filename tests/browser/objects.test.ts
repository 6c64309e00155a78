// An analyst works with tracked objects through the real UI: the list (server-side sort and search), the
// demo visitor's versions and their comparison (widened uncertainty flagged), a refused upload showing the
// engine's line-precise issue, and an accepted upload becoming the next version.
// Sources: the agreed contract (issue 5 items 1, 2); the demo scenario (server/db/demo).
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { browserSuite, isVisible, screenshot, signedInPage, waitForHeading } from './harness';

const suite = browserSuite();

describe('objects as an analyst', () => {
  it('lists, sorts, searches, compares versions and uploads a solution', async () => {
    const { context, page, errors } = await signedInPage(suite.browser, suite.server.url, 'analyst', { expectedStatuses: [401, 422] });

    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Objects', exact: true }).click();
    expect(await waitForHeading(page, 'Objects')).toBe('Objects');
    const rows = page.locator('tbody tr[data-testid^="object-row-"]');
    await rows.first().waitFor();
    expect(await rows.count()).toBe(3);
    const designations = async () => (await page.locator('[data-testid^="object-link-"]').allTextContents()).map((s) => s.trim());
    expect(await designations()).toEqual(['HSO-23-C2', 'HSO-26-N4', 'HSO-26-U1']);
    // sort descending by designation (server side)
    await page.getByRole('button', { name: /^Designation/ }).click();
    await page.waitForURL(/sort=-designation/);
    await expect.poll(designations).toEqual(['HSO-26-U1', 'HSO-26-N4', 'HSO-23-C2']);
    // search
    await page.getByLabel('Search designation or name').fill('vaskir');
    await expect.poll(designations).toEqual(['HSO-26-U1']);
    await screenshot(page, 'analyst-objects-list');

    await page.getByTestId('object-link-HSO-26-U1').click();
    expect(await waitForHeading(page, 'HSO-26-U1 (Vaskir)')).toBe('HSO-26-U1 (Vaskir)');
    await page.getByTestId('version-row-2').waitFor();
    // one version in detail: elements with 1-sigma and the raw input with line numbers
    await page.getByRole('button', { name: 'Show version 2' }).click();
    const detail = page.getByTestId('solution-detail-2');
    await detail.getByText('A1 (radial)').waitFor();
    expect(await detail.getByText('Input as received (Tocsin JSON)').count()).toBe(1);
    await page.getByLabel('Compare version 1').check();
    await page.getByLabel('Compare version 2').check();
    await page.getByRole('button', { name: 'Compare the two ticked versions' }).click();
    expect(await waitForHeading(page, 'Version 1 against version 2')).toBe('Version 1 against version 2');
    expect(await isVisible(page.getByText('The uncertainty widened'))).toBe(true);
    const eRatio = (await page.getByTestId('compare-row-e').locator('td').last().textContent())?.trim() ?? '';
    expect(Number(eRatio.replace(/[^0-9.]/g, ''))).toBeGreaterThan(2);
    await screenshot(page, 'analyst-objects-compare');

    // a refused upload: the OPM of another object; the issue names the OBJECT_ID line
    await page.getByRole('link', { name: '← Back to the object' }).click();
    await page.getByTestId('version-row-2').waitFor();
    const opm = fs.readFileSync('server/db/demo/hso-26-n4.opm', 'utf8');
    const line = opm.split('\n').findIndex((l) => l.startsWith('OBJECT_ID')) + 1;
    await page.getByLabel('Orbit solution file').setInputFiles({ name: 'wrong.opm', mimeType: 'text/plain', buffer: Buffer.from(opm) });
    await page.getByRole('button', { name: 'Add version' }).click();
    const issues = page.getByTestId('upload-issues');
    await issues.waitFor();
    expect(await issues.textContent()).toContain(`line ${line}: designation "HSO-26-N4" is not this object's`);
    await screenshot(page, 'analyst-objects-upload-refused');

    // an accepted upload becomes version 3
    const json = fs.readFileSync('server/db/demo/hso-26-u1.v2.json', 'utf8');
    await page.getByLabel('Orbit solution file').setInputFiles({ name: 'v3.json', mimeType: 'application/json', buffer: Buffer.from(json) });
    await page.getByLabel('Number of observations').fill('700');
    await page.getByRole('button', { name: 'Add version' }).click();
    await page.getByTestId('version-row-3').waitFor();
    expect(await page.getByTestId('version-row-3').textContent()).toContain('700');
    expect(errors).toEqual([]);
    await context.close();
  });
});
