import { describe, expect, it } from 'vitest';
import {
  PALERMO_MIN_DELTA_T_YEARS,
  palermoBackgroundFrequencyPerYear,
  palermoCumulative,
  palermoRating,
  palermoScale,
  torinoFromLogs,
  torinoMax,
  torinoRating,
} from '../../server/engine/risk/ratings';

describe('Palermo scale (Chesley et al. 2002, Icarus 159, 423)', () => {
  it('reproduces the CHECKS.md 4 evaluations of the published definition', () => {
    // CHECKS.md §4: P = 1e-4, E = 100 Mt, dT = 50 yr -> -2.5761; P = 1e-2, E = 1e5 Mt, dT = 100 yr -> +1.5229.
    expect(palermoScale(1e-4, 100, 50)).toBeCloseTo(-2.5761, 4);
    expect(palermoScale(1e-2, 1e5, 100)).toBeCloseTo(1.5229, 4);
    // CHECKS.md §4: cumulative of (-2.5, -3.1, -1.9) -> -1.7813.
    expect(palermoCumulative([-2.5, -3.1, -1.9])).toBeCloseTo(-1.7813, 4);
  });

  it('reproduces the METHODS.md 8.1 test values', () => {
    // METHODS.md 8.1 (computed): p = 1e-4, E = 100 Mt, dT = 30 yr -> f_B = 7.54e-4 /yr, PS = -2.35.
    expect(palermoBackgroundFrequencyPerYear(100)).toBeCloseTo(7.54e-4, 6);
    expect(palermoScale(1e-4, 100, 30)).toBeCloseTo(-2.35, 2);
    // Cumulative of {-2.35, -3.1, -2.9} = -2.19.
    expect(palermoCumulative([-2.35, -3.1, -2.9])).toBeCloseTo(-2.19, 2);
    expect(palermoCumulative([])).toBeNull();
    expect(palermoCumulative([null, -1])).toBeCloseTo(-1, 14);
  });

  it('uses an explicit analysis date, Julian years, and clamps dT at the documented minimum of one day', () => {
    const analysis = 11_000; // TDB days since J2000
    const r = palermoRating({ probability: 1e-4, energyMt: 100, analysisTdbDays: analysis, impactTdbDays: analysis + 50 * 365.25 });
    expect(r.deltaTYears).toBeCloseTo(50, 12);
    expect(r.value!).toBeCloseTo(-2.5761, 4);
    expect(r.deltaTClamped).toBe(false);
    // The same impact analysed 20 years later: PS drifts up by log10(50/30).
    const later = palermoRating({ probability: 1e-4, energyMt: 100, analysisTdbDays: analysis + 20 * 365.25, impactTdbDays: analysis + 50 * 365.25 });
    expect(later.value! - r.value!).toBeCloseTo(Math.log10(50 / 30), 12);
    // Imminent: one hour away -> clamped at 1 day.
    const soon = palermoRating({ probability: 0.5, energyMt: 10, analysisTdbDays: analysis, impactTdbDays: analysis + 1 / 24 });
    expect(soon.deltaTClamped).toBe(true);
    expect(soon.deltaTYears).toBe(PALERMO_MIN_DELTA_T_YEARS);
    expect(PALERMO_MIN_DELTA_T_YEARS).toBeCloseTo(1 / 365.25, 15);
    expect(soon.value!).toBeCloseTo(Math.log10(0.5 / (0.03 * 10 ** -0.8 / 365.25)), 12);
    // An impact date before the analysis date is refused; p = 0 has no rating.
    expect(() => palermoRating({ probability: 1e-4, energyMt: 1, analysisTdbDays: 10, impactTdbDays: 9 })).toThrow();
    expect(palermoRating({ probability: 0, energyMt: 1, analysisTdbDays: 0, impactTdbDays: 100 }).value).toBeNull();
  });
});

describe('Torino scale (Binzel 2000, PSS 48, 297; METHODS.md 8.2 digitisation)', () => {
  it('METHODS.md 8.2 test points (computed with the rule set)', () => {
    const pts: Array<[number, number, number]> = [
      [1e-3, 10, 1],
      [1e-3, 1e4, 2],
      [0.05, 50, 3],
      [0.05, 1e3, 4],
      [0.5, 1e4, 5],
      [1e-3, 1e7, 6],
      [0.02, 1e6, 7],
      [0.995, 10, 8],
      [0.995, 1e3, 9],
      [1, 1e6, 10],
    ];
    for (const [p, e, cat] of pts) expect(torinoRating(p, e).category, `p=${p}, E=${e}`).toBe(cat);
  });

  it('says which rows rest on the confirmed digitisation (0, 1, 2) and which on the reconstruction (3-10)', () => {
    // METHODS.md 8.2: rows 0, 1, 2 confirmed against a mirror of the common digitisation [C]; rows 3-10 reconstructed [M].
    expect(torinoRating(1e-9, 1e3).ruleSource).toBe('published-digitisation'); // 0
    expect(torinoRating(1e-3, 10).ruleSource).toBe('published-digitisation'); // 1
    expect(torinoRating(1e-3, 1e4).ruleSource).toBe('published-digitisation'); // 2
    for (const [p, e] of [[0.05, 50], [0.05, 1e3], [0.5, 1e4], [1e-3, 1e7], [0.02, 1e6], [0.995, 10], [0.995, 1e3], [1, 1e6]]) {
      expect(torinoRating(p, e).ruleSource).toBe('reconstruction');
    }
    expect(torinoRating(0.995, 10).colour).toBe('red');
    expect(torinoRating(1e-3, 10).colour).toBe('green');
  });

  // Every boundary: a point exactly on the line (classified by the ">=" side, the higher category), and points
  // d = 1e-9 either side in log space. x = log10 E[Mt], y = log10 p. Exact on-line points are chosen so the line
  // expressions 2(x + c) + 3(y + 2) evaluate to exactly 0 in floating point.
  const d = 1e-9;
  const Y99 = Math.log10(0.99);
  const cases: Array<{ line: string; source: string; below: [number, number]; on: [number, number]; above: [number, number]; cats: [number, number, number] }> = [
    // vertical x = 0 (energy floor, 1 Mt)
    { line: 'x = 0 at y = -2.5 (0|1)', source: 'digitisation', below: [-d, -2.5], on: [0, -2.5], above: [d, -2.5], cats: [0, 1, 1] },
    { line: 'x = 0 at y = -1 (0|3)', source: 'digitisation + reconstruction', below: [-d, -1], on: [0, -1], above: [d, -1], cats: [0, 3, 3] },
    { line: 'x = 0 at p >= 0.99 (0|8)', source: 'digitisation + reconstruction', below: [-d, 0], on: [0, 0], above: [d, 0], cats: [0, 8, 8] },
    // L1 = 0 (0|1)
    { line: 'L1 = 0 (0|1)', source: 'digitisation', below: [2, -4 - d], on: [2, -4], above: [2, -4 + d], cats: [0, 1, 1] },
    // L2 = 0 (1|2)
    { line: 'L2 = 0 at (5, -4) (1|2)', source: 'digitisation', below: [5, -4 - d], on: [5, -4], above: [5, -4 + d], cats: [1, 2, 2] },
    { line: 'L2 = 0 at (3.5, -3) (1|2)', source: 'digitisation', below: [3.5 - d, -3], on: [3.5, -3], above: [3.5 + d, -3], cats: [1, 2, 2] },
    // L3 = 0 below y = -2 (2|6)
    { line: 'L3 = 0 at (8, -4) (2|6)', source: 'digitisation + reconstruction', below: [8, -4 - d], on: [8, -4], above: [8, -4 + d], cats: [2, 6, 6] },
    // L3 = 0 above y = -2, 2 <= x < 5 (4|5)
    { line: 'L3 = 0 at (3.5, -1) (4|5)', source: 'reconstruction', below: [3.5, -1 - d], on: [3.5, -1], above: [3.5, -1 + d], cats: [4, 5, 5] },
    // horizontal y = -2
    { line: 'y = -2 at x = 1 (1|3)', source: 'reconstruction', below: [1, -2 - d], on: [1, -2], above: [1, -2 + d], cats: [1, 3, 3] },
    { line: 'y = -2 at x = 3 (2|4)', source: 'reconstruction', below: [3, -2 - d], on: [3, -2], above: [3, -2 + d], cats: [2, 4, 4] },
    { line: 'y = -2 at x = 6 (6|7)', source: 'reconstruction', below: [6, -2 - d], on: [6, -2], above: [6, -2 + d], cats: [6, 7, 7] },
    // horizontal p = 0.99
    { line: 'p = 0.99 at x = 1 (3|8)', source: 'reconstruction', below: [1, Y99 - d], on: [1, Y99], above: [1, Y99 + d], cats: [3, 8, 8] },
    { line: 'p = 0.99 at x = 3 (5|9)', source: 'reconstruction', below: [3, Y99 - d], on: [3, Y99], above: [3, Y99 + d], cats: [5, 9, 9] },
    { line: 'p = 0.99 at x = 6 (7|10)', source: 'reconstruction', below: [6, Y99 - d], on: [6, Y99], above: [6, Y99 + d], cats: [7, 10, 10] },
    // vertical x = 2
    { line: 'x = 2 at y = -1 (3|4)', source: 'reconstruction', below: [2 - d, -1], on: [2, -1], above: [2 + d, -1], cats: [3, 4, 4] },
    { line: 'x = 2 at p >= 0.99 (8|9)', source: 'reconstruction', below: [2 - d, 0], on: [2, 0], above: [2 + d, 0], cats: [8, 9, 9] },
    // vertical x = 5
    { line: 'x = 5 at y = -1 (5|7)', source: 'reconstruction', below: [5 - d, -1], on: [5, -1], above: [5 + d, -1], cats: [5, 7, 7] },
    { line: 'x = 5 at y = -0.1 (5|7)', source: 'reconstruction', below: [5 - d, -0.1], on: [5, -0.1], above: [5 + d, -0.1], cats: [5, 7, 7] },
    { line: 'x = 5 at p >= 0.99 (9|10)', source: 'reconstruction', below: [5 - d, 0], on: [5, 0], above: [5 + d, 0], cats: [9, 10, 10] },
  ];
  for (const c of cases) {
    it(`boundary ${c.line} [${c.source}]`, () => {
      expect(torinoFromLogs(...c.below).category).toBe(c.cats[0]);
      expect(torinoFromLogs(...c.on).category).toBe(c.cats[1]);
      expect(torinoFromLogs(...c.above).category).toBe(c.cats[2]);
    });
  }

  it('boundaries also hold through torinoRating(p, E) where log10 is exact (E = 1, 100, 1e5 Mt; p = 0.01, 0.99)', () => {
    expect(torinoRating(0.5, 1).category).toBe(3); // x = 0 exactly
    expect(torinoRating(0.5, 0.999999).category).toBe(0);
    expect(torinoRating(0.01, 10).category).toBe(3); // y = -2 exactly
    expect(torinoRating(0.0099999, 10).category).toBe(1);
    expect(torinoRating(0.05, 100).category).toBe(4); // x = 2 exactly
    expect(torinoRating(0.05, 99.9999).category).toBe(3);
    expect(torinoRating(0.05, 1e5).category).toBe(7); // x = 5 exactly
    expect(torinoRating(0.99, 10).category).toBe(8);
    expect(torinoRating(0.98999, 10).category).toBe(3);
    expect(torinoRating(0, 1e6).category).toBe(0);
  });

  it('is non-decreasing in probability and in energy over the whole chart (a property of the zone layout)', () => {
    // Computed property of the METHODS.md 8.2 rule set: a larger p or E never lowers the category.
    const violations: string[] = [];
    let checked = 0;
    for (let x = -1; x <= 8; x += 0.05) {
      let prev = -1;
      for (let y = -9; y <= 0; y += 0.01) {
        const c = torinoFromLogs(x, y).category;
        if (c < prev) violations.push(`x=${x}, y=${y}: ${prev} -> ${c}`);
        prev = c;
        checked++;
      }
    }
    for (let y = -9; y <= 0; y += 0.05) {
      let prev = -1;
      for (let x = -1; x <= 8; x += 0.01) {
        const c = torinoFromLogs(x, y).category;
        if (c < prev) violations.push(`x=${x}, y=${y}: ${prev} -> ${c}`);
        prev = c;
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(300_000);
    expect(violations).toEqual([]);
  });

  it('an object is summarised by its maximum; none -> null', () => {
    expect(torinoMax([torinoRating(1e-3, 10), torinoRating(0.05, 1e3), torinoRating(1e-9, 1)])).toBe(4);
    expect(torinoMax([])).toBeNull();
    expect(() => torinoRating(1.5, 10)).toThrow();
  });
});
