// shared/plots/residuals.ts: the residual plot of an orbit fit. Checked on a hand-made set of residuals whose
// values, stations and statuses are known: well-formed SVG (saxes, a strict XML 1.0 parser), one marker per
// residual in each panel with the value it stands for placed where the panel's own tick labels say it belongs
// (the axis read back from the SVG, independent of the renderer's scale function), one colour per station and
// the same colour in the legend, rejected points drawn as crosses and excluded ones hollow and grey, the zero line
// at the tick labelled 0, date ticks on UTC day/month boundaries in time order, and off-scale points kept visible
// as edge markers. What is plotted: observed minus computed, RA multiplied by cos(dec), arcsec (METHODS.md §9.1).
// Plot conventions (zero line, colour by station, crosses for rejected points): common practice, no source.
import { SaxesParser } from 'saxes';
import { describe, expect, it } from 'vitest';
import type { Residual } from '../../shared/schemas/od';
import { dateTicks, nightMeans, residualRangeArcsec, residualPoints, residualsSvg, stationColors, EXCLUDED_COLOR } from '../../shared/plots';

type El = { name: string; attrs: Record<string, string>; children: El[]; text: string; parent: El | null };

function parseSvg(svg: string): El {
  const parser = new SaxesParser();
  const root: El = { name: '#root', attrs: {}, children: [], text: '', parent: null };
  let cur = root;
  parser.on('opentag', (t) => {
    const el: El = { name: t.name, attrs: Object.fromEntries(Object.entries(t.attributes).map(([k, v]) => [k, String(v)])), children: [], text: '', parent: cur };
    cur.children.push(el);
    cur = el;
  });
  parser.on('text', (s) => {
    for (let e: El | null = cur; e; e = e.parent) e.text += s;
  });
  parser.on('closetag', () => {
    cur = cur.parent!;
  });
  parser.write(svg).close(); // throws on any well-formedness error
  expect(root.children).toHaveLength(1);
  expect(root.children[0].name).toBe('svg');
  return root.children[0];
}

function all(el: El, pred: (e: El) => boolean, out: El[] = []): El[] {
  for (const c of el.children) {
    if (pred(c)) out.push(c);
    all(c, pred, out);
  }
  return out;
}
const num = (e: El, a: string) => Number(e.attrs[a]);

/** Residuals with known values: 3 stations, one rejected outlier, one to be marked excluded. */
function sample(): Residual[] {
  const rows: [string, string, number, number, 'used' | 'rejected'][] = [
    ['HSA', '2026-03-10T21:00:00.000Z', 0.3, -0.2, 'used'],
    ['HSA', '2026-04-02T22:30:00.000Z', -0.4, 0.1, 'used'],
    ['HSB', '2026-05-15T01:10:00.000Z', 0.1, 0.5, 'used'],
    ['HSB', '2026-06-20T03:00:00.000Z', 4.2, -3.1, 'rejected'],
    ['HSC', '2026-07-30T23:45:00.000Z', -0.6, -0.3, 'used'],
    ['HSC', '2026-09-20T20:00:00.000Z', 0.2, 0.4, 'used'],
  ];
  return rows.map(([stn, obsTime, ra, dec, status], i) => ({
    index: i,
    line: 10 + i,
    stn,
    obsTime,
    obsTimeTdbDays: (Date.parse(obsTime) - Date.parse('2000-01-01T12:00:00Z')) / 86_400_000,
    raCosDecArcsec: ra,
    decArcsec: dec,
    sigmaRaArcsec: 0.3,
    sigmaDecArcsec: 0.25,
    chiSquare: (ra / 0.3) ** 2 + (dec / 0.25) ** 2,
    status,
  }));
}

/** Pixel <-> value map of a panel's vertical axis, from two of its tick labels (y of the text = tick y + 4). */
function yAxis(panel: El): (v: number) => number {
  const ticks = all(panel, (e) => e.attrs['data-role'] === 'y-tick').map((t) => ({ y: num(t, 'y') - 4, v: Number(t.text.replace('−', '-')) }));
  expect(ticks.length).toBeGreaterThanOrEqual(3);
  const a = ticks[0], b = ticks[ticks.length - 1];
  const k = (b.y - a.y) / (b.v - a.v);
  return (v) => a.y + (v - a.v) * k;
}

/** Centre of a marker (circle, or the cross/triangle path's bounding box centre). */
function centre(e: El): { x: number; y: number } {
  if (e.name === 'circle') return { x: num(e, 'cx'), y: num(e, 'cy') };
  const xs: number[] = [], ys: number[] = [];
  for (const m of e.attrs.d.matchAll(/[ML]([-\d.]+) ([-\d.]+)/g)) {
    xs.push(Number(m[1]));
    ys.push(Number(m[2]));
  }
  return { x: (Math.min(...xs) + Math.max(...xs)) / 2, y: (Math.min(...ys) + Math.max(...ys)) / 2 };
}

describe('residualsSvg', () => {
  const res = sample();
  const excludedLine = 14; // the HSC point of 2026-07-30
  const svg = residualsSvg(res, { excluded: (r) => r.line === excludedLine, errorBars: true });
  const doc = parseSvg(svg);
  const panels = Object.fromEntries(all(doc, (e) => e.name === 'g' && !!e.attrs['data-panel']).map((g) => [g.attrs['data-panel'], g]));

  it('has two panels, RA·cos(dec) and Dec, each with one marker per residual', () => {
    expect(Object.keys(panels).sort()).toEqual(['dec', 'ra']);
    for (const panel of ['ra', 'dec']) {
      const markers = all(panels[panel], (e) => e.attrs['data-role'] === 'residual');
      expect(markers.map((m) => Number(m.attrs['data-line'])).sort((a, b) => a - b)).toEqual(res.map((r) => r.line));
    }
    expect(doc.text).toContain('RA·cos(Dec)');
    expect(doc.text).toContain('Dec (″)');
  });

  it('places every value where the panel\'s tick labels put it, and the zero line at the tick 0', () => {
    for (const panel of ['ra', 'dec'] as const) {
      const Y = yAxis(panels[panel]);
      const zero = all(panels[panel], (e) => e.attrs['data-role'] === 'zero')[0];
      expect(num(zero, 'y1')).toBeCloseTo(Y(0), 1);
      for (const m of all(panels[panel], (e) => e.attrs['data-role'] === 'residual')) {
        const r = res.find((x) => x.line === Number(m.attrs['data-line']))!;
        const v = panel === 'ra' ? r.raCosDecArcsec : r.decArcsec;
        expect(Number(m.attrs['data-value'])).toBe(v);
        // 2-decimal coordinates: within 0.02 px
        expect(centre(m).y).toBeCloseTo(Y(v), 1);
      }
    }
  });

  it('covers every point with a symmetric vertical range (the outlier included)', () => {
    const Y = yAxis(panels.ra);
    const area = all(panels.ra, (e) => e.attrs['data-role'] === 'plot-area')[0];
    const top = num(area, 'y'), bottom = top + num(area, 'height');
    // the largest |value| with its 1-sigma bar is the rejected RA residual 4.2 + 0.3
    const yMax = residualRangeArcsec(residualPoints(res), { errorBars: true });
    expect(yMax).toBeGreaterThanOrEqual(4.5);
    expect(yMax).toBeLessThan(4.5 * 1.1);
    expect(Y(yMax)).toBeCloseTo(top, 0);
    expect(Y(-yMax)).toBeCloseTo(bottom, 0);
    for (const m of all(panels.ra, (e) => e.attrs['data-role'] === 'residual')) {
      const c = centre(m);
      expect(c.y).toBeGreaterThanOrEqual(top);
      expect(c.y).toBeLessThanOrEqual(bottom);
      expect(m.attrs['data-offscale']).toBeUndefined();
    }
  });

  it('gives each station its own colour, the same in the legend', () => {
    const colours = stationColors(res.map((r) => r.stn));
    expect(Object.keys(colours)).toEqual(['HSA', 'HSB', 'HSC']);
    expect(new Set(Object.values(colours)).size).toBe(3);
    for (const m of all(doc, (e) => e.attrs['data-role'] === 'residual' && e.attrs['data-status'] === 'used')) {
      expect(m.attrs.fill).toBe(colours[m.attrs['data-stn']]);
    }
    const legend = all(doc, (e) => e.attrs['data-role'] === 'legend-station');
    expect(legend.map((g) => g.attrs['data-stn'])).toEqual(['HSA', 'HSB', 'HSC']);
    for (const g of legend) expect(g.children.find((c) => c.name === 'circle')!.attrs.fill).toBe(colours[g.attrs['data-stn']]);
  });

  it('marks the rejected point with a cross and the excluded one hollow and grey', () => {
    const colours = stationColors(res.map((r) => r.stn));
    const rejected = all(doc, (e) => e.attrs['data-role'] === 'residual' && e.attrs['data-status'] === 'rejected');
    expect(rejected).toHaveLength(2); // one per panel
    for (const m of rejected) {
      expect(m.name).toBe('path');
      expect(m.attrs.d.match(/M/g)).toHaveLength(2); // two strokes: a cross
      expect(m.attrs.stroke).toBe(colours.HSB);
      expect(m.attrs['data-line']).toBe('13');
    }
    const excluded = all(doc, (e) => e.attrs['data-role'] === 'residual' && e.attrs['data-status'] === 'excluded');
    expect(excluded).toHaveLength(2);
    for (const m of excluded) {
      expect(m.name).toBe('circle');
      expect(m.attrs.fill).toBe('none');
      expect(m.attrs.stroke).toBe(EXCLUDED_COLOR);
      expect(m.attrs['data-line']).toBe(String(excludedLine));
    }
    // the used markers are filled circles
    const used = all(doc, (e) => e.attrs['data-role'] === 'residual' && e.attrs['data-status'] === 'used');
    expect(used).toHaveLength(2 * 4);
    for (const m of used) expect(m.name === 'circle' && m.attrs.fill !== 'none').toBe(true);
    // error bars: one per marker and panel, ±1 sigma long (the RA sigma is 0.3")
    const bars = all(panels.ra, (e) => e.attrs['data-role'] === 'error-bar');
    expect(bars).toHaveLength(res.length);
    const Y = yAxis(panels.ra);
    const px = Math.abs(Y(0.3) - Y(0));
    const inside = bars.filter((b) => Math.abs(num(b, 'y2') - num(b, 'y1')) > 0);
    for (const b of inside) expect(Math.abs(num(b, 'y2') - num(b, 'y1'))).toBeCloseTo(2 * px, 0);
  });

  it('puts the points in time order along date ticks on UTC month boundaries', () => {
    const ticks = all(doc, (e) => e.attrs['data-role'] === 'x-tick');
    expect(ticks.length).toBeGreaterThanOrEqual(3);
    const ms = ticks.map((t) => Number(t.attrs['data-ms']));
    for (const t of ms) {
      const d = new Date(t);
      expect(d.getUTCDate()).toBe(1);
      expect(d.getUTCHours() + d.getUTCMinutes() + d.getUTCSeconds()).toBe(0);
    }
    expect(ticks.map((t) => t.text)).toEqual(ms.map((t) => new Date(t).toISOString().slice(0, 10)));
    // pixel of an instant, interpolated from the first and last tick labels
    const x0 = num(ticks[0], 'x'), x1 = num(ticks[ticks.length - 1], 'x');
    const X = (t: number) => x0 + ((t - ms[0]) / (ms[ms.length - 1] - ms[0])) * (x1 - x0);
    for (const m of all(panels.dec, (e) => e.attrs['data-role'] === 'residual')) {
      const r = res.find((x) => x.line === Number(m.attrs['data-line']))!;
      expect(centre(m).x).toBeCloseTo(X(Date.parse(r.obsTime)), 0);
    }
  });

  it('keeps points beyond a forced range visible as edge markers', () => {
    const zoomed = parseSvg(residualsSvg(res, { yMaxArcsec: 1 }));
    const off = all(zoomed, (e) => e.attrs['data-offscale'] === 'true');
    // the outlier (RA +4.2", Dec -3.1") in both panels
    expect(off.map((e) => e.attrs['data-line'])).toEqual(['13', '13']);
    const ra = all(zoomed, (e) => e.attrs['data-panel'] === 'ra')[0];
    const area = all(ra, (e) => e.attrs['data-role'] === 'plot-area')[0];
    const c = centre(off[0]);
    expect(c.y).toBeGreaterThanOrEqual(num(area, 'y'));
    expect(c.y).toBeLessThan(num(area, 'y') + 10); // positive residual: at the top edge
    // the y ticks stay within +-1"
    for (const t of all(ra, (e) => e.attrs['data-role'] === 'y-tick')) expect(Math.abs(Number(t.attrs['data-value']))).toBeLessThanOrEqual(1);
  });

  it('escapes station codes and answers a bad time with a line-precise error', () => {
    const bad = sample();
    bad[2] = { ...bad[2], obsTime: '2026-13-40T00:00:00Z' };
    expect(() => residualsSvg(bad)).toThrow(/line 12/);
  });
});

describe('dateTicks', () => {
  it('uses whole days on a short arc and first-of-month ticks on a long one', () => {
    const a = Date.parse('2026-03-10T05:00:00Z'), b = Date.parse('2026-03-15T17:00:00Z');
    const days = dateTicks(a, b, 6);
    expect(days.map((t) => new Date(t).toISOString())).toEqual([
      '2026-03-11T00:00:00.000Z', '2026-03-12T00:00:00.000Z', '2026-03-13T00:00:00.000Z',
      '2026-03-14T00:00:00.000Z', '2026-03-15T00:00:00.000Z',
    ]);
    const months = dateTicks(Date.parse('2025-11-20T00:00:00Z'), Date.parse('2026-09-02T00:00:00Z'), 6);
    // 9.5 months at about 6 ticks: every 2nd month, on even-numbered month boundaries counted from January
    expect(months.map((t) => new Date(t).toISOString().slice(0, 10))).toEqual(['2026-01-01', '2026-03-01', '2026-05-01', '2026-07-01', '2026-09-01']);
  });
});

describe('sexagesimal display of positions (astrometry table)', () => {
  // RA hours = degrees / 15; minutes and seconds by 60 (common practice, no source). Worked by hand:
  // 257.641893942 / 15 = 17.176126263 h -> 10.567576 min -> 34.0546 s.
  it('prints RA as hh mm ss.sss and Dec as ±dd mm ss.ss', async () => {
    const { formatRa, formatDec } = await import('../../src/pages/astrometry/format');
    expect(formatRa(257.641893942)).toBe('17 10 34.055');
    expect(formatDec(38.913297448)).toBe('+38 54 47.87'); // 0.913297448 deg = 54.797847 min -> 47.87 s
    // the sign survives a Dec between 0 and -1 degree (no "-0" degrees lost)
    expect(formatDec(-0.5)).toBe('−00 30 00.00');
    // rounding carries into the next unit instead of printing 60 s, and RA wraps at 24 h
    expect(formatRa(359.9999999999)).toBe('00 00 00.000');
    expect(formatDec(-12.999999999)).toBe('−13 00 00.00');
  });
});

describe('residual table CSV', () => {
  // RFC 4180: fields with commas or quotes are quoted, quotes doubled.
  it('writes one line per residual with full precision and quotes what needs it', async () => {
    const { residualsCsv } = await import('../../src/pages/fits/format');
    const rows = sample().slice(0, 2);
    rows[1] = { ...rows[1], stn: 'A,"B"' };
    const lines = residualsCsv(rows).trimEnd().split('\n');
    expect(lines).toHaveLength(3);
    expect(lines[0].split(',')).toHaveLength(9);
    expect(lines[1]).toBe(`10,HSA,2026-03-10T21:00:00.000Z,0.3,-0.2,0.3,0.25,${rows[0].chiSquare},used`);
    expect(lines[2].startsWith('11,"A,""B""",2026-04-02T22:30:00.000Z,-0.4,0.1,')).toBe(true);
  });
});

describe('nightly means', () => {
  // Two nights: three used points and one rejected on the first (across 0h UTC), two used on the second.
  const night = (stn: string, obsTime: string, ra: number, dec: number, status: 'used' | 'rejected', i: number): Residual => ({
    index: i, line: 20 + i, stn, obsTime, obsTimeTdbDays: 0, raCosDecArcsec: ra, decArcsec: dec, sigmaRaArcsec: 0.3, sigmaDecArcsec: 0.3, chiSquare: 1, status,
  });
  const rows = [
    night('HSA', '2026-05-01T22:00:00Z', 0.3, -0.3, 'used', 0),
    night('HSA', '2026-05-01T23:00:00Z', 0.6, 0.0, 'used', 1),
    night('HSB', '2026-05-02T01:00:00Z', 0.0, 0.3, 'used', 2),
    night('HSB', '2026-05-02T01:30:00Z', 5.0, 5.0, 'rejected', 3),
    night('HSC', '2026-05-05T21:00:00Z', -0.2, 0.1, 'used', 4),
    night('HSC', '2026-05-05T22:00:00Z', -0.4, 0.3, 'used', 5),
  ];

  it('averages the used points of each night (rejected and excluded ones left out)', () => {
    const m = nightMeans(residualPoints(rows));
    expect(m).toHaveLength(2);
    expect(m[0].count).toBe(3);
    expect(m[0].raCosDecArcsec).toBeCloseTo(0.3, 12);
    expect(m[0].decArcsec).toBeCloseTo(0, 12);
    expect(new Date(m[0].timeMs).toISOString()).toBe('2026-05-01T23:20:00.000Z');
    expect(m[1]).toMatchObject({ count: 2 });
    expect(m[1].raCosDecArcsec).toBeCloseTo(-0.3, 12);
    expect(m[1].decArcsec).toBeCloseTo(0.2, 12);
    // an excluded point no longer counts
    const without = nightMeans(residualPoints(rows, (r) => r.line === 21));
    expect(without[0].count).toBe(2);
    expect(without[0].raCosDecArcsec).toBeCloseTo(0.15, 12);
  });

  it('draws them as a line through the means, on the panel scale', () => {
    const doc = parseSvg(residualsSvg(rows, { nightMeans: true, yMaxArcsec: 1 }));
    for (const panel of ['ra', 'dec'] as const) {
      const g = all(doc, (e) => e.attrs['data-panel'] === panel)[0];
      const Y = yAxis(g);
      const line = all(g, (e) => e.attrs['data-role'] === 'night-mean');
      expect(line).toHaveLength(1);
      const ys = [...line[0].attrs.d.matchAll(/[ML][-\d.]+ ([-\d.]+)/g)].map((x) => Number(x[1]));
      const want = panel === 'ra' ? [0.3, -0.3] : [0, 0.2];
      expect(ys).toHaveLength(2);
      ys.forEach((y, i) => expect(y).toBeCloseTo(Y(want[i]), 1));
    }
    expect(all(parseSvg(residualsSvg(rows)), (e) => e.attrs['data-role'] === 'night-mean')).toHaveLength(0);
  });
});

describe('dateTicks on a four-month arc', () => {
  it('stays on month boundaries even when many ticks fit', () => {
    const t = dateTicks(Date.parse('2026-05-30T00:00:00Z'), Date.parse('2026-10-10T00:00:00Z'), 9);
    expect(t.map((x) => new Date(x).toISOString().slice(0, 10))).toEqual(['2026-06-01', '2026-07-01', '2026-08-01', '2026-09-01', '2026-10-01']);
  });
});

describe('uncertainty columns in scientific notation (fit comparison)', () => {
  // Significant-digit rounding as Number.prototype.toExponential (ECMA-262 §21.1.3.2); the column reads alike
  // whatever the magnitude (common practice, no source).
  it('writes every value as mantissa x 10^exponent with the given significant digits', async () => {
    const { formatScientific } = await import('../../src/pages/objects/format');
    expect(formatScientific(0.0011604, 3)).toBe('1.16×10⁻³');
    expect(formatScientific(7.5708e-6, 3)).toBe('7.57×10⁻⁶');
    expect(formatScientific(-2.5e12, 2)).toBe('-2.5×10¹²');
    expect(formatScientific(2.5, 3)).toBe('2.50');
    expect(formatScientific(0, 3)).toBe('0');
    expect(formatScientific(null, 3)).toBe('—');
  });
});
