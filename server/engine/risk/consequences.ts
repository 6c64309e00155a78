/**
 * Impact consequences (METHODS.md 7; issue 4 item 6): diameter from H and albedo, mass from a density bracket,
 * impact speed and kinetic energy, each as {nominal, low, high} with the assumptions behind it.
 *
 * Ranges are envelopes of the brackets (all-low / all-high combinations), not statistical confidence intervals.
 */
import { MEGATON_TNT_J } from '../constants';
import { impactSpeedKmS } from './capture';

export type Range = { nominal: number; low: number; high: number };

/** H-D constant, km: D = K / sqrt(pV) 10^(-H/5), K = 1329 km (Fowler & Chillemi 1992; Pravec & Harris 2007, Icarus 190, 250, App. A). */
export const H_TO_D_CONSTANT_KM = 1329;

/**
 * Default albedo when unknown: nominal 0.14 (debiased mean NEO albedo, Stuart & Binzel 2004, Icarus 170, 295),
 * bracket 0.05-0.25 (a common bracket for unknown objects, METHODS.md 7; a factor 2.24 in D).
 */
export const DEFAULT_ALBEDO = {
  nominal: 0.14,
  low: 0.05,
  high: 0.25,
  source: 'nominal: debiased NEO mean 0.14 (Stuart & Binzel 2004); bracket 0.05-0.25: common practice for unknown albedo (METHODS.md 7)',
} as const;

/**
 * Default bulk density when unknown, kg/m^3: nominal 2500 (the middle of the 2-3 g/cm^3 single-value assumption
 * typical for unknown objects), bracket 1200-2700 (C-complex low end ~1.2, e.g. Bennu and Ryugu 1.19; S-complex upper
 * end ~2.7, e.g. Eros 2.67; compilation in Carry 2012, PSS 73, 98 [M]). Metal-rich bodies (>= 4 g/cm^3) are outside
 * the default bracket: pass a density when the taxonomy suggests one.
 */
export const DEFAULT_DENSITY_KG_M3 = {
  nominal: 2500,
  low: 1200,
  high: 2700,
  source:
    'nominal 2500 kg/m^3: middle of the typical 2-3 g/cm^3 single-value assumption; bracket 1200-2700 kg/m^3: C-complex to S-complex (Carry 2012) [M]; metal-rich excluded',
} as const;

/** Default 1-sigma uncertainty of a catalogue H when none is given (METHODS.md 7: carry 0.3-0.5 mag; Pravec et al. 2012). */
export const DEFAULT_H_SIGMA_MAG = 0.3;

/** Diameter in km from absolute magnitude H and geometric albedo pV. */
export function diameterKmFromH(hMag: number, albedo: number): number {
  if (!(albedo > 0 && albedo <= 1)) throw new RangeError(`albedo must be in (0, 1], got ${albedo}`);
  return (H_TO_D_CONSTANT_KM / Math.sqrt(albedo)) * 10 ** (-hMag / 5);
}

/** Mass in kg of a uniform sphere: rho pi D^3 / 6. */
export function massKg(diameterM: number, densityKgM3: number): number {
  return (densityKgM3 * Math.PI * diameterM ** 3) / 6;
}

/** Kinetic energy in Mt TNT (1 Mt = 4.184e15 J, NIST SP 811): m v^2 / 2. */
export function kineticEnergyMt(massKgValue: number, speedKmS: number): number {
  const v = speedKmS * 1000;
  return (0.5 * massKgValue * v * v) / MEGATON_TNT_J;
}

export type ConsequenceInput = {
  hMag: number;
  /** 1-sigma uncertainty of H, mag (default 0.3). The range uses H +/- hSigmaMultiplier * hSigma. */
  hSigmaMag?: number;
  hSigmaMultiplier?: number;
  /** Known albedo (single value, or a bracket). Default: DEFAULT_ALBEDO. */
  albedo?: number | { nominal: number; low: number; high: number };
  /** Known density (single value, or a bracket), kg/m^3. Default: DEFAULT_DENSITY_KG_M3. */
  densityKgM3?: number | { nominal: number; low: number; high: number };
  /** Geocentric hyperbolic excess speed of the impacting solution, km/s (null when no encounter). */
  vInfinityKmS?: number | null;
};

export type Assumption = { quantity: string; value: string; source: string };

export type Consequences = {
  diameterM: Range;
  massKg: Range;
  impactSpeedKmS: number | null;
  energyMt: Range | null;
  assumptions: Assumption[];
};

function asBracket(
  v: number | { nominal: number; low: number; high: number } | undefined,
  def: { nominal: number; low: number; high: number },
): { nominal: number; low: number; high: number; given: boolean } {
  if (v === undefined) return { ...def, given: false };
  if (typeof v === 'number') return { nominal: v, low: v, high: v, given: true };
  if (!(v.low <= v.nominal && v.nominal <= v.high)) throw new RangeError('bracket must satisfy low <= nominal <= high');
  return { ...v, given: true };
}

/** Diameter, mass, impact speed and energy with their ranges and the assumptions used. */
export function assessConsequences(input: ConsequenceInput): Consequences {
  const hSigma = input.hSigmaMag ?? DEFAULT_H_SIGMA_MAG;
  const k = input.hSigmaMultiplier ?? 1;
  if (!(hSigma >= 0 && k >= 0)) throw new RangeError('H uncertainty must be >= 0');
  const albedo = asBracket(input.albedo, DEFAULT_ALBEDO);
  const density = asBracket(input.densityKgM3, DEFAULT_DENSITY_KG_M3);

  // Largest D: faintest albedo and brightest H (H - k sigma); smallest D: the opposite.
  const diameterM: Range = {
    nominal: 1000 * diameterKmFromH(input.hMag, albedo.nominal),
    low: 1000 * diameterKmFromH(input.hMag + k * hSigma, albedo.high),
    high: 1000 * diameterKmFromH(input.hMag - k * hSigma, albedo.low),
  };
  const mass: Range = {
    nominal: massKg(diameterM.nominal, density.nominal),
    low: massKg(diameterM.low, density.low),
    high: massKg(diameterM.high, density.high),
  };
  const assumptions: Assumption[] = [
    { quantity: 'diameter formula', value: 'D = 1329 km / sqrt(pV) * 10^(-H/5)', source: 'Fowler & Chillemi 1992; Pravec & Harris 2007, Icarus 190, 250' },
    {
      quantity: 'absolute magnitude H',
      value: `${input.hMag} +/- ${k * hSigma} mag (range uses ${k} x sigma_H = ${hSigma})`,
      source: input.hSigmaMag === undefined ? 'sigma_H default 0.3 mag: catalogue H bias/scatter (Pravec et al. 2012) [METHODS.md 7]' : 'input',
    },
    {
      quantity: 'geometric albedo pV',
      value: `${albedo.nominal} (range ${albedo.low}-${albedo.high})`,
      source: albedo.given ? 'input' : DEFAULT_ALBEDO.source,
    },
    {
      quantity: 'bulk density',
      value: `${density.nominal} kg/m^3 (range ${density.low}-${density.high})`,
      source: density.given ? 'input' : DEFAULT_DENSITY_KG_M3.source,
    },
    { quantity: 'mass', value: 'uniform sphere, m = rho pi D^3 / 6', source: 'METHODS.md 7' },
    { quantity: 'ranges', value: 'envelope of the brackets (all-low / all-high), not a confidence interval', source: 'Tocsin convention' },
  ];

  let speed: number | null = null;
  let energyMt: Range | null = null;
  if (input.vInfinityKmS !== undefined && input.vInfinityKmS !== null) {
    speed = impactSpeedKmS(input.vInfinityKmS);
    energyMt = {
      nominal: kineticEnergyMt(mass.nominal, speed),
      low: kineticEnergyMt(mass.low, speed),
      high: kineticEnergyMt(mass.high, speed),
    };
    assumptions.push(
      {
        quantity: 'impact speed',
        value: `sqrt(v_inf^2 + v_esc^2) = ${speed.toFixed(3)} km/s with v_inf = ${input.vInfinityKmS} km/s`,
        source: 'energy conservation, atmosphere neglected; v_esc from DE440 GM_earth and R = 6378.137 km (WGS84)',
      },
      { quantity: 'energy', value: 'E = m v_imp^2 / 2, 1 Mt TNT = 4.184e15 J', source: 'NIST SP 811 (2008), App. B' },
    );
  }
  return { diameterM, massKg: mass, impactSpeedKmS: speed, energyMt, assumptions };
}
