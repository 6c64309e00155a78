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
