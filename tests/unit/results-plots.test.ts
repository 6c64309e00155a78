// shared/plots: the pure SVG renderers (server PDFs, downloads). Checked: well-formed SVG (jsdom's XML parser,
// present in node_modules as a dependency of the toolchain), the capture disk drawn to the axis scale with equal
// scales on both axes, the 1-sigma ellipse against the engine's own b-plane sigmas, Monte Carlo points inside the
// plot box, and the two-body distance curve against an independent numerical integration.
import { createRequire } from 'node:module';
import { beforeAll, describe, expect, it } from 'vitest';
import { assess } from '../../server/engine/assess';
import { loadOrbitSolution } from '../../server/engine/input/solution';
import { parseEpoch } from '../../server/engine/time';
import { readFileSync } from 'node:fs';
import { parseAssessment, type AssessmentResult } from '../../shared/schemas/assessment';
import { bPlaneSvg, covarianceEllipse, distanceSeries, distanceSvg, hyperbolaDistanceKm } from '../../shared/plots';

// jsdom ships no type declarations: typed here with the DOM lib's DOMParser.
const { JSDOM } = createRequire(import.meta.url)('jsdom') as { JSDOM: new (html: string) => { window: { DOMParser: typeof DOMParser } } };
const parser = new new JSDOM('').window.DOMParser();
function parseSvg(svg: string): Document {
  const doc = parser.parseFromString(svg, 'image/svg+xml');
  expect(doc.getElementsByTagName('parsererror').length, 'well-formed XML').toBe(0);
  expect(doc.documentElement.tagName).toBe('svg');
  return doc;
}
const attr = (el: Element, name: string) => Number(el.getAttribute(name));

const GM_EARTH = 3.9860043550702266e5; // km^3/s^2, DE440 (Park et al. 2021)
const R_EARTH = 6378.137; // km, WGS84

/** Synthetic result: one Earth approach with a round covariance and Monte Carlo points (xi, zeta) on a grid. */
function synthetic(): AssessmentResult {
  const vInf = 10;
  // Capture radius b = R sqrt(1 + v_esc^2 / v_inf^2), v_esc^2 = 2 GM / R (Opik 1976; METHODS.md 6.2).
  const capture = R_EARTH * Math.sqrt(1 + (2 * GM_EARTH) / R_EARTH / (vInf * vInf));
  const points = [] as { xiKm: number; zetaKm: number; impact: boolean }[];
  for (let i = -20; i <= 20; i++) for (let j = -20; j <= 20; j++) {
    const xi = 15_000 + i * 1500, zeta = -5_000 + j * 1500;
    points.push({ xiKm: xi, zetaKm: zeta, impact: Math.hypot(xi, zeta) < capture });
  }
  return parseAssessment({
    object: 'TEST-1',
    analysisDateUtc: '2026-12-01T00:00:00Z',
    provenance: { inputSha256: 'x', engineVersion: 'test', ephemeris: 'test', integrator: 'test', tolerance: 1e-9, seed: 1, clones: points.length },
    approaches: [
      {
        body: 'earth', epochTdbJd: 2464222.75, utc: '2034-09-17T05:58:50.818Z', distanceKm: 12_000, relativeSpeedKmS: 12, vInfinityKmS: vInf,
        bPlane: { xiKm: 15_000, zetaKm: -5_000 }, impact: false, distanceSigmaKm: 8000,
        impactProbability: { linear: 0.05, monteCarlo: { hits: 3, samples: 1681, estimate: 3 / 1681, ci95: [6e-4, 5e-3], upperBound95: 5e-3 }, lov: null },
        energyMt: { nominal: 10, low: 3, high: 30 }, palermo: -1.5, torino: 2,
        captureRadiusKm: capture,
        bPlaneCovarianceKm2: [[64e6, 30e6], [30e6, 36e6]],
        distanceRangeKm: { oneSigma: [4000, 20_000], threeSigma: [0, 40_000] },
        encounterTime: { sigmaSeconds: 600, oneSigmaUtc: [], threeSigmaUtc: [] },
        monteCarloBPlanePoints: points,
      },
    ],
    palermoCumulative: -1.5, torinoMax: 2, diameterM: { nominal: 140, low: 90, high: 210 },
  });
}

/** px per unit along an axis from its tick labels (positions and values read back from the SVG). */
function axisScale(doc: Document, axis: 'x' | 'y', box: { x: number; y: number; w: number; h: number }): number {
  const ticks = [...doc.getElementsByTagName('text')]
    .filter((t) => (axis === 'x' ? Math.abs(attr(t, 'y') - (box.y + box.h + 16)) < 0.01 : t.getAttribute('text-anchor') === 'end' && Math.abs(attr(t, 'x') - (box.x - 6)) < 0.01))
    .map((t) => ({ pos: axis === 'x' ? attr(t, 'x') : attr(t, 'y') - 4, value: Number((t.textContent ?? '').replace(/,/g, '')) }));
  expect(ticks.length).toBeGreaterThanOrEqual(3);
  const a = ticks[0], b = ticks[ticks.length - 1];
  return Math.abs((b.pos - a.pos) / (b.value - a.value));
}

describe('bPlaneSvg', () => {
  it('draws the capture disk to the axis scale, equal on both axes', () => {
    const r = synthetic();
    for (const view of ['fit', 'capture'] as const) {
      const doc = parseSvg(bPlaneSvg(r, 0, { view }));
      const area = doc.querySelector('[data-role="plot-area"]')!;
      const box = { x: attr(area, 'x'), y: attr(area, 'y'), w: attr(area, 'width'), h: attr(area, 'height') };
      const sx = axisScale(doc, 'x', box), sy = axisScale(doc, 'y', box);
      expect(sy / sx).toBeCloseTo(1, 3);
      const disk = doc.querySelector('[data-role="capture-disk"]')!;
      // Earth capture radius at v_inf = 10 km/s: 6378.137 sqrt(1 + 2 GM/(R v^2)) = 6378.137 x 1.49997 = 9567.0 km.
      expect(r.approaches[0].captureRadiusKm!).toBeCloseTo(9567.0, 0);
      expect(attr(disk, 'r')).toBeCloseTo(9567.0 * sx, 0);
      // centred on the planet: the centre's pixel is where the tick labelled 0 would be.
      const zeroX = [...doc.getElementsByTagName('text')].find((t) => t.textContent === '0' && Math.abs(attr(t, 'y') - (box.y + box.h + 16)) < 0.01);
      if (zeroX) expect(attr(disk, 'cx')).toBeCloseTo(attr(zeroX, 'x'), 1);
    }
  });

  it('draws every Monte Carlo point inside the plot box, hits included', () => {
    const r = synthetic();
    const pts = r.approaches[0].monteCarloBPlanePoints!;
    const check = (svg: string) => {
      const doc = parseSvg(svg);
      const area = doc.querySelector('[data-role="plot-area"]')!;
      const [x0, y0] = [attr(area, 'x'), attr(area, 'y')];
      const [x1, y1] = [x0 + attr(area, 'width'), y0 + attr(area, 'height')];
      const dots = [...doc.querySelectorAll('[data-role="mc-point"]')];
      for (const d of dots) {
        expect(attr(d, 'cx')).toBeGreaterThanOrEqual(x0);
        expect(attr(d, 'cx')).toBeLessThanOrEqual(x1);
        expect(attr(d, 'cy')).toBeGreaterThanOrEqual(y0);
        expect(attr(d, 'cy')).toBeLessThanOrEqual(y1);
      }
      return dots;
    };
    // fit view: all points shown
    expect(check(bPlaneSvg(r, 0)).length).toBe(pts.length);
    // zoomed view: points outside are left out, not drawn outside the box
    const zoomed = check(bPlaneSvg(r, 0, { view: { xiMinKm: -10_000, xiMaxKm: 10_000, zetaMinKm: -10_000, zetaMaxKm: 10_000 } }));
    expect(zoomed.length).toBeGreaterThan(0);
    expect(zoomed.length).toBeLessThan(pts.length);
    // a cap keeps every hit
    const hits = pts.filter((p) => p.impact).length;
    expect(hits).toBeGreaterThan(0);
    const capped = check(bPlaneSvg(r, 0, { maxPoints: 300 }));
    expect(capped.length).toBe(300);
    expect(capped.filter((d) => d.getAttribute('fill') === '#dc2626').length).toBe(hits);
  });

  it('answers with a valid SVG and a message when the approach has no b-plane', () => {
    const r = synthetic();
    r.approaches[0].bPlane = null;
    const doc = parseSvg(bPlaneSvg(r, 0));
    expect(doc.documentElement.textContent).toMatch(/No b-plane/);
    expect(() => bPlaneSvg(r, 5)).toThrow(RangeError);
  });
});

describe('real engine result (demo asteroid, linear method)', () => {
  let result: AssessmentResult;
  beforeAll(async () => {
    const text = readFileSync(new URL('../../server/db/demo/hso-26-n4.opm', import.meta.url), 'utf8');
    const orbit = loadOrbitSolution(text);
    const json = await assess(orbit, {
      untilTdbDays: parseEpoch('2035-01-01T00:00:00Z').tdbDays,
      methods: ['linear'], clones: 1, seed: 1, bodies: ['earth'], maxAu: 0.05,
      analysisTdbDays: parseEpoch('2026-12-01T00:00:00Z').tdbDays,
    });
    result = parseAssessment(JSON.parse(JSON.stringify(json)));
  }, 30_000);

  it('parses with the shared schema and draws the 1-sigma ellipse with the engine\'s sigmas', () => {
    const a = result.approaches[0];
    expect(a.utc.slice(0, 10)).toBe('2034-09-17');
    // independent eigen-decomposition of the engine's b-plane covariance vs the engine's own sigmas
    const e = covarianceEllipse(a.bPlaneCovarianceKm2!, 1)!;
    expect(e.semiMajor / a.bPlaneSigmasKm!.major).toBeCloseTo(1, 6);
    expect(e.semiMinor / a.bPlaneSigmasKm!.minor).toBeCloseTo(1, 4);
    const doc = parseSvg(bPlaneSvg(result, 0, { caption: 'Run 1 · solution v1 · linear' }));
    expect(doc.querySelector('[data-role="sigma1"]')).not.toBeNull();
    expect(doc.querySelector('[data-role="sigma3"]')).not.toBeNull();
    expect(doc.documentElement.textContent).toContain('Run 1 · solution v1 · linear');
    parseSvg(distanceSvg(result, 0, { unit: 'ld' }));
  });

  it('puts the distance curve\'s minimum at the nominal closest approach', () => {
    const s = distanceSeries(result, 0, { samples: 201 });
    const iMin = s.nominalKm.indexOf(Math.min(...s.nominalKm));
    expect(s.tHours[iMin]).toBeCloseTo(0, 6);
    expect(s.nominalKm[iMin]).toBeCloseTo(result.approaches[0].distanceKm, 3);
    for (let i = 0; i < s.tHours.length; i++) {
      expect(s.lowKm![i]).toBeLessThanOrEqual(s.nominalKm[i] + 1e-6);
      expect(s.highKm![i]).toBeGreaterThanOrEqual(s.nominalKm[i] - 1e-6);
    }
  });
});

describe('hyperbolaDistanceKm', () => {
  it('agrees with a numerical integration of the two-body problem', () => {
    // Independent check: RK4 integration of r'' = -GM r/|r|^3 from periapsis (vis-viva speed), 1 s steps.
    const q = 26_000, vInf = 7.347;
    const f = (u: number[]) => {
      const r3 = Math.pow(u[0] * u[0] + u[1] * u[1], 1.5);
      return [u[2], u[3], (-GM_EARTH * u[0]) / r3, (-GM_EARTH * u[1]) / r3];
    };
    let u = [q, 0, 0, Math.sqrt(vInf * vInf + (2 * GM_EARTH) / q)];
    const h = 1;
    const add = (a: number[], b: number[], k: number) => a.map((v, i) => v + k * b[i]);
    for (let t = 1; t <= 6 * 3600; t++) {
      const k1 = f(u), k2 = f(add(u, k1, h / 2)), k3 = f(add(u, k2, h / 2)), k4 = f(add(u, k3, h));
      u = u.map((v, i) => v + (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]));
      if (t % 3600 === 0) expect(hyperbolaDistanceKm(q, vInf, GM_EARTH, t) / Math.hypot(u[0], u[1])).toBeCloseTo(1, 6);
    }
    expect(hyperbolaDistanceKm(q, vInf, GM_EARTH, 0)).toBe(q);
    expect(hyperbolaDistanceKm(q, vInf, GM_EARTH, -3600)).toBeCloseTo(hyperbolaDistanceKm(q, vInf, GM_EARTH, 3600), 9);
  });
});

describe('byte-stable output (PDFs hash their content)', () => {
  it('renders the same bytes for the same input', () => {
    const r = synthetic();
    expect(bPlaneSvg(r, 0, { caption: 'c' })).toBe(bPlaneSvg(synthetic(), 0, { caption: 'c' }));
    expect(distanceSvg(r, 0, { unit: 'ld' })).toBe(distanceSvg(synthetic(), 0, { unit: 'ld' }));
  });
});

describe('distance band caveat', () => {
  it('says when the linear method failed its check at the approach', () => {
    const r = synthetic();
    expect(distanceSeries(r, 0).method).not.toMatch(/NOT validated/);
    r.approaches[0].linearValidity = { valid: false, nonlinearity: 0.4, reasons: ['3-sigma check 40%'] };
    expect(distanceSeries(r, 0).method).toMatch(/NOT validated/);
  });
});
