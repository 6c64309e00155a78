// Linked figures from a real engine run (tests/api/fixtures/bulletin-runs.json): each quantity's value, unit and
// range taken from the run's JSON, the approach matched by body and epoch within 30 days (and not beyond), object-
// level quantities, a Monte Carlo upper bound, and the document helpers (figure order, referenced runs, text).
// Expected numbers are read from the fixture's raw fields here; the formatted texts follow shared/format.ts's
// documented forms ("0.82", "7.35 km/s", en dash ranges), written out by hand.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { bulletinDocumentSchema, documentText, linkedFigures, referencedRunIds, FIGURE_MATCH_DAYS } from '../../shared/bulletins/document';
import { extractFigure, FigureError, tryExtractFigure } from '../../shared/bulletins/figures';

const here = path.dirname(fileURLToPath(import.meta.url));
const runs = JSON.parse(fs.readFileSync(path.join(here, '../api/fixtures/bulletin-runs.json'), 'utf8'));
const result = runs[0].result;
const a = result.approaches[0];
const ref = { runId: 7, solutionId: 3, solutionVersion: 1, inputSha256: runs[0].inputSha256 };
const at = { body: a.body as string, epochTdbJd: a.epochTdbJd as number };

describe('extractFigure', () => {
  it('takes each approach quantity from the run with its unit and range', () => {
    const pal = extractFigure(result, ref, { quantity: 'palermo', ...at });
    expect(pal.value).toBe(a.palermo);
    expect(pal.text).toBe(a.palermo.toFixed(2));
    expect(pal.provenance).toEqual({ ...ref, engineVersion: result.provenance.engineVersion });
    expect(pal.approach).toEqual(at);

    const v = extractFigure(result, ref, { quantity: 'vInfinity', ...at });
    expect(v).toMatchObject({ value: a.vInfinityKmS, unit: 'km/s', text: `${a.vInfinityKmS.toFixed(2)} km/s` });

    const miss = extractFigure(result, ref, { quantity: 'missDistance', ...at });
    expect(miss).toMatchObject({ value: a.distanceKm, low: a.distanceRangeKm.threeSigma[0], high: a.distanceRangeKm.threeSigma[1], unit: 'km' });
    expect(miss.text).toContain('3σ');

    const e = extractFigure(result, ref, { quantity: 'energy', ...at });
    expect(e).toMatchObject({ value: a.energyMt.nominal, low: a.energyMt.low, high: a.energyMt.high, unit: 'Mt' });

    const ip = extractFigure(result, ref, { quantity: 'impactProbability', ...at });
    expect(ip).toMatchObject({ value: a.impactProbability.linear, method: 'linear' });
    expect(ip.text).toBe(a.impactProbability.linear.toExponential(1));

    const date = extractFigure(result, ref, { quantity: 'encounterDate', ...at });
    expect(date.value).toBe(a.utc);
    expect(date.text.startsWith(`${a.utc.slice(0, 10)} ${a.utc.slice(11, 19)} UTC ±`)).toBe(true);
    expect(date.high).toBeCloseTo(a.encounterTime.sigmaSeconds, 6);
  });

  it('matches the approach within 30 days of the stored epoch, not beyond', () => {
    const near = extractFigure(result, ref, { quantity: 'torino', body: 'earth', epochTdbJd: a.epochTdbJd + FIGURE_MATCH_DAYS - 0.5 });
    expect(near.value).toBe(a.torino);
    expect(() => extractFigure(result, ref, { quantity: 'torino', body: 'earth', epochTdbJd: a.epochTdbJd + FIGURE_MATCH_DAYS + 0.5 })).toThrow(FigureError);
    expect(() => extractFigure(result, ref, { quantity: 'torino', body: 'mars', epochTdbJd: a.epochTdbJd })).toThrow(/no mars approach/);
    expect(tryExtractFigure(result, ref, { quantity: 'palermo', body: null, epochTdbJd: null }).problem).toMatch(/needs an approach/);
  });

  it('gives object-level quantities without an approach', () => {
    const d = extractFigure(result, ref, { quantity: 'diameter', body: null, epochTdbJd: null });
    expect(d).toMatchObject({ value: result.diameterM.nominal, low: result.diameterM.low, high: result.diameterM.high, unit: 'm', approach: null });
    expect(extractFigure(result, ref, { quantity: 'torinoMax', body: null, epochTdbJd: null }).value).toBe(result.torinoMax);
    expect(extractFigure(result, ref, { quantity: 'palermoCumulative', body: null, epochTdbJd: null }).value).toBe(result.palermoCumulative);
  });

  it('states a Monte Carlo run without hits as an upper bound', () => {
    // Rule of three: 0 hits in 1000 gives a 95% upper bound of about 3/1000 (common practice; the engine's exact bound is used).
    const mc = structuredClone(result);
    mc.approaches[0].impactProbability = { linear: null, monteCarlo: { hits: 0, samples: 1000, estimate: 0, ci95: [0, 0.0037], upperBound95: 0.002991 }, lov: null };
    mc.approaches[0].ratingProbabilitySource = null;
    const f = extractFigure(mc, ref, { quantity: 'impactProbability', ...at });
    expect(f.text).toBe('below 3.0e-3 (95%)');
    expect(f.value).toBeNull();
    expect(f.high).toBe(0.002991);
  });

  it('refuses an unreadable result', () => {
    expect(() => extractFigure({ nothing: true }, ref, { quantity: 'palermo', ...at })).toThrow(/cannot be read/);
  });
});

describe('document helpers', () => {
  const doc = bulletinDocumentSchema.parse({
    type: 'doc',
    content: [
      { type: 'paragraph', content: [{ type: 'text', text: 'P ' }, { type: 'linkedFigure', attrs: { runId: 9, quantity: 'palermo', body: 'earth', epochTdbJd: 2464222.75 } }] },
      { type: 'bulletList', content: [{ type: 'listItem', content: [{ type: 'paragraph', content: [{ type: 'linkedFigure', attrs: { runId: 4, quantity: 'diameter' } }] }] }] },
      { type: 'riskTable', attrs: { runId: 2 } },
    ],
  });
  it('lists figures in document order, defaults object-level attrs to null, and collects runs', () => {
    expect(linkedFigures(doc).map((f) => [f.index, f.attrs.runId, f.attrs.body])).toEqual([
      [0, 9, 'earth'],
      [1, 4, null],
    ]);
    expect(referencedRunIds(doc)).toEqual([2, 4, 9]);
    expect(documentText(doc, (i) => `<${i}>`)).toBe('P <0>\n- <1>\n[risk table of run 2]');
  });
  it('refuses javascript: links and bad plot attributes', () => {
    const link = { type: 'doc', content: [{ type: 'paragraph', content: [{ type: 'text', text: 'x', marks: [{ type: 'link', attrs: { href: 'javascript:alert(1)' } }] }] }] };
    expect(bulletinDocumentSchema.safeParse(link).success).toBe(false);
    const plot = { type: 'doc', content: [{ type: 'plot', attrs: { runId: 1, kind: 'pie', body: 'earth', epochTdbJd: 1 } }] };
    expect(bulletinDocumentSchema.safeParse(plot).success).toBe(false);
  });
});
