import { describe, expect, it } from 'vitest';
import { MEGATON_TNT_J } from '../../server/engine/constants';
import {
  DEFAULT_ALBEDO,
  assessConsequences,
  diameterKmFromH,
  kineticEnergyMt,
  massKg,
} from '../../server/engine/risk/consequences';

describe('diameter from H and albedo (Fowler & Chillemi 1992; Pravec & Harris 2007, Icarus 190, 250)', () => {
  it('CHECKS.md 4: H = 22, pV = 0.14 -> 0.1414 km; H = 17.75 -> 1.0011 km', () => {
    expect(diameterKmFromH(22, 0.14)).toBeCloseTo(0.1414, 4);
    expect(diameterKmFromH(17.75, 0.14)).toBeCloseTo(1.0011, 4);
  });
  it('METHODS.md 7: H = 22 gives 237/141/106 m for pV = 0.05/0.14/0.25 (computed)', () => {
    expect(diameterKmFromH(22, 0.05) * 1000).toBeCloseTo(237, 0);
    expect(diameterKmFromH(22, 0.14) * 1000).toBeCloseTo(141, 0);
    expect(diameterKmFromH(22, 0.25) * 1000).toBeCloseTo(106, 0);
    // Stuart & Binzel 2004: H = 17.8 corresponds to D ~ 1 km at the mean albedo 0.14.
    expect(diameterKmFromH(17.8, 0.14)).toBeCloseTo(0.978, 3);
  });
});

describe('energy (1 Mt TNT = 4.184e15 J, NIST SP 811)', () => {
  it('CHECKS.md 4: D = 140 m, 2600 kg/m^3, 20 km/s -> 178.56 Mt', () => {
    expect(MEGATON_TNT_J).toBe(4.184e15);
    expect(kineticEnergyMt(massKg(140, 2600), 20)).toBeCloseTo(178.56, 2);
  });
});

describe('assessConsequences', () => {
  it('default albedo bracket spans a factor sqrt(5) = 2.24 in D and ~11 in mass (METHODS.md 7)', () => {
    const c = assessConsequences({ hMag: 22, hSigmaMag: 0, densityKgM3: 2000 });
    expect(c.diameterM.high / c.diameterM.low).toBeCloseTo(Math.sqrt(5), 12);
    expect(c.massKg.high / c.massKg.low).toBeCloseTo(5 ** 1.5, 10);
    expect(c.diameterM.nominal).toBeCloseTo(141.4, 1);
    expect(c.energyMt).toBeNull();
    expect(c.impactSpeedKmS).toBeNull();
  });

  it('carries the H uncertainty and the density bracket into the ranges, and energy with v_imp', () => {
    const c = assessConsequences({ hMag: 20, hSigmaMag: 0.4, vInfinityKmS: 10 });
    expect(c.diameterM.low).toBeCloseTo(1000 * diameterKmFromH(20.4, 0.25), 9);
    expect(c.diameterM.high).toBeCloseTo(1000 * diameterKmFromH(19.6, 0.05), 9);
    expect(c.massKg.low).toBeCloseTo(massKg(c.diameterM.low, 1200), -3);
    expect(c.massKg.high).toBeCloseTo(massKg(c.diameterM.high, 2700), -3);
    expect(c.impactSpeedKmS!).toBeCloseTo(Math.hypot(10, 11.18), 2);
    expect(c.energyMt!.nominal).toBeCloseTo(kineticEnergyMt(c.massKg.nominal, c.impactSpeedKmS!), 9);
    expect(c.energyMt!.low).toBeLessThan(c.energyMt!.nominal);
    expect(c.energyMt!.high).toBeGreaterThan(c.energyMt!.nominal);
    // High/low energy ratio = (D ratio)^3 x (density ratio): albedo x H x density brackets.
    const dRatio = c.diameterM.high / c.diameterM.low;
    expect(c.energyMt!.high / c.energyMt!.low).toBeCloseTo(dRatio ** 3 * (2700 / 1200), 8);
  });

  it('documents every assumption and its source; given values are marked as input', () => {
    const d = assessConsequences({ hMag: 21 });
    const albedo = d.assumptions.find((a) => a.quantity === 'geometric albedo pV')!;
    expect(albedo.source).toBe(DEFAULT_ALBEDO.source);
    expect(albedo.source).toContain('Stuart & Binzel 2004');
    expect(d.assumptions.find((a) => a.quantity === 'bulk density')!.source).toContain('Carry 2012');
    const g = assessConsequences({ hMag: 21, albedo: 0.3, densityKgM3: 3000, hSigmaMag: 0.2, vInfinityKmS: 12 });
    expect(g.assumptions.find((a) => a.quantity === 'geometric albedo pV')!.source).toBe('input');
    expect(g.assumptions.find((a) => a.quantity === 'bulk density')!.source).toBe('input');
    expect(g.assumptions.some((a) => a.quantity === 'impact speed')).toBe(true);
    expect(g.diameterM.nominal).toBeCloseTo(1000 * diameterKmFromH(21, 0.3), 9);
    expect(() => assessConsequences({ hMag: 21, albedo: { nominal: 0.1, low: 0.2, high: 0.3 } })).toThrow();
  });
});
