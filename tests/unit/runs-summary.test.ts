// The object-list summary columns taken from a finished run's assess JSON (server/services/runs/summary.ts).
// Source: the engine's output contract (server/engine/assess/assess.ts: approaches[].utc, impactProbability
// {linear, monteCarlo.estimate, lov}, ratingProbabilitySource, otherWindows, palermoCumulative, torinoMax) and the
// column meanings of issue 5 item 1 (next close approach, highest impact probability, cumulative Palermo, maximum
// Torino). Hand-made inputs; expected values follow from those definitions.
import { describe, expect, it } from 'vitest';
import { objectRiskSummary, ratingProbability } from '../../server/services/runs/summary';

const ip = (linear: number | null, mc: number | null, lov: number | null) => ({ linear, monteCarlo: { estimate: mc }, lov });

describe('ratingProbability', () => {
  it('takes the probability of the method the engine rated with', () => {
    expect(ratingProbability({ impactProbability: ip(1e-3, 2e-3, 3e-3), ratingProbabilitySource: 'linear' })).toBe(1e-3);
    expect(ratingProbability({ impactProbability: ip(1e-3, 2e-3, 3e-3), ratingProbabilitySource: 'linear (flagged: linear method not validated)' })).toBe(1e-3);
    expect(ratingProbability({ impactProbability: ip(1e-3, 2e-3, 3e-3), ratingProbabilitySource: 'monteCarlo' })).toBe(2e-3);
    expect(ratingProbability({ impactProbability: ip(1e-3, 2e-3, 3e-3), ratingProbabilitySource: 'lov' })).toBe(3e-3);
    expect(ratingProbability({ impactProbability: ip(1e-3, null, null), ratingProbabilitySource: null })).toBeNull();
    expect(ratingProbability({ impactProbability: null, ratingProbabilitySource: 'linear' })).toBeNull();
  });
});

describe('objectRiskSummary', () => {
  const result = {
    analysisDateUtc: '2026-12-01T00:00:00.000Z',
    approaches: [
      // before the analysis date: not "next"
      { utc: '2026-11-25T00:00:00.000Z', impactProbability: ip(0.5, null, null), ratingProbabilitySource: 'linear' },
      { utc: '2031-03-02T10:00:00.000Z', impactProbability: ip(0, null, null), ratingProbabilitySource: 'linear' },
      { utc: '2029-07-01T12:30:00.000Z', impactProbability: ip(4e-6, null, 9e-6), ratingProbabilitySource: 'linear' },
    ],
    // (2e-5 > 9e-6 > 4e-6: were the LOV value taken for the 2029 approach, the answer would still be 2e-5, so a
    // separate case below checks the source rule with a single approach)
    otherWindows: [{ utc: '2040-01-01T00:00:00.000Z', impactProbability: { linear: null, monteCarlo: { estimate: 2e-5 }, lov: null }, ratingProbabilitySource: 'monteCarlo' }],
    palermoCumulative: -3.25,
    torinoMax: 1,
  };

  it('next approach is the earliest at or after the analysis date; highest IP over approaches and other windows', () => {
    const s = objectRiskSummary(result);
    expect(s.nextCloseApproachAt?.toISOString()).toBe('2029-07-01T12:30:00.000Z');
    // 0.5 belongs to an approach already past at the analysis date: not counted. The rated IPs left are 0,
    // 4e-6 (linear, not the larger LOV 9e-6: the engine rated with linear) and 2e-5 (Monte Carlo window)
    expect(s.maxImpactProbability).toBe(2e-5);
    expect(s.cumulativePalermo).toBe(-3.25);
    expect(s.maxTorino).toBe(1);
  });

  it('uses the rated method, not the largest of the three, for one approach', () => {
    const s = objectRiskSummary({ analysisDateUtc: '2026-12-01T00:00:00Z', approaches: [{ utc: '2029-07-01T12:30:00.000Z', impactProbability: ip(4e-6, null, 9e-6), ratingProbabilitySource: 'linear' }] });
    expect(s.maxImpactProbability).toBe(4e-6);
  });

  it('is all null for a run without approaches or ratings', () => {
    expect(objectRiskSummary({ analysisDateUtc: '2026-12-01T00:00:00Z', approaches: [], palermoCumulative: null, torinoMax: null })).toEqual({
      nextCloseApproachAt: null,
      maxImpactProbability: null,
      cumulativePalermo: null,
      maxTorino: null,
    });
  });
});
