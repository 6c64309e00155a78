// Orbit determination in the browser (issue 8 items 1, 5 and 6), through the real server and the real engine:
//  - an analyst opens the demo visitor's astrometry, uploads a bad ADES file and reads the line-numbered issues
//    (nothing stored), opens the demo fit (gravity-only and with A1, A2), sees both residual plots with their two
//    panels, the comparison and the residual table, then adopts the non-gravitational fit with a reason and lands
//    on the new solution version;
//  - a reviewer reads the fit but may not adopt it nor upload astrometry;
//  - an admin adds and edits an observatory (zod's messages at the fields), and a used one cannot be deleted (409);
//  - communications staff see none of these areas.
// Sources: the issue 8 contract (paths, roles, 422 with issues, 409 on delete); IAU ADES: RA in [0, 360) degrees,
// Dec in [-90, 90], uncertainties positive (the bad file breaks exactly these, one per line); the demo scenario
// (server/db/demo: the visitor has versions v1 and v2, so an adopted fit becomes v3).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startTestServer } from '../helpers/testServer';
import { queueDemoFit, seedDemoAstrometry } from '../../server/services/od/demo';
import { createFitRunner } from '../../server/services/od/fitRunner';
import type { FitJob } from '../../shared/schemas/odApi';
import { ensureClientBuilt, launchBrowser, screenshot, signedInPage, waitForHeading } from './harness';

let server: Awaited<ReturnType<typeof startTestServer>>;
let browser: Browser;
let fitRunner: ReturnType<typeof createFitRunner>;
let demoFitId: number;

beforeAll(async () => {
  await ensureClientBuilt();
  server = await startTestServer();
  // As the seed and server/index.ts do on a first start (idempotent: the seed may have done the first part): the
  // office's observatories and the visitor's arc, the demo fit queued, the fit runner computing it in the background.
  seedDemoAstrometry(server.db, 'analyst@hspdo.example');
  demoFitId = queueDemoFit(server.db, server.services.fits, 'analyst@hspdo.example')!;
  expect(demoFitId).toBeGreaterThan(0);
  fitRunner = createFitRunner(server.db, server.services.fits, { log: () => undefined });
  fitRunner.start();
  browser = await launchBrowser();
}, 300_000);

afterAll(async () => {
  await browser?.close();
  await fitRunner?.stop();
  await server?.close();
});

const BAD_ADES = [
  '# version=2022',
  '# observatory',
  '! mpcCode HSA',
  '# submitter',
  '! name Halden Sound test desk',
  'provID    |mode|stn |obsTime                 |ra         |dec        |rmsRA|rmsDec|astCat|mag  |band',
  'HSO-26-U1 |CCD |HSA |2026-09-01T22:00:00.000Z|361.50000  |-12.30000  |0.30 |0.30  |Gaia3 |18.2 |G',
  'HSO-26-U1 |CCD |HSA |2026-09-01T22:30:00.000Z|120.10000  |-95.00000  |0.30 |0.30  |Gaia3 |18.2 |G',
  'HSO-26-U1 |CCD |HSA |2026-09-01T23:00:00.000Z|120.20000  |-12.40000  |-0.30|0.30  |Gaia3 |18.2 |G',
  'HSO-26-U1 |CCD |XQ9 |2026-09-01T23:30:00.000Z|120.30000  |-12.50000  |0.30 |0.30  |Gaia3 |18.2 |G',
].join('\n') + '\n';

async function visitorId(page: Page): Promise<number> {
  const body = await (await page.request.get(`${server.url}/api/objects?q=HSO-26-U1`)).json();
  return body.items[0].id as number;
}

async function astrometryCount(page: Page, objectId: number): Promise<{ observations: number; batches: number }> {
  const body = await (await page.request.get(`${server.url}/api/objects/${objectId}/astrometry`)).json();
  return { observations: body.observations.length, batches: body.batches.length };
}

/** Wait (polling the API, generous: the fit runs the real engine on a shared machine) until the fit is finished. */
async function finishedFit(page: Page, id: number, timeoutMs = 600_000): Promise<FitJob> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const fit = (await (await page.request.get(`${server.url}/api/fits/${id}`)).json()) as FitJob;
    if (fit.status === 'done' || fit.status === 'failed' || fit.status === 'cancelled') return fit;
    if (Date.now() > deadline) throw new Error(`fit #${id} still ${fit.status} (${fit.progressStage} ${fit.progressDone}/${fit.progressTotal}) after ${timeoutMs / 1000} s`);
    await page.waitForTimeout(1000);
  }
}

describe('orbit determination in the browser', () => {
  it('an analyst reads the astrometry, sees a bad file refused by line, studies the demo fit and adopts the non-grav fit', async () => {
    const { context, page, errors } = await signedInPage(browser, server.url, 'analyst', { expectedStatuses: [401, 422], timeoutMs: 20_000 });
    const objectId = await visitorId(page);
    await page.goto(`/objects/${objectId}`);
    expect(await waitForHeading(page, /^HSO-26-U1/)).toMatch(/^HSO-26-U1/);
    await page.getByTestId('object-od').getByRole('link', { name: 'Astrometry' }).click();
    expect(await waitForHeading(page, 'Astrometry of HSO-26-U1')).toBe('Astrometry of HSO-26-U1');

    // the demo arc is listed, one row per stored observation
    const before = await astrometryCount(page, objectId);
    expect(before.observations).toBeGreaterThan(50);
    await page.getByTestId('observation-table').waitFor();
    expect(await page.getByTestId('observation-table').locator('tbody tr').count()).toBe(before.observations);

    // a bad file: refused with one issue per bad line, by line number and field; nothing stored
    await page.getByLabel('…or paste the text').fill(BAD_ADES);
    await page.getByRole('button', { name: 'Upload the astrometry' }).click();
    const issues = page.getByTestId('ades-issues');
    await issues.waitFor();
    const rows = (await issues.locator('tbody tr').allInnerTexts()).map((r) => r.replace(/\s+/g, ' ').trim());
    expect(rows).toHaveLength(4);
    expect(rows[0]).toMatch(/^line 7 ra .*361\.5/);
    expect(rows[1]).toMatch(/^line 8 dec .*-95/);
    expect(rows[2]).toMatch(/^line 9 rmsRA /);
    expect(rows[3]).toMatch(/^line 10 stn .*XQ9/); // an observatory not in the office's table
    expect(await page.getByText('The file was refused').count()).toBe(1);
    expect(await astrometryCount(page, objectId)).toEqual(before);
    await screenshot(page, 'od-analyst-astrometry-refused');

    // a good file, sent as a file (multipart): two new lines are added, the line repeating a stored one is skipped
    const storedNow = (await (await page.request.get(`${server.url}/api/objects/${objectId}/astrometry`)).json()) as { observations: { stn: string; obsTime: string; raDeg: number; decDeg: number }[] };
    const last = [...storedNow.observations].sort((a, b) => Date.parse(a.obsTime) - Date.parse(b.obsTime)).at(-1)!;
    const later = (hours: number) => new Date(Date.parse(last.obsTime) + hours * 3_600_000).toISOString();
    const goodAdes = [
      '# version=2022',
      '# submitter',
      '! name Halden Sound test desk',
      'provID|mode|stn|obsTime|ra|dec|rmsRA|rmsDec|astCat',
      `HSO-26-U1|CCD|${last.stn}|${last.obsTime}|${last.raDeg}|${last.decDeg}|0.3|0.3|Gaia3`,
      `HSO-26-U1|CCD|${last.stn}|${later(24)}|${last.raDeg + 0.01}|${last.decDeg + 0.01}|0.3|0.3|Gaia3`,
      `HSO-26-U1|CCD|${last.stn}|${later(24.5)}|${last.raDeg + 0.011}|${last.decDeg + 0.011}|0.3|0.3|Gaia3`,
    ].join('\n') + '\n';
    await page.getByLabel('…or paste the text').fill('');
    await page.getByLabel('ADES PSV file').setInputFiles({ name: 'hso-26-u1-late.psv', mimeType: 'text/plain', buffer: Buffer.from(goodAdes) });
    await page.getByRole('button', { name: 'Upload the astrometry' }).click();
    await page.getByText('hso-26-u1-late.psv: 2 observations added').waitFor();
    await page.getByText('1 line skipped: already stored').waitFor();
    expect(await page.getByTestId('ades-refused').count()).toBe(0);
    expect(await astrometryCount(page, objectId)).toEqual({ observations: before.observations + 2, batches: before.batches + 1 });
    await page.getByTestId('batch-table').getByText('hso-26-u1-late.psv').waitFor();
    await page.getByTestId('observation-table').locator('tbody tr').nth(before.observations + 1).waitFor();

    // exclude the first observation: a reason is required; the row stays, greyed, with the reason
    const first = page.getByTestId('observation-table').locator('tbody tr').first();
    const excludedId = Number((await first.getAttribute('data-testid'))!.replace('observation-', ''));
    await first.getByRole('button', { name: /^Exclude / }).click();
    const excludeDialog = page.getByRole('dialog');
    expect(await excludeDialog.getByRole('button', { name: 'Exclude from fits' }).isDisabled()).toBe(true);
    await excludeDialog.getByLabel('Reason').fill('trailed image');
    await excludeDialog.getByRole('button', { name: 'Exclude from fits' }).click();
    await page.getByTestId(`observation-${excludedId}`).getByText('Excluded', { exact: true }).waitFor();
    expect(await page.getByTestId(`observation-${excludedId}`).innerText()).toContain('trailed image');
    const stored = (await (await page.request.get(`${server.url}/api/objects/${objectId}/astrometry`)).json()) as { observations: { id: number; excluded: boolean; excludedReason: string | null }[] };
    expect(stored.observations.find((o) => o.id === excludedId)).toMatchObject({ excluded: true, excludedReason: 'trailed image' });

    // the demo fit: its page shows progress until done, then both fits
    await page.getByRole('link', { name: 'Orbit fits' }).first().click();
    expect(await waitForHeading(page, 'Orbit fits of HSO-26-U1')).toBe('Orbit fits of HSO-26-U1');
    await page.getByTestId(`fit-row-${demoFitId}`).getByRole('link', { name: `Fit #${demoFitId}` }).click();
    expect(await waitForHeading(page, `Fit #${demoFitId}: HSO-26-U1`)).toBe(`Fit #${demoFitId}: HSO-26-U1`);
    const fit = await finishedFit(page, demoFitId);
    expect(fit.error).toBeNull();
    expect(fit.status).toBe('done');
    const result = fit.result!;
    expect(result.nonGrav).not.toBeNull();
    expect(result.comparison).not.toBeNull();
    // the page polls: it moves to Done without a reload
    await page.getByTestId('fit-status').filter({ hasText: 'Done' }).waitFor({ timeout: 30_000 });

    // both residual plots, each with an RA·cos(Dec) and a Dec panel and one marker per residual in each
    for (const f of [result.gravityOnly, result.nonGrav!]) {
      const plot = page.getByTestId(`residual-plot-${f.label}`);
      await plot.waitFor();
      expect(await plot.locator('svg [data-panel="ra"]').count()).toBe(1);
      expect(await plot.locator('svg [data-panel="dec"]').count()).toBe(1);
      expect(await plot.locator('svg [data-panel="ra"] [data-role="residual"]').count()).toBe(f.residuals.length);
      expect(await plot.locator('svg [data-panel="dec"] [data-role="residual"]').count()).toBe(f.residuals.length);
      // the observation excluded after the fit was queued is still in this fit, drawn greyed
      const isExcluded = (r: { index: number }) => fit.observationIds[r.index] === excludedId;
      expect(f.residuals.filter(isExcluded)).toHaveLength(1);
      expect(await plot.locator('svg [data-panel="ra"] [data-status="excluded"]').count()).toBe(1);
      const rejected = f.residuals.filter((r) => r.status === 'rejected' && !isExcluded(r)).length;
      expect(await plot.locator('svg [data-panel="ra"] [data-status="rejected"]').count()).toBe(rejected);
    }

    // the comparison: the verdict and the likelihood-ratio numbers as the engine gave them
    const comparison = page.getByTestId('comparison');
    expect((await comparison.getByTestId('verdict').innerText()).trim()).toBe(result.comparison!.verdict);
    expect((await comparison.getByTestId('delta-chi-square').innerText()).trim()).toBe(result.comparison!.deltaChiSquare.toFixed(1));
    expect(await comparison.getByTestId('delta-chi-square-set').innerText()).toContain(`over the ${result.comparison!.observationsCompared} observations`);
    expect(await comparison.getByTestId('element-sigmas-refit').count()).toBe(result.comparison!.gravityOnlyRefitted ? 1 : 0);
    // the encounter table's gravity-only column is the comparison's (same-data) prediction
    const gEnc = result.comparison!.gravityOnlyEncounter ?? result.gravityOnly.encounter;
    if (gEnc) {
      const d = gEnc.distanceSigmaKm;
      expect(await comparison.getByTestId('encounter-comparison').innerText()).toContain(d >= 1000 ? Math.round(d).toLocaleString('en-US') : String(Number(d.toPrecision(4))));
    }
    const sig = result.comparison!.significanceSigma;
    expect((await comparison.getByTestId('significance').innerText()).trim()).toBe(`${Math.abs(sig) >= 1 ? sig.toFixed(1) : Number(sig.toPrecision(2))} σ`);
    for (const p of result.comparison!.parameterSignificance) expect(await comparison.getByTestId(`significance-${p.term}`).innerText()).toContain(p.signalToNoise.toFixed(1));
    expect(await page.getByTestId('fit-summary').getByTestId('rms-row').innerText()).toContain(result.gravityOnly.rmsArcsec.toFixed(3));
    // original barycentric orbit rows (both demo fits are hyperbolic; engine od/originalOrbit.ts), as the engine computed them
    const originalRow = await page.getByTestId('fit-summary').getByTestId('original-inverse-a-row').innerText();
    for (const f of [result.gravityOnly, result.nonGrav!]) {
      expect(f.originalOrbit!.stop).toBe('distance');
      expect(originalRow).toContain(String(Number(f.originalOrbit!.inverseSemiMajorAxisPerAu.toPrecision(6))));
      expect(await page.getByTestId('fit-summary').getByTestId('original-vinf-row').innerText()).toContain(f.originalOrbit!.vInfinityKmS!.toFixed(3));
    }
    expect(originalRow).toContain('unbound at');
    expect(await page.getByTestId('fit-summary').getByTestId('original-where-row').innerText()).toContain('100 AU from the Sun');
    expect(await page.getByTestId('original-orbit-note').innerText()).toContain('S ≫ 3');
    // residuals by observatory: one row per station per fit, as the engine computed them
    for (const f of [result.gravityOnly, result.nonGrav!]) {
      for (const st of f.stations!) {
        const row = page.getByTestId(`station-row-${f.label}-${st.stn}`);
        expect(await row.innerText()).toContain(st.rmsArcsec!.toFixed(3));
        expect((await row.getByTestId('station-weights').innerText()).trim()).toMatch(new RegExp(`^${st.weights === 'too-few' ? 'too few to judge' : st.weights}`));
      }
    }
    await screenshot(page, 'od-analyst-fit');

    // the residual table: sorted by chi-square (largest first) and filtered to the rejected points
    const table = page.getByTestId('residual-table');
    await table.getByRole('button', { name: /^χ²/ }).click();
    const maxChi = Math.max(...result.nonGrav!.residuals.map((r) => r.chiSquare));
    expect((await table.locator('tbody tr').first().locator('td').nth(4).innerText()).trim()).toBe(maxChi.toFixed(2));
    await page.getByLabel('Status', { exact: true }).selectOption('rejected');
    const rejectedRows = await table.locator('tbody tr').allInnerTexts();
    expect(rejectedRows).toHaveLength(result.nonGrav!.residuals.filter((r) => r.status === 'rejected').length);
    for (const r of rejectedRows) expect(r).toContain('Rejected');

    // exclude the worst-fitting observation straight from the residual table (for later fits; this one keeps it)
    await page.getByLabel('Status', { exact: true }).selectOption('');
    const excludeButton = table.getByRole('button', { name: /^Exclude .* from later fits$/ }).first();
    const excludeLabel = (await excludeButton.getAttribute('aria-label'))!;
    const excludedRow = table.locator('tbody tr').filter({ has: page.getByRole('button', { name: excludeLabel, exact: true }) });
    const excludedLine = Number((await excludedRow.locator('td').nth(7).innerText()).trim());
    await excludeButton.click();
    await page.getByRole('dialog').getByLabel('Reason').fill('blended with a field star');
    await page.getByRole('dialog').getByRole('button', { name: 'Exclude from fits' }).click();
    await table.locator('tbody tr').filter({ hasText: '(excluded since)' }).nth(1).waitFor();
    const afterExclusion = (await (await page.request.get(`${server.url}/api/objects/${objectId}/astrometry`)).json()) as { observations: { line: number; excluded: boolean; excludedReason: string | null }[] };
    expect(afterExclusion.observations.filter((o) => o.excluded).map((o) => o.excludedReason).sort()).toEqual(['blended with a field star', 'trailed image']);
    expect(afterExclusion.observations.find((o) => o.excludedReason === 'blended with a field star')!.line).toBe(excludedLine);
    expect(await page.getByTestId('residual-plot-non-gravitational').locator('svg [data-panel="ra"] [data-status="excluded"]').count()).toBe(2);

    // adopt the non-gravitational fit: a reason is required, then the new version opens on the object page
    await page.getByRole('button', { name: 'Adopt a fit…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel(/With non-gravitational terms/).check();
    await dialog.getByRole('button', { name: 'Adopt', exact: true }).click();
    await dialog.getByText('Give the reason for this choice').waitFor();
    const reason = 'A1 and A2 are significant and the gravity-only residuals keep a trend';
    await dialog.getByLabel('Reason').fill(reason);
    await dialog.getByRole('button', { name: 'Adopt', exact: true }).click();
    await page.waitForURL((u) => u.pathname === `/objects/${objectId}` && u.searchParams.has('version'));
    const version = Number(new URL(page.url()).searchParams.get('version'));
    expect(version).toBe(3); // the visitor had v1 (gravity only) and v2 (with A1, A2) before
    const detail = page.getByTestId(`solution-detail-${version}`);
    await detail.getByText(reason, { exact: false }).waitFor();
    expect(await detail.innerText()).toContain(`fit #${demoFitId}`);
    const row = page.getByTestId(`version-row-${version}`);
    expect(await row.innerText()).toContain('Orbit fit');
    expect(await row.innerText()).toMatch(/With A1, A2/i);
    await screenshot(page, 'od-analyst-adopted');

    // the fit now records the adoption and offers no second one
    await page.goto(`/fits/${demoFitId}`);
    await page.getByText(`Adopted as solution version ${version}`).waitFor();
    expect(await page.getByRole('button', { name: 'Adopt a fit…' }).count()).toBe(0);
    expect(errors).toEqual([]);
    await context.close();
  }, 900_000);

  it('a reviewer reads astrometry and fits, may start a fit, but neither uploads nor adopts', async () => {
    const { context, page, errors } = await signedInPage(browser, server.url, 'reviewer');
    const objectId = await visitorId(page);
    await page.goto(`/objects/${objectId}/astrometry`);
    expect(await waitForHeading(page, 'Astrometry of HSO-26-U1')).toBe('Astrometry of HSO-26-U1');
    await page.getByTestId('observation-table').waitFor();
    expect(await page.getByRole('button', { name: 'Upload the astrometry' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /^Exclude / }).count()).toBe(0);
    await page.goto(`/fits/${demoFitId}`);
    expect(await waitForHeading(page, `Fit #${demoFitId}: HSO-26-U1`)).toBe(`Fit #${demoFitId}: HSO-26-U1`);
    await page.getByTestId('fit-summary').waitFor({ timeout: 600_000 });
    expect(await page.getByRole('button', { name: 'Adopt a fit…' }).count()).toBe(0);
    expect(await page.getByText(/UT1 − UTC/).count()).toBe(0); // the demo fit takes UT1 as UTC: no mention

    // a reviewer may start a fit to check one: gravity only (no term ticked), refused epoch first
    await page.goto(`/objects/${objectId}/fits`);
    await page.getByRole('button', { name: 'Queue the fit' }).waitFor();
    await page.getByLabel('Solution epoch').fill('next Tuesday');
    await page.getByRole('button', { name: 'Queue the fit' }).click();
    await page.getByText(/epoch must be/).waitFor();
    await page.getByLabel('Solution epoch').fill('');
    for (const term of ['A1 (radial)', 'A2 (transverse)']) await page.getByLabel(term).uncheck();
    // reweight one observatory of the arc: a zero sigma is refused at its field (shared/schemas/od.ts message),
    // then 0.5" is sent and shown in the fit's settings line
    // each observatory's field says what the last finished fit found for it (its residuals by observatory)
    const demo = (await (await page.request.get(`${server.url}/api/fits/${demoFitId}`)).json()) as { result: { nonGrav: { stations: { stn: string; rmsArcsec: number; weights: string }[] } } };
    const hscLast = demo.result.nonGrav.stations.find((st) => st.stn === 'HSC')!;
    await page.getByText(`fit #${demoFitId}: RMS ${hscLast.rmsArcsec.toFixed(3)}″`).waitFor();
    // stations whose stated sigmas the last fit contradicted: one click fills their RMS in (then cleared again here)
    const flagged = (demo.result.nonGrav.stations as { stn: string; rmsArcsec: number; weights?: string }[]).filter((st) => st.weights === 'understated' || st.weights === 'overstated');
    expect(flagged.map((f) => f.stn)).toEqual(['HSB']); // the demo arc's HSB: residuals 0.65 of its stated sigma (DEVELOPERS.md)
    {
      await page.getByRole('button', { name: `Use fit #${demoFitId}'s RMS for ${flagged.map((f) => f.stn).join(', ')}` }).click();
      for (const f of flagged) {
        expect(await page.getByLabel(`${f.stn} sigma (″)`).inputValue()).toBe(f.rmsArcsec.toFixed(2));
        await page.getByLabel(`${f.stn} sigma (″)`).fill('');
      }
    }
    await page.getByLabel('HSC sigma (″)').fill('0');
    // UT1 − UTC beyond the 0.9 s that leap seconds allow is refused at its field (shared/schemas/od.ts message)
    await page.getByLabel('UT1 − UTC (s)').fill('1.5');
    await page.getByRole('button', { name: 'Queue the fit' }).click();
    await page.getByText('Sigma must be greater than 0 arcsec').waitFor();
    await page.getByText('UT1 − UTC must be between −0.9 and 0.9 s').waitFor();
    await page.getByLabel('UT1 − UTC (s)').fill('0.35');
    await screenshot(page, 'od-start-fit-reweight-refused');
    await page.getByLabel('HSC sigma (″)').fill('0.5');
    await page.getByRole('button', { name: 'Queue the fit' }).click();
    await page.waitForURL((u) => /^\/fits\/\d+$/.test(u.pathname) && u.pathname !== `/fits/${demoFitId}`);
    await page.getByText('HSC reweighted to 0.5″').waitFor();
    await page.getByText('UT1 − UTC 0.35 s').waitFor();
    const ownId = Number(new URL(page.url()).pathname.split('/').pop());
    const own = await finishedFit(page, ownId);
    expect(own.status).toBe('done');
    expect(own.settings.nonGravTerms).toEqual([]);
    expect(own.settings.stationWeights).toEqual([{ stn: 'HSC', sigmaArcsec: 0.5 }]);
    expect(own.settings.ut1MinusUtcSeconds).toBe(0.35);
    // the engine used it: every HSC residual carries 0.5" (times the nightly de-weighting factor, >= 1)
    const hsc = own.result!.gravityOnly.residuals.filter((r) => r.stn === 'HSC');
    expect(hsc.length).toBeGreaterThan(0);
    for (const r of hsc) {
      expect(r.sigmaRaArcsec).toBe(r.sigmaDecArcsec);
      expect(r.sigmaRaArcsec).toBeGreaterThanOrEqual(0.5);
    }
    expect(hsc.some((r) => r.sigmaRaArcsec === 0.5)).toBe(true);
    expect(own.result!.nonGrav).toBeNull();
    await page.getByTestId('fit-status').filter({ hasText: 'Done' }).waitFor({ timeout: 30_000 });
    await page.getByTestId('residual-plot-gravity-only').waitFor();
    expect(await page.getByTestId('residual-plot-non-gravitational').count()).toBe(0);
    expect(await page.getByTestId('comparison').count()).toBe(0);
    expect(await page.getByTestId('fit-summary').locator('thead th').count()).toBe(2); // the quantity column and one fit
    expect(await page.getByRole('button', { name: 'Adopt a fit…' }).count()).toBe(0);
    await screenshot(page, 'od-reviewer-gravity-only-fit');
    expect(errors).toEqual([]);
    await context.close();
  }, 900_000);

  it('an admin adds and edits an observatory, with the schema\'s messages at the fields, and cannot delete one in use', async () => {
    const { context, page, errors } = await signedInPage(browser, server.url, 'admin', { expectedStatuses: [401, 409] });
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Observatories', exact: true }).click();
    expect(await waitForHeading(page, 'Observatories')).toBe('Observatories');
    await page.getByTestId('observatory-table').waitFor();

    // refused before sending: longitude out of range, no site given (messages of shared/schemas/od.ts)
    await page.getByLabel('Code').fill('HSZ');
    await page.getByLabel('Name').fill('Halden Sound roof telescope');
    await page.getByLabel('East longitude (°)').fill('400');
    await page.getByRole('button', { name: 'Add the observatory' }).click();
    await page.getByText('Longitude must be in [0, 360) degrees east').waitFor();
    await page.getByText('Give either both parallax constants or the geodetic latitude and height').waitFor();
    expect(await page.getByTestId('observatory-row-HSZ').count()).toBe(0);

    // geodetic latitude and height
    await page.getByLabel('East longitude (°)').fill('10.75');
    await page.getByLabel('Geodetic latitude and height (WGS84)').check();
    await page.getByLabel('Geodetic latitude (°)').fill('59.9');
    await page.getByLabel('Height (m)').fill('120');
    await page.getByRole('button', { name: 'Add the observatory' }).click();
    await page.getByText('Observatory HSZ was added.').waitFor();
    const row = page.getByTestId('observatory-row-HSZ');
    expect(await row.innerText()).toMatch(/Halden Sound roof telescope\s+10\.75°\s+lat 59\.9° · 120 m\s+0/);

    // edit: switch to parallax constants; a bad value is refused at its field first
    await row.getByRole('button', { name: 'Edit HSZ' }).click();
    await page.getByRole('heading', { name: 'Edit observatory HSZ' }).waitFor();
    expect(await page.getByLabel('Code').getAttribute('readonly')).not.toBeNull();
    await page.getByLabel('Name').fill('Halden Sound roof telescope (new mount)');
    await page.getByLabel('Parallax constants (ρ cos φ′, ρ sin φ′)').check();
    await page.getByLabel('ρ cos φ′', { exact: true }).fill('1.5');
    await page.getByLabel('ρ sin φ′', { exact: true }).fill('0.86');
    await page.getByRole('button', { name: 'Save the observatory' }).click();
    await page.getByText("rho cos phi' must be in [0, 1.001]").waitFor();
    await page.getByLabel('ρ cos φ′', { exact: true }).fill('0.50');
    await page.getByRole('button', { name: 'Save the observatory' }).click();
    await page.getByText('Observatory HSZ was saved.').waitFor();
    expect(await row.innerText()).toMatch(/Halden Sound roof telescope \(new mount\)\s+10\.75°\s+ρ cos φ′ 0\.5 · ρ sin φ′ 0\.86/);
    await screenshot(page, 'od-admin-observatories');

    // an observatory the demo arc uses cannot be deleted: the server's 409 message is shown
    const list = (await (await page.request.get(`${server.url}/api/observatories`)).json()) as { observatories: { code: string; observationCount: number }[] } | { code: string; observationCount: number }[];
    const rowsApi = Array.isArray(list) ? list : list.observatories;
    const used = rowsApi.find((o) => o.observationCount > 0)!;
    expect(used).toBeDefined();
    await page.getByTestId(`observatory-row-${used.code}`).getByRole('button', { name: `Delete ${used.code}` }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByRole('button', { name: 'Delete', exact: true }).click();
    await dialog.getByRole('alert').waitFor();
    expect(await dialog.getByRole('alert').innerText()).toMatch(/\S/);
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    expect(await page.getByTestId(`observatory-row-${used.code}`).count()).toBe(1);
    // the unused one goes
    await page.getByTestId('observatory-row-HSZ').getByRole('button', { name: 'Delete HSZ' }).click();
    await dialog.getByRole('button', { name: 'Delete', exact: true }).click();
    await page.getByText('Observatory HSZ was deleted.').waitFor();
    expect(await page.getByTestId('observatory-row-HSZ').count()).toBe(0);
    expect(errors).toEqual([]);
    await context.close();
  }, 120_000);

  // Import a file (the CLI's JSON form, README): a pasted file with one bad entry is refused by entry and field and
  // stores nothing; corrected, it adds both rows and the list refreshes. Limits: shared/schemas/od.ts messages.
  it('an admin imports a small pasted observatory file: a bad entry is named, then the corrected file adds the rows', async () => {
    const { context, page, errors } = await signedInPage(browser, server.url, 'admin', { expectedStatuses: [401, 422] });
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Observatories', exact: true }).click();
    expect(await waitForHeading(page, 'Observatories')).toBe('Observatories');
    await page.getByTestId('observatory-table').waitFor();
    const card = page.getByRole('region', { name: 'Import a file' });
    const entries = [
      { code: 'HSV', name: 'Import test north dome (invented)', longitudeDeg: 12.25, geodeticLatitudeDeg: 60.1, heightM: 90 },
      { code: 'HSW', name: 'Import test south dome (invented)', longitudeDeg: 12.5, rhoCosPhi: 1.5, rhoSinPhi: 0.86 },
    ];
    await card.getByLabel('…or paste the text').fill(JSON.stringify({ observatories: entries }));
    await card.getByRole('button', { name: 'Import the observatories' }).click();
    const issues = page.getByTestId('observatory-import-issues');
    await issues.waitFor();
    expect(await issues.locator('tbody tr').count()).toBe(1);
    expect(await issues.locator('tbody tr').first().innerText()).toMatch(/entry 2\s+HSW\s+rhoCosPhi\s+rho cos phi' must be in \[0, 1\.001\]/);
    expect(await page.getByTestId('observatory-row-HSV').count()).toBe(0);

    entries[1].rhoCosPhi = 0.5;
    await card.getByLabel('…or paste the text').fill(JSON.stringify({ observatories: entries }));
    await card.getByRole('button', { name: 'Import the observatories' }).click();
    await page.getByText('Pasted text: 2 added, 0 replaced').waitFor();
    expect(await page.getByTestId('observatory-row-HSV').innerText()).toMatch(/Import test north dome \(invented\)\s+12\.25°\s+lat 60\.1° · 90 m\s+0/);
    expect(await page.getByTestId('observatory-row-HSW').innerText()).toMatch(/12\.5°\s+ρ cos φ′ 0\.5 · ρ sin φ′ 0\.86/);
    expect(await page.getByTestId('observatory-import-refused').count()).toBe(0);
    await screenshot(page, 'od-admin-observatory-import');
    expect(errors).toEqual([]);
    await context.close();
  }, 120_000);

  it('communications staff see none of the orbit-determination areas', async () => {
    const { context, page, errors } = await signedInPage(browser, server.url, 'communications', { expectedStatuses: [401, 403] });
    const nav = (await page.getByRole('navigation', { name: 'Main' }).getByRole('link').allTextContents()).map((s) => s.trim());
    expect(nav).not.toContain('Observatories');
    expect(nav).not.toContain('Objects');
    for (const path of ['/observatories', '/objects/1/astrometry', '/objects/1/fits', `/fits/${demoFitId}`]) {
      await page.goto(path);
      expect(await waitForHeading(page, 'Not available to your role')).toBe('Not available to your role');
      expect(await page.getByRole('table').count()).toBe(0);
    }
    // and the API refuses them too
    for (const path of ['/api/observatories', `/api/fits/${demoFitId}`]) expect((await page.request.get(`${server.url}${path}`)).status()).toBe(403);
    expect(errors).toEqual([]);
    await context.close();
  }, 120_000);
});
