// Issue 5 item 7 (results part): an analyst uploads a new orbit-solution version, starts a run on it, watches its
// progress, then reads the encounter table (with the distance unit switch), the b-plane plot (its pixels checked
// to be non-blank, the capture disk visibly drawn) and downloads the table as CSV and the b-plane as SVG.
// Sources: the demo asteroid's designed encounter (server/db/demo/make-nea.ts: about 26 000 km from Earth on
// 2034-09-17); lunar distance 384 399 km and Earth radius 6378.137 km as stated in shared/format.ts
// (26 000 km = 0.0676 LD = 4.08 Earth radii).
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { browserSuite, screenshot, signedInPage, waitForHeading, watchRunStatus } from './harness';

const suite = browserSuite({ runner: { pollMs: 200 } }, { setupTimeoutMs: 240_000 });

/**
 * Pixels of an element's screenshot (PNG, decoded by the browser itself) that are not plot background: far from
 * white, from the plot box fill (#f8fafc) and from the grid lines (#e2e8f0). `box` crops to the plot area (CSS px).
 * With `rgb`, counts only pixels near that colour instead.
 */
async function countInk(page: Page, el: Locator, box: { left: number; top: number; right: number; bottom: number }, rgb?: [number, number, number]): Promise<number> {
  const png = await el.screenshot();
  return page.evaluate(
    async ({ b64, box, rgb }) => {
      const img = new Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const c = document.createElement('canvas');
      c.width = img.width;
      c.height = img.height;
      const ctx = c.getContext('2d')!;
      ctx.drawImage(img, 0, 0);
      const { data, width, height } = ctx.getImageData(0, 0, c.width, c.height);
      const bg = [[255, 255, 255], [248, 250, 252], [226, 232, 240]];
      const dist = (i: number, q: number[]) => Math.hypot(data[i] - q[0], data[i + 1] - q[1], data[i + 2] - q[2]);
      let n = 0;
      for (let y = box.top; y < height - box.bottom; y++) {
        for (let x = box.left; x < width - box.right; x++) {
          const i = (y * width + x) * 4;
          if (rgb ? dist(i, rgb) < 60 : bg.every((q) => dist(i, q) > 40)) n++;
        }
      }
      return n;
    },
    { b64: png.toString('base64'), box, rgb },
  );
}

describe('run results in the browser', () => {
  it('an analyst uploads a solution, runs it, and reads the table and the b-plane plot', async () => {
    const { context, page, errors } = await signedInPage(suite.browser, suite.server.url, 'analyst', {
      expectedStatuses: [401, 422],
      viewport: { width: 1280, height: 900 },
    });

    const objects = await (await page.request.get(`${suite.server.url}/api/objects?q=HSO-26-N4`)).json();
    const objectId = objects.items[0].id as number;
    await page.goto(`/objects/${objectId}`);
    expect(await waitForHeading(page, 'HSO-26-N4')).toBe('HSO-26-N4');

    // upload a new version: the demo OPM with a changed comment (same orbit, new file, new hash)
    const opm = fs.readFileSync('server/db/demo/hso-26-n4.opm', 'utf8').replace('CREATION_DATE = 2026-11-21T09:00:00', 'CREATION_DATE = 2026-11-30T09:00:00');
    await page.getByLabel('Orbit solution file').setInputFiles({ name: 'hso-26-n4-refit.opm', mimeType: 'text/plain', buffer: Buffer.from(opm) });
    await page.getByRole('button', { name: 'Add version' }).click();
    await page.getByTestId('version-row-2').waitFor();

    // start a run on version 2 (linear + line of variations, so there is progress to watch)
    await page.reload();
    await page.getByRole('heading', { name: 'Start an assessment run' }).waitFor();
    const select = page.getByLabel('Solution version', { exact: true });
    const v2 = await select.locator('option', { hasText: /^v2 / }).getAttribute('value');
    await select.selectOption(v2!);
    await page.getByLabel('Window end').fill('2035-01-01T00:00:00Z');
    await page.getByLabel('Line of variations').check();
    await page.getByRole('button', { name: 'Queue the run' }).click();
    await page.waitForURL(/\/runs\/\d+$/);
    const runId = Number(/\/runs\/(\d+)$/.exec(page.url())![1]);
    expect(await waitForHeading(page, `Run #${runId}: HSO-26-N4 v2`)).toBe(`Run #${runId}: HSO-26-N4 v2`);

    // progress: the page polls through Running (with a progress bar) to Done
    const { seen, final } = await watchRunStatus(page, 90_000);
    expect(seen).toContain('progressbar');
    expect(final).toBe('Done');

    // the table: date in UTC and TDB, distance, IP with its method, and where the numbers come from
    const table = page.getByTestId('encounter-table');
    await table.waitFor();
    const row = table.locator('tbody tr').first();
    const rowText = (await row.textContent()) ?? '';
    expect(rowText).toContain('2034-09-17');
    expect(rowText).toMatch(/2034-09-17 0\d:\d\d:\d\d TDB/);
    expect(rowText).toContain('26,000 km');
    const ipText = (await row.getByTestId('ip-cell').textContent()) ?? '';
    expect(ipText).toMatch(/\de-\d/);
    expect(ipText).toMatch(/linear|line of variations|Monte Carlo/);
    expect(ipText).toMatch(/about 1 in [\d,]+/);
    expect(await page.getByTestId('encounter-source').textContent()).toContain(`run #${runId}, HSO-26-N4 solution v2`);

    // unit switch
    await page.getByText('LD', { exact: true }).click();
    await expect.poll(async () => (await row.textContent()) ?? '').toContain('0.0676 LD');
    await page.getByText('R⊕', { exact: true }).click();
    await expect.poll(async () => (await row.textContent()) ?? '').toContain('4.08 R⊕');
    await page.getByText('km', { exact: true }).first().click();
    await expect.poll(async () => (await row.textContent()) ?? '').toContain('26,000 km');

    // the b-plane: drawn (non-background pixels inside the plot box), and the capture disk visible when zoomed to it
    const canvas = page.getByTestId('bplane-canvas');
    await canvas.scrollIntoViewIfNeeded();
    await page.waitForTimeout(300);
    const plotBox = { left: 80, top: 14, right: 18, bottom: 48 }; // BPlanePlot margins + 2 px, CSS px
    const ink = await countInk(page, canvas, plotBox);
    expect(ink).toBeGreaterThan(300);
    await page.getByRole('button', { name: 'Capture disk', exact: true }).click();
    await page.waitForTimeout(300);
    const red = await countInk(page, canvas, plotBox, [220, 38, 38]); // capture-disk outline #dc2626
    expect(red).toBeGreaterThan(200);
    expect(await page.getByTestId('bplane-plot').textContent()).toMatch(/capture disk r = 11,6\d\d km/);
    expect(await page.getByTestId('distance-plot').locator('canvas').count()).toBeGreaterThan(0);
    await screenshot(page, 'analyst-results');

    // exports: the table as CSV, the b-plane as SVG
    const [csvDl] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'CSV', exact: true }).click()]);
    const csv = fs.readFileSync((await csvDl.path())!, 'utf8').split('\r\n');
    expect(csv[0].startsWith('run_id,object,solution_version,solution_sha256,engine_version,row_kind,body,date_utc,epoch_tdb_jd,time_sigma_s,distance_km')).toBe(true);
    const cells = csv[1].split(',');
    expect(cells.slice(0, 3)).toEqual([String(runId), 'HSO-26-N4', '2']);
    expect(Number(cells[10])).toBeGreaterThan(25_990);
    expect(Number(cells[10])).toBeLessThan(26_010);
    const [svgDl] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'b-plane SVG' }).click()]);
    const svg = fs.readFileSync((await svgDl.path())!, 'utf8');
    expect(svg).toContain('data-role="capture-disk"');
    expect(svg).toContain(`Run #${runId} · HSO-26-N4 solution v2`);
    const [pngDl] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'b-plane PNG' }).click()]);
    const png = fs.readFileSync((await pngDl.path())!);
    // PNG signature (ISO/IEC 15948, 5.2) and the IHDR size: the 640 x 640 SVG rasterised at scale 2
    expect(png.subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([1280, 1280]);
    expect(errors).toEqual([]);
    await context.close();
  }, 180_000);
});
