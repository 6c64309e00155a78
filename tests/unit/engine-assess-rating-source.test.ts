// Which impact probability the ratings use (assess.ts chooseIp; Tocsin policy written in assess.ts's header).
// The policy's evidence is outside this file: an importance-sampled Monte Carlo of a tail case
// (engine-assess-tail.test.ts) shows the LOV right and the nominal-linearised method 11 times high while its
// +-3-sigma linearity check passed; a split between the two therefore goes to sampling when it has >= 10 hits
// (METHODS.md §6.5: ~30% precision), else to the LOV.
import { describe, expect, it } from 'vitest';
import { _internal } from '../../server/engine/assess/assess';

const { chooseIp, disagreements } = _internal;
const mc = (hits: number, samples: number) => ({ hits, samples, estimate: hits / samples, ci95: [0, 1] as [number, number], upperBound95: null });

describe('rating probability source', () => {
  it('valid linear, LOV within a factor of 2 (or no LOV): linear', () => {
    expect(chooseIp({ linear: 1e-5, linearValid: true, mc: null, lov: 1.5e-5 })).toEqual({ p: 1e-5, source: 'linear' });
    expect(chooseIp({ linear: 1e-5, linearValid: true, mc: null, lov: null })).toEqual({ p: 1e-5, source: 'linear' });
  });

  it('valid linear split from the LOV by more than 2: the LOV, and the split is flagged', () => {
    const ip = { linear: 5.4e-6, linearValid: true, mc: null, lov: 4.7e-7 };
    expect(chooseIp(ip)).toEqual({ p: 4.7e-7, source: 'lov' });
    expect(disagreements(ip)).toEqual([expect.stringMatching(/differ by more than a factor of 2/)]);
  });

  it('a split with a Monte Carlo of 10 or more hits goes to the Monte Carlo', () => {
    expect(chooseIp({ linear: 5e-3, linearValid: true, mc: mc(12, 10_000), lov: 1e-3 })).toEqual({ p: 12 / 10_000, source: 'monteCarlo' });
  });

  it('below 1e-12 both are noise: no split, linear stays', () => {
    expect(chooseIp({ linear: 1e-14, linearValid: true, mc: null, lov: 1e-13 })).toEqual({ p: 1e-14, source: 'linear' });
  });
});
