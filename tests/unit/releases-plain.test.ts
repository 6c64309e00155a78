// Plain-language statements of release figures and the release workflow table.
// Sources: arithmetic on the stated inputs (1/p, distance / 384,399 km); the mean Earth–Moon distance 384,399 km
// (shared/format.ts, value recalled from memory); the Palermo scale P = log10(R), R = impact probability over the
// background probability (Chesley et al. 2002, Icarus 159, 423; recalled from memory); Torino scale 0 = no hazard,
// 8–10 = certain collisions (Binzel 2000, Planet. Space Sci. 48, 297; recalled from memory); rules for public wording
// (no more certainty than the figure carries): common practice, no source.
import { describe, expect, it } from 'vitest';
import type { FigureValue } from '../../shared/bulletins/document';
import {
  missPercent,
  MOON_DISTANCE_KM,
  plainDistanceKm,
  plainImpactProbability,
  plainLanguageFor,
  plainPalermo,
  plainStatement,
  plainTorino,
  PUBLIC_CAUTION,
  roundForPublic,
  uncertaintySentence,
} from '../../shared/releases/plainLanguage';
import { availableReleaseActions, findReleaseTransition, releaseGuardFailure, RELEASE_STATES, RELEASE_TRANSITIONS } from '../../shared/releases/workflow';
import { ROLES } from '../../shared/roles';

const prov = { runId: 1, solutionId: 1, solutionVersion: 1, inputSha256: 'x', engineVersion: null };
function fig(quantity: FigureValue['quantity'], value: number | string | null, extra: Partial<FigureValue> = {}): FigureValue {
  return { quantity, runId: 1, text: String(value), value, low: null, high: null, unit: null, method: null, approach: null, provenance: prov, ...extra };
}

describe('numbers for the public', () => {
  it('rounds to two significant digits with grouped thousands', () => {
    expect(roundForPublic(12_048.19)).toBe('12,000');
    expect(roundForPublic(2.64)).toBe('2.6');
    expect(roundForPublic(2.64, 1)).toBe('3');
    expect(roundForPublic(333.33)).toBe('330');
    expect(roundForPublic(0.0123)).toBe('0.012');
  });

  it('states a chance of impact as "about 1 in N" and a chance of missing that never reaches 100 %', () => {
    // 1 / 8.3e-5 = 12,048 -> "1 in 12,000"; 1 - 8.3e-5 = 0.999917 -> 99.991 % (truncated, not rounded up).
    expect(plainImpactProbability({ value: 8.3e-5, low: null, high: null })).toBe('about 1 in 12,000, that is a 99.991% chance that it misses');
    expect(missPercent(8.3e-5)).toBe('99.991%');
    expect(missPercent(0.5)).toBe('50%');
    expect(missPercent(0.01)).toBe('99%');
    expect(missPercent(1.2e-4)).toBe('99.98%');
    expect(missPercent(1e-9)).not.toBe('100%');
    // With a Monte Carlo interval: both ends stated (1/2e-4 = 5,000; 1/5e-5 = 20,000).
    expect(plainImpactProbability({ value: 1e-4, low: 5e-5, high: 2e-4 })).toBe('about 1 in 10,000 (somewhere between 1 in 5,000 and 1 in 20,000), that is a 99.99% chance that it misses');
    // No hits: only an upper bound (1/3e-3 = 333 -> 330).
    expect(plainImpactProbability({ value: null, low: null, high: 3e-3 })).toMatch(/^less than 1 in 330 \(an upper bound/);
  });

  it('compares the closest distance with the Moon\'s distance', () => {
    expect(MOON_DISTANCE_KM).toBe(384_399);
    expect(plainDistanceKm(3 * 384_399)).toBe("about 3 times the Moon's distance");
    expect(plainDistanceKm(2.6 * 384_399)).toBe("about 3 times the Moon's distance");
    expect(plainDistanceKm(14.6 * 384_399)).toBe("about 15 times the Moon's distance");
    expect(plainDistanceKm(384_399)).toBe("about the Moon's distance");
    // 38,440 km = 10 % of the Moon's distance = 6.0 Earth radii (6378.137 km).
    expect(plainDistanceKm(38_440)).toBe("closer than the Moon: about 10% of the Moon's distance, or 6.0 Earth radii from the centre of the Earth");
    expect(plainDistanceKm(5000)).toMatch(/less than the radius of the Earth/);
  });

  it('explains the Palermo and Torino scales in words', () => {
    // P = -2 -> R = 10^-2: a hundred times below the background.
    expect(plainPalermo(-2)).toMatch(/^below the background hazard: about 100 times less likely/);
    expect(plainPalermo(0.3)).toMatch(/^at or above the background hazard: about 2\.0 times/);
    expect(plainTorino(0)).toBe('category 0: no unusual hazard');
    expect(plainTorino(9)).toMatch(/collision is certain/);
  });

  it('makes one statement per figure and one honest uncertainty sentence', () => {
    const figures = [
      { index: 0, value: fig('impactProbability', 1e-4, { low: 5e-5, high: 2e-4, method: 'Monte Carlo' }) },
      { index: 1, value: fig('missDistance', 3 * 384_399, { low: 384_399, high: 6 * 384_399, unit: 'km' }) },
      { index: 2, value: fig('encounterDate', '2034-09-14T03:12:00.000Z', { low: -600, high: 600 }) },
      { index: 3, value: fig('diameter', 140, { low: 90, high: 210 }) },
    ];
    const p = plainLanguageFor(figures);
    expect(p.caution).toBe(PUBLIC_CAUTION);
    expect(p.statements.map((s) => [s.figureIndex, s.label, s.text])).toEqual([
      [0, 'Chance of impact', 'about 1 in 10,000 (somewhere between 1 in 5,000 and 1 in 20,000), that is a 99.99% chance that it misses'],
      [1, 'Closest distance', "about 3 times the Moon's distance"],
      [2, 'Date of the close approach', 'on 14 September 2034'],
      [3, 'Size', 'about 140 metres across (between 90 and 210 metres)'],
    ]);
    // One sentence: says where the probability comes from, its range, the distance range, and that it will change.
    expect(p.uncertainty).toBe(
      "The chance of impact comes from simulating many possible orbits and, with the observations so far, may lie anywhere between 1 in 5,000 and 1 in 20,000, and the closest distance could be anywhere from about the Moon's distance to 6 times the Moon's distance; all of them will change as new observations refine the orbit.",
    );
    expect(p.uncertainty.match(/\./g)).toHaveLength(1);
    // A linear estimate is said to have no firm error range.
    expect(uncertaintySentence([{ value: fig('impactProbability', 2e-5, { method: 'linear' }) }])).toMatch(/estimate without a firm error range/);
    // A range that includes the Earth says so (0.6 LD -> "60% of the Moon's distance").
    expect(uncertaintySentence([{ value: fig('missDistance', 26_000, { low: 0, high: 0.6 * 384_399 }) }])).toBe(
      "The range of possible closest distances still includes the Earth itself (up to about 60% of the Moon's distance); all of them will change as new observations refine the orbit.",
    );
    // A quantity without a public statement gives none.
    expect(plainStatement(0, fig('impactProbability', null))).toEqual({ figureIndex: 0, quantity: 'impactProbability', label: 'Chance of impact', text: 'not known' });
  });
});

describe('release workflow table', () => {
  it('lets only the scheduler publish, and only from scheduled', () => {
    const publish = RELEASE_TRANSITIONS.filter((t) => t.action === 'publish');
    expect(publish).toEqual([expect.objectContaining({ from: 'scheduled', to: 'published', roles: ['system'] })]);
    for (const s of RELEASE_STATES) for (const r of ROLES) expect(availableReleaseActions(s, r, 1, 2)).not.toContain('publish');
  });

  it('keeps the four-eyes rule on approval and refuses past publication times', () => {
    expect(findReleaseTransition('in_review', 'approve')?.roles).toEqual(['reviewer']);
    expect(availableReleaseActions('in_review', 'reviewer', 7, 7)).not.toContain('approve');
    expect(availableReleaseActions('in_review', 'reviewer', 7, 8)).toContain('approve');
    expect(releaseGuardFailure('notAuthor', { actorId: 3, authorId: 3 })).toMatch(/four-eyes/);
    const now = Date.UTC(2026, 11, 2, 12, 0, 0);
    expect(releaseGuardFailure('publishAt', { actorId: 1, authorId: 1, publishAt: '2026-12-02T13:00:00+01:00', nowMs: now })).toBeNull();
    expect(releaseGuardFailure('publishAt', { actorId: 1, authorId: 1, publishAt: '2026-12-02T12:00:00+01:00', nowMs: now })).toMatch(/past/);
    expect(releaseGuardFailure('publishAt', { actorId: 1, authorId: 1, publishAt: null, nowMs: now })).toMatch(/Give/);
    // Nothing leaves 'published' or 'cancelled'.
    expect(RELEASE_TRANSITIONS.filter((t) => t.from === 'published' || t.from === 'cancelled')).toEqual([]);
  });
});
