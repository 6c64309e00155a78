// shared/format.ts: numbers with units and uncertainty as the result screens, exports and PDFs show them.
import { describe, expect, it } from 'vitest';
import {
  calendarFromJd,
  convertDistanceKm,
  describeImpactProbability,
  formatDiameterRange,
  formatDistance,
  formatDistanceRange,
  formatEnergyRange,
  formatOdds,
  formatPalermo,
  formatProbability,
  formatTdbJd,
  formatUnboundSignificance,
  formatUpperBound,
  formatUtc,
} from '../../shared/format';

describe('distance unit switch', () => {
  it('converts with the stated unit lengths', () => {
    // 1 au = 149 597 870.7 km exactly (IAU 2012 Resolution B2).
    expect(convertDistanceKm(149_597_870.7, 'au')).toBe(1);
    // Lunar distance 384 399 km (semi-major axis of the Moon's orbit; NASA Moon fact sheet, recalled from memory).
    expect(convertDistanceKm(384_399, 'ld')).toBe(1);
    // Earth equatorial radius 6378.137 km (WGS84).
    expect(convertDistanceKm(6378.137 * 4, 're')).toBeCloseTo(4, 12);
  });
  it('prints each unit with its label', () => {
    // 26 000 km / 384 399 km = 0.06764 LD; / 6378.137 km = 4.076 Earth radii; / 1 au = 1.738e-4 au.
    expect(formatDistance(26_000, 'km')).toBe('26,000 km');
    expect(formatDistance(26_000, 'ld')).toBe('0.0676 LD');
    expect(formatDistance(26_000, 're')).toBe('4.08 R⊕');
    expect(formatDistance(26_000, 'au')).toBe('1.74e-4 au');
    expect(formatDistance(7_480_000, 'au')).toBe('0.0500 au');
    expect(formatDistance(null)).toBe('—');
    expect(formatDistanceRange([0, 389_763], 'km')).toBe('0–389,763 km');
    expect(formatDistanceRange([12_000, 45_000], 'ld')).toBe('0.0312–0.117 LD');
  });
});

describe('probabilities', () => {
  it('states a probability with its 95% interval and as odds', () => {
    // Format agreed in the team contract: "1.2e-4 (95%: 8e-5–1.9e-4)" and "about 1 in 8,300" (1 / 1.2e-4 = 8333).
    expect(formatProbability(1.2e-4, [8e-5, 1.9e-4])).toBe('1.2e-4 (95%: 8.0e-5–1.9e-4)');
    expect(formatProbability(1.2e-4)).toBe('1.2e-4');
    expect(formatOdds(1.2e-4)).toBe('about 1 in 8,300');
    expect(formatOdds(0.0733)).toBe('about 1 in 14');
    expect(formatOdds(0)).toBe('—');
  });
  it('states a zero-hit Monte Carlo run as an upper bound', () => {
    // One-sided exact 95% bound for 0 hits in N: 1 - 0.05^(1/N) (the "rule of three", Hanley & Lippman-Hand 1983,
    // JAMA 249:1743); N = 1000 gives 2.991e-3.
    const ub = 1 - Math.pow(0.05, 1 / 1000);
    expect(formatUpperBound(ub)).toBe('below 3.0e-3 (95%)');
    const s = describeImpactProbability({ linear: null, monteCarlo: { hits: 0, samples: 1000, estimate: null, ci95: null, upperBound95: ub }, lov: null }, null);
    expect(s.text).toBe('below 3.0e-3 (95%)');
    expect(s.value).toBeNull();
    expect(s.method).toBe('Monte Carlo');
    expect(s.methodDetail).toContain('0 hits in 1,000');
  });
  it('follows the engine\'s rating source and keeps the interval with the Monte Carlo figure', () => {
    const mc = { hits: 12, samples: 10_000, estimate: 1.2e-3, ci95: [6.9e-4, 2.1e-3] as [number, number], upperBound95: 1.9e-3 };
    const byMc = describeImpactProbability({ linear: 9e-4, monteCarlo: mc, lov: null }, 'monteCarlo');
    expect(byMc.text).toBe('1.2e-3 (95%: 6.9e-4–2.1e-3)');
    expect([byMc.low, byMc.high]).toEqual([6.9e-4, 2.1e-3]);
    expect(byMc.method).toBe('Monte Carlo');
    const byLinear = describeImpactProbability({ linear: 9e-4, monteCarlo: mc, lov: null }, 'linear');
    expect(byLinear.text).toBe('9.0e-4');
    expect(byLinear.method).toBe('linear');
    expect(byLinear.methodDetail).toMatch(/no sampling interval/);
    const flagged = describeImpactProbability({ linear: 9e-4, monteCarlo: null, lov: null }, 'linear (flagged: linear method not validated)');
    expect(flagged.methodDetail).toMatch(/NOT validated/);
  });
});

describe('dates', () => {
  it('converts Julian dates to calendar dates', () => {
    // Meeus, Astronomical Algorithms (2nd ed.), example 7.c: JD 2436116.31 = 1957 October 4.81.
    const c = calendarFromJd(2436116.31);
    expect([c.year, c.month, c.day]).toEqual([1957, 10, 4]);
    expect(c.hour * 3600 + c.minute * 60 + c.second).toBe(Math.round(0.81 * 86400));
    // J2000.0 = JD 2451545.0 = 2000 January 1, 12:00 TT (IAU 1976 definition).
    expect(formatTdbJd(2451545.0)).toBe('2000-01-01 12:00:00 TDB');
    // Meeus example 7.b: 333 January 27.5 (Julian calendar) = JD 1842713.0.
    expect(calendarFromJd(1842713.0)).toMatchObject({ year: 333, month: 1, day: 27, hour: 12 });
  });
  it('prints UTC and TDB of the same instant consistently', () => {
    // The demo asteroid's encounter as the engine gives it: JD 2464222.75 TDB = 2034-09-17T05:58:50.818Z.
    // TDB - UTC = 32.184 s + 37 s (TAI - UTC since 2017, IERS Bulletin C; assumed unchanged) = 69.184 s
    // (TDB - TT is below 2 ms): 05:58:50.8 + 69.2 s = 06:00:00.
    expect(formatTdbJd(2464222.75)).toBe('2034-09-17 06:00:00 TDB');
    expect(formatUtc('2034-09-17T05:58:50.818Z')).toBe('2034-09-17 05:58:50 UTC');
    expect(formatUtc('2034-09-17T05:58:50.818Z', { seconds: false })).toBe('2034-09-17 05:58 UTC');
  });
});

describe('physical quantities', () => {
  it('prints energy and diameter ranges in one unit', () => {
    expect(formatEnergyRange({ nominal: 45.5486, low: 14.445, high: 74.456 })).toBe('46 Mt (14–74 Mt)');
    expect(formatEnergyRange({ nominal: 0.0041, low: 0.0012, high: 0.009 })).toBe('4.1 kt (1.2–9.0 kt)');
    expect(formatEnergyRange({ nominal: null, low: null, high: null })).toBe('—');
    expect(formatDiameterRange({ nominal: 140.2, low: 90.4, high: 210.7 })).toBe('140 m (90–210 m)');
    expect(formatDiameterRange({ nominal: 1820, low: 1100, high: 2600 })).toBe('1.8 km (1.1–2.6 km)');
  });
  it('prints Palermo values with a true minus sign', () => {
    expect(formatPalermo(-2.3149)).toBe('−2.31');
    expect(formatPalermo(0.8234)).toBe('0.82');
    expect(formatPalermo(-0.001)).toBe('0.00');
    expect(formatPalermo(null)).toBe('—');
  });
});

describe('encounter table exports', async () => {
  const { csvField, encounterCsv, encounterRows, resultTablesJson } = await import('../../shared/results/table');
  const { parseAssessment } = await import('../../shared/schemas/assessment');
  const result = parseAssessment({
    object: 'TEST-2',
    analysisDateUtc: '2026-12-01T00:00:00Z',
    provenance: { inputSha256: 'abc', engineVersion: 'eng 1', ephemeris: 'e', integrator: 'i', tolerance: 1e-9, seed: 7, clones: 1000 },
    approaches: [
      {
        body: 'earth', epochTdbJd: 2464222.75, utc: '2034-09-17T05:58:50.818Z', distanceKm: 26000.5, relativeSpeedKmS: 9.2, vInfinityKmS: 7.35, bPlane: null,
        impact: false, distanceSigmaKm: null,
        impactProbability: { linear: 0.0733, monteCarlo: { hits: 0, samples: 1000, estimate: null, ci95: null, upperBound95: 0.002991 }, lov: null },
        energyMt: { nominal: 45.5, low: 14.4, high: 74.5 }, palermo: 0.82, torino: 3, ratingProbabilitySource: 'linear',
        methodFlags: ['linear IP 7.33e-2 is above the Monte Carlo 95% upper bound 2.99e-3 (0 hits in 1000)'],
      },
    ],
    otherWindows: [
      {
        source: 'monteCarlo', body: 'earth', epochTdbJd: 2466000.5, utc: '2039-07-30T00:00:00Z', vInfinityKmS: 8,
        impactProbability: { linear: null, monteCarlo: { hits: 12, samples: 1000, estimate: 0.012, ci95: [0.0069, 0.0208], upperBound95: 0.019 }, lov: null },
        energyMt: { nominal: 50, low: 15, high: 80 }, palermo: -0.5, torino: 4, ratingProbabilitySource: 'monteCarlo',
      },
    ],
    palermoCumulative: 0.9, torinoMax: 4, diameterM: { nominal: 120, low: 100, high: 140 },
  });
  const source = { runId: 9, objectDesignation: 'TEST-2', solutionVersion: 3, inputSha256: 'abc', engineVersion: 'eng 1', methods: ['linear', 'mc'] };

  it('quotes CSV fields as RFC 4180 says', () => {
    // RFC 4180 section 2, rules 6 and 7: fields with commas, quotes or line breaks are quoted; quotes are doubled.
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField(null)).toBe('');
    expect(csvField(1e-7)).toBe('1e-7');
  });

  it('writes one row per approach and window with raw numbers and their source', () => {
    const rows = encounterRows(result);
    expect(rows.map((r) => [r.kind, r.ipMethod])).toEqual([['approach', 'linear'], ['window', 'Monte Carlo']]);
    expect([rows[1].ip, rows[1].ipLow95, rows[1].ipHigh95]).toEqual([0.012, 0.0069, 0.0208]);
    const lines = encounterCsv(result, source).split('\r\n');
    expect(lines.length).toBe(4); // header, 2 rows, final empty string after the last CRLF
    expect(lines[3]).toBe('');
    const header = lines[0].split(',');
    const row = (i: number) => Object.fromEntries(header.map((h, k) => [h, lines[i].match(/("([^"]|"")*"|[^,]*)(,|$)/g)![k].replace(/,$/, '')]));
    const a = row(1);
    expect([a.run_id, a.object, a.solution_version, a.row_kind, a.date_utc]).toEqual(['9', 'TEST-2', '3', 'approach', '2034-09-17T05:58:50.818Z']);
    expect(Number(a.distance_km)).toBe(26000.5);
    expect(a.impact_probability_method).toBe('linear');
    expect([a.nominal_impact, a.window_edge]).toEqual(['false', 'false']);
    expect([a.diameter_m_nominal, a.diameter_m_low, a.diameter_m_high]).toEqual(['120', '100', '140']);
    expect(a.ip_monte_carlo_samples).toBe('1000');
    expect([a.ip_monte_carlo, a.ip_monte_carlo_upper_bound95]).toEqual(['', '0.002991']);
    expect(a.method_flags.startsWith('linear IP 7.33e-2 is above')).toBe(true);
    const w = row(2);
    expect([w.row_kind, w.impact_probability, w.impact_probability_low95, w.torino]).toEqual(['window', '0.012', '0.0069', '4']);
    const json = resultTablesJson(result, source) as { source: typeof source; encounters: unknown[] };
    expect(json.source.runId).toBe(9);
    expect(json.encounters).toHaveLength(2);
  });
});

describe('unbound significance (e − 1)/σe in a table cell (METHODS.md §3; wording common practice, no source)', () => {
  it('says bound for e < 1, caps far-beyond-doubt values and shows — without a covariance', () => {
    expect(formatUnboundSignificance(null)).toBe('—');
    expect(formatUnboundSignificance(NaN)).toBe('—');
    expect(formatUnboundSignificance(12.34)).toBe('12.3 σ');
    expect(formatUnboundSignificance(0)).toBe('0.0 σ');
    expect(formatUnboundSignificance(23725)).toBe('> 1000 σ');
    expect(formatUnboundSignificance(-2.04)).toBe('bound (e below 1 by 2.0 σ)');
    expect(formatUnboundSignificance(-163090.9)).toBe('bound (e below 1 by > 1000 σ)');
  });
});
