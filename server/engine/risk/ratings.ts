/**
 * Risk scales (METHODS.md 8; issue 4 item 7).
 *
 * Palermo Technical Impact Hazard Scale (Chesley, Chodas, Milani, Valsecchi & Yeomans 2002, Icarus 159, 423):
 *   PS = log10( p / (f_B dT) ),  f_B = 0.03 E^(-4/5) per year (E in Mt TNT),
 *   dT = years from the analysis date to the potential impact (Julian years of 365.25 days of TDB).
 *   Cumulative: PS_cum = log10 sum_i 10^PS_i.
 * Minimum time span: dT is clamped at PALERMO_MIN_DELTA_T_YEARS = 1 day (1/365.25 yr). This is a Tocsin policy
 * (the paper gives none; METHODS.md 8.1 asks for a documented clamp): it keeps the literal definition for every
 * impact at least a day after the analysis and only prevents division by ~0 for imminent ones. The output says when
 * the clamp was applied.
 *
 * Torino Impact Hazard Scale (Binzel 2000, PSS 48, 297; wording revised 2005): see torinoCategory below.
 */

/** Julian year in days. */
export const JULIAN_YEAR_DAYS = 365.25;
/** Palermo: minimum dT in years (1 day), Tocsin policy. */
export const PALERMO_MIN_DELTA_T_YEARS = 1 / JULIAN_YEAR_DAYS;

/** Palermo background impact frequency f_B = 0.03 E^(-0.8) per year (Chesley et al. 2002). */
export function palermoBackgroundFrequencyPerYear(energyMt: number): number {
  if (!(energyMt > 0)) throw new RangeError(`energy must be > 0 Mt, got ${energyMt}`);
  return 0.03 * energyMt ** -0.8;
}

export type PalermoRating = {
  /** PS, or null when the probability is 0 (no rating applies). */
  value: number | null;
  probability: number;
  energyMt: number;
  backgroundFrequencyPerYear: number;
  /** dT actually used, years. */
  deltaTYears: number;
  deltaTClamped: boolean;
  analysisTdbDays: number;
  impactTdbDays: number;
};

/** PS for one potential impact. Times are TDB days since J2000 (the engine's working time variable). */
export function palermoRating(opts: {
  probability: number;
  energyMt: number;
  impactTdbDays: number;
  analysisTdbDays: number;
  minDeltaTYears?: number;
}): PalermoRating {
  const { probability, energyMt, impactTdbDays, analysisTdbDays } = opts;
  if (!(probability >= 0 && probability <= 1)) throw new RangeError(`probability must be in [0, 1], got ${probability}`);
  if (!Number.isFinite(impactTdbDays) || !Number.isFinite(analysisTdbDays)) throw new RangeError('dates must be finite');
  if (impactTdbDays < analysisTdbDays) {
    throw new RangeError('the potential impact precedes the analysis date: not a potential impact for this analysis');
  }
  const minDt = opts.minDeltaTYears ?? PALERMO_MIN_DELTA_T_YEARS;
  const rawDt = (impactTdbDays - analysisTdbDays) / JULIAN_YEAR_DAYS;
  const deltaTYears = Math.max(rawDt, minDt);
  const fB = palermoBackgroundFrequencyPerYear(energyMt);
  return {
    value: probability > 0 ? Math.log10(probability / (fB * deltaTYears)) : null,
    probability,
    energyMt,
    backgroundFrequencyPerYear: fB,
    deltaTYears,
    deltaTClamped: rawDt < minDt,
    analysisTdbDays,
    impactTdbDays,
  };
}

/** PS from the bare definition (p, E in Mt, dT in years), no clamp: for tests and callers with their own dT. */
export function palermoScale(probability: number, energyMt: number, deltaTYears: number): number {
  if (!(deltaTYears > 0)) throw new RangeError(`dT must be > 0 years, got ${deltaTYears}`);
  return Math.log10(probability / (palermoBackgroundFrequencyPerYear(energyMt) * deltaTYears));
}

/** Cumulative PS = log10 sum 10^PS_i (nulls ignored); null when there is nothing to sum. */
export function palermoCumulative(values: readonly (number | null)[]): number | null {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x));
  if (v.length === 0) return null;
  const m = Math.max(...v);
  let s = 0;
  for (const x of v) s += 10 ** (x - m);
  return m + Math.log10(s);
}

// ---------------------------------------------------------------------------------------------------------------
// Torino scale
// ---------------------------------------------------------------------------------------------------------------

export type TorinoColour = 'white' | 'green' | 'yellow' | 'orange' | 'red';
/** 'published-digitisation': rows 0, 1, 2 of the common straight-line digitisation of the published chart, confirmed
 *  against a mirror of that table [METHODS.md 8.2, C]. 'reconstruction': rows 3-10, reconstructed to be consistent
 *  with those rows and with the published category definitions (>= 1%, >= 99%) [METHODS.md 8.2, M]; to be verified
 *  against Binzel 2000 Fig. 1 before release. */
export type TorinoRuleSource = 'published-digitisation' | 'reconstruction';

export type TorinoRating = {
  category: number;
  colour: TorinoColour;
  /** The rule row that decided, in the notation of METHODS.md 8.2. */
  rule: string;
  ruleSource: TorinoRuleSource;
  /** x = log10 E[Mt], y = log10 p. */
  log10EnergyMt: number;
  log10Probability: number;
};

const COLOURS: TorinoColour[] = ['white', 'green', 'yellow', 'yellow', 'yellow', 'orange', 'orange', 'orange', 'red', 'red', 'red'];

/** log10(0.99), the certain-collision line. */
const Y_CERTAIN = Math.log10(0.99);

/**
 * Torino category from x = log10 E[Mt] and y = log10 p (p in [0, 1]; y = -Infinity for p = 0).
 * Lines (METHODS.md 8.2): L1 = (x+1)/3 + (y+2)/2, L2 = (x-2)/3 + (y+2)/2, L3 = (x-5)/3 + (y+2)/2 (evaluated as
 * 6L = 2(x+c) + 3(y+2) so that points exactly on a line are classified exactly), horizontals y = -2 and p = 0.99,
 * verticals x = 0, 2, 5. A point on a line belongs to the side the rule writes with >= (always the higher category).
 */
export function torinoFromLogs(x: number, y: number): TorinoRating {
  if (Number.isNaN(x) || Number.isNaN(y) || y > 0) throw new RangeError(`invalid Torino inputs x=${x}, y=${y}`);
  const l1 = 2 * (x + 1) + 3 * (y + 2);
  const l2 = 2 * (x - 2) + 3 * (y + 2);
  const l3 = 2 * (x - 5) + 3 * (y + 2);
  const res = (category: number, rule: string, ruleSource: TorinoRuleSource): TorinoRating => ({
    category,
    colour: COLOURS[category],
    rule,
    ruleSource,
    log10EnergyMt: x,
    log10Probability: y,
  });
  if (x < 0 || l1 < 0) return res(0, '0: L1 < 0 or x < 0', 'published-digitisation');
  if (y >= Y_CERTAIN) {
    if (x < 2) return res(8, '8: p >= 0.99, 0 <= x < 2', 'reconstruction');
    if (x < 5) return res(9, '9: p >= 0.99, 2 <= x < 5', 'reconstruction');
    return res(10, '10: p >= 0.99, x >= 5', 'reconstruction');
  }
  if (y >= -2) {
    if (x < 2) return res(3, '3: y >= -2, p < 0.99, 0 <= x < 2', 'reconstruction');
    if (x < 5) {
      if (l3 < 0) return res(4, '4: y >= -2, p < 0.99, 2 <= x < 5, L3 < 0', 'reconstruction');
      return res(5, '5: L3 >= 0, x < 5, p < 0.99', 'reconstruction');
    }
    return res(7, '7: y >= -2, x >= 5, p < 0.99', 'reconstruction');
  }
  // y < -2
  if (l2 < 0) return res(1, '1: L1 >= 0, x >= 0, L2 < 0, y < -2', 'published-digitisation');
  if (l3 < 0) return res(2, '2: L2 >= 0, L3 < 0, y < -2', 'published-digitisation');
  // L3 >= 0 with y < -2 forces x > 5 (both terms of L3 would be negative otherwise)
  return res(6, '6: L3 >= 0, x >= 5, y < -2', 'reconstruction');
}

/** Torino category for one potential impact from its probability and kinetic energy (Mt TNT). */
export function torinoRating(probability: number, energyMt: number): TorinoRating {
  if (!(probability >= 0 && probability <= 1)) throw new RangeError(`probability must be in [0, 1], got ${probability}`);
  if (!(energyMt > 0)) throw new RangeError(`energy must be > 0 Mt, got ${energyMt}`);
  return torinoFromLogs(Math.log10(energyMt), probability > 0 ? Math.log10(probability) : -Infinity);
}

/** An object's Torino value: the maximum over its potential impacts (Binzel 2000); null when there are none. */
export function torinoMax(ratings: readonly { category: number }[]): number | null {
  if (ratings.length === 0) return null;
  return Math.max(...ratings.map((r) => r.category));
}
