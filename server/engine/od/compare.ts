/**
 * Gravity-only versus non-gravitational fit (METHODS.md §9.2; issue 8 item 5):
 *
 * - Δχ² = χ²(gravity-only) − χ²(non-grav) summed over one observation set (plain ξᵀWξ, not the outlier χ_i²): the
 *   set the non-gravitational fit uses. A gravity-only fit whose outlier passes rejected some of those (a wrong
 *   model makes good observations look bad) is first redone on exactly that set by the caller (fit.ts), so both
 *   models are least-squares fits to the same data and Δχ² ≥ 0 is the nested-model statistic; its p-value P(χ²_k ≥ Δχ²) for k added parameters (likelihood-ratio test), and that p-value as a
 *   two-sided Gaussian sigma (statistics.ts);
 * - |A_k|/σ_k (detections are usually quoted at S/N ≳ 3; Farnocchia et al. 2013 [M via METHODS §9.2]);
 * - the 1-sigma of every element in both fits and their ratio (the added parameters widen them, METHODS §9.2), the
 *   gravity-only sigmas taken from the same-set refit when there is one (on the same data the Schur complement
 *   makes every ratio >= 1 up to the difference of the two linearisation points);
 * - the encounter uncertainty of both fits, when they predict the same closest Earth approach, appended to the
 *   verdict (issue 8 item 5: how the predicted encounter uncertainty changes);
 * - a residual trend test for each fit: the normalised residuals (RA·cos δ / σ and δ / σ) of the used
 *   observations are fitted with a quadratic in time (time scaled to [−1, 1] over the arc); the trend is the
 *   slope + curvature, tested against the offset-only model with an F-test
 *     F = (Δχ²_trend / 4) / (χ²_quadratic / (2m − 6)),  d1 = 4, d2 = 2m − 6
 *   (two components x two trend terms; Press et al. 2007 §14.2 for the F distribution via the incomplete beta),
 *   which does not depend on how well the weights are scaled; reported as a two-sided Gaussian sigma.
 *   Fewer than 3 distinct times per component lower the polynomial degree.
 */
import type { FitComparison, FitResult, NonGravTerm } from '../../../shared/schemas/od';
import { incompleteBetaRegularized } from '../risk/special';
import { solveNormal } from './leastSquares';
import { logChiSquareSurvival, sigmaFromLogPValue } from './statistics';

/** A p-value below this underflows; its sigma is reported as this bound. */
const MIN_LOG_P = Math.log(1e-300);

export interface TrendResult {
  sigma: number;
  /** F statistic and its degrees of freedom */
  f: number;
  d1: number;
  d2: number;
  /** trend coefficients per component, normalised units: [slope, curvature] */
  raCosDec: number[];
  dec: number[];
}

function polyFit(t: number[], z: number[], degree: number): { coef: Float64Array; chi2: number } | null {
  const n = degree + 1;
  const normal = new Float64Array(n * n);
  const rhs = new Float64Array(n);
  for (let i = 0; i < t.length; i++) {
    const row = Array.from({ length: n }, (_, k) => Math.pow(t[i], k));
    for (let a = 0; a < n; a++) {
      rhs[a] += row[a] * z[i];
      for (let b = 0; b < n; b++) normal[a * n + b] += row[a] * row[b];
    }
  }
  const sol = solveNormal(normal, rhs, n, false);
  if (!sol) return null;
  let chi2 = 0;
  for (let i = 0; i < t.length; i++) {
    let m = 0;
    for (let k = 0; k < n; k++) m += sol.step[k] * Math.pow(t[i], k);
    chi2 += (z[i] - m) ** 2;
  }
  return { coef: sol.step, chi2 };
}

/** Residual trend of one fit's used residuals (see the header). */
export function residualTrend(fit: Pick<FitResult, 'residuals'>): TrendResult {
  const used = fit.residuals.filter((r) => r.status === 'used');
  const times = used.map((r) => r.obsTimeTdbDays);
  const t0 = Math.min(...times);
  const t1 = Math.max(...times);
  const half = (t1 - t0) / 2 || 1;
  const t = times.map((x) => (x - (t0 + half)) / half);
  const distinct = new Set(times.map((x) => Math.round(x * 1e4))).size;
  const degree = Math.min(2, distinct - 1);
  const empty: TrendResult = { sigma: 0, f: 0, d1: 0, d2: 0, raCosDec: [], dec: [] };
  if (degree < 1) return empty;
  let dChi = 0;
  let rest = 0;
  const coefs: number[][] = [];
  for (const comp of ['ra', 'dec'] as const) {
    const z = used.map((r) => (comp === 'ra' ? r.raCosDecArcsec / r.sigmaRaArcsec : r.decArcsec / r.sigmaDecArcsec));
    const full = polyFit(t, z, degree);
    const off = polyFit(t, z, 0);
    if (!full || !off) return empty;
    dChi += off.chi2 - full.chi2;
    rest += full.chi2;
    coefs.push(Array.from(full.coef.slice(1)));
  }
  const d1 = 2 * degree;
  const d2 = 2 * used.length - 2 * (degree + 1);
  if (d2 <= 0) return empty;
  const f = rest > 0 ? dChi / d1 / (rest / d2) : dChi > 0 ? Infinity : 0;
  // P(F > f) = I_x(d2/2, d1/2), x = d2 / (d2 + d1 f)
  let logP: number;
  if (!Number.isFinite(f)) logP = MIN_LOG_P;
  else {
    const p = incompleteBetaRegularized(d2 / (d2 + d1 * Math.max(0, f)), d2 / 2, d1 / 2);
    logP = p > 0 ? Math.log(p) : MIN_LOG_P;
  }
  return { sigma: sigmaFromLogPValue(Math.max(logP, MIN_LOG_P)), f, d1, d2, raCosDec: coefs[0], dec: coefs[1] };
}

const ELEMENT_LABELS: Record<string, string> = {
  perihelionDistanceAu: 'perihelion distance q (AU)',
  eccentricity: 'eccentricity e',
  inclinationDeg: 'inclination i (deg)',
  ascendingNodeDeg: 'ascending node (deg)',
  argPerihelionDeg: 'argument of perihelion (deg)',
  perihelionTimeTdbDays: 'time of perihelion (TDB days)',
};

/** Short human number: 12345 -> 1.2e+4, 123.4 -> 123, 12.34 -> 12.3, 0.0477 -> 0.048. */
const fmt = (x: number) => {
  const a = Math.abs(x);
  if (a >= 1e4) return x.toExponential(1);
  if (a >= 100) return x.toFixed(0);
  if (a >= 1) return x.toFixed(1);
  if (a === 0) return '0';
  return x.toPrecision(2);
};

/**
 * Compare a gravity-only and a non-gravitational fit of the same observations. plainChi2 holds, for each fit,
 * ξ_iᵀ W_i ξ_i of every observation (same order as the residuals). sameSet, when given, is a gravity-only fit
 * redone on the non-gravitational fit's used set: its ξᵀWξ per observation and its used flags replace the
 * gravity-only fit's for the Δχ², and its element sigmas and encounter prediction (when its result is given) for
 * the ratios; the residual trend still describes the gravity-only fit as it was run.
 */
export function compareFits(
  gravity: FitResult,
  nonGrav: FitResult,
  terms: readonly NonGravTerm[],
  plainChi2: { gravityOnly: ArrayLike<number>; nonGrav: ArrayLike<number> },
  sameSet?: { plainChi2: ArrayLike<number>; used: ArrayLike<number>; result?: FitResult },
): FitComparison {
  const usedG = sameSet
    ? new Set(Array.from(sameSet.used).flatMap((u, i) => (u ? [i] : [])))
    : new Set(gravity.residuals.filter((r) => r.status === 'used').map((r) => r.index));
  const chi2G = sameSet ? sameSet.plainChi2 : plainChi2.gravityOnly;
  let chiG = 0;
  let chiN = 0;
  let common = 0;
  for (const r of nonGrav.residuals) {
    if (r.status !== 'used' || !usedG.has(r.index)) continue;
    chiG += chi2G[r.index];
    chiN += plainChi2.nonGrav[r.index];
    common++;
  }
  const k = terms.length;
  const delta = chiG - chiN;
  const setText = sameSet
    ? `over the ${common} observations the non-gravitational fit uses (gravity-only refitted to them)`
    : `over ${common} common observations`;
  const logP = delta > 0 ? logChiSquareSurvival(delta, k) : 0;
  const pValue = Math.exp(logP);
  const significanceSigma = sigmaFromLogPValue(Math.max(logP, MIN_LOG_P));

  const parameterSignificance = terms.map((term) => {
    const idx = nonGrav.parameters.indexOf(term);
    const value = nonGrav.nonGrav ? nonGrav.nonGrav[term] : 0;
    const sigma = idx >= 0 && nonGrav.covariance ? Math.sqrt(Math.max(0, nonGrav.covariance[idx][idx])) : 0;
    return { term, valueAuD2: value, sigmaAuD2: sigma, signalToNoise: sigma > 0 ? Math.abs(value) / sigma : 0 };
  });

  // the price of the added parameters is read on the same data: the refit's sigmas when there is one (METHODS §9.2)
  const gravityForSigmas = sameSet?.result ?? gravity;
  const elementSigmas = Object.keys(ELEMENT_LABELS).map((key) => {
    const g = gravityForSigmas.elements ? (gravityForSigmas.elements as Record<string, { sigma: number | null }>)[key].sigma : null;
    const n = nonGrav.elements ? (nonGrav.elements as Record<string, { sigma: number | null }>)[key].sigma : null;
    return { element: key, gravityOnly: g, nonGrav: n, ratio: g !== null && n !== null && g > 0 ? n / g : null };
  });

  const tg = residualTrend(gravity);
  const tn = residualTrend(nonGrav);
  const description =
    `Quadratic-in-time trend (slope and curvature) of the normalised residuals, F-test against an offset: ` +
    `gravity-only ${fmt(tg.sigma)} sigma, non-gravitational ${fmt(tn.sigma)} sigma.`;

  const bestSn = parameterSignificance.reduce((a, b) => (b.signalToNoise > a.signalToNoise ? b : a), parameterSignificance[0]);
  const ratios = elementSigmas.filter((e) => e.ratio !== null).map((e) => e.ratio as number);
  const widen = ratios.length ? Math.max(...ratios) : null;
  const termsText = terms.map((t) => t.toUpperCase()).join(', ');
  let verdict: string;
  if (nonGrav.status !== 'converged') {
    verdict = `The non-gravitational fit (${termsText}) did not converge (${nonGrav.message ?? 'no message'}); keep the gravity-only fit.`;
  } else if (gravity.status !== 'converged') {
    verdict = `The gravity-only fit did not converge (${gravity.message ?? 'no message'}) while the fit with ${termsText} did; the non-gravitational fit is the usable one.`;
  } else if (significanceSigma >= 3 && bestSn && bestSn.signalToNoise >= 3) {
    verdict =
      `The non-gravitational fit is favoured: adding ${termsText} lowers chi-square by ${fmt(delta)} ` +
      `(${fmt(significanceSigma)} sigma for ${k} added parameter${k > 1 ? 's' : ''}) ${setText}, ${bestSn.term.toUpperCase()} is ${fmt(bestSn.signalToNoise)} times its uncertainty` +
      (tg.sigma >= 3 && tn.sigma < tg.sigma ? `, and the systematic trend in the gravity-only residuals (${fmt(tg.sigma)} sigma) drops to ${fmt(tn.sigma)} sigma` : '') +
      (widen !== null ? `. The price is wider uncertainties (element 1-sigma up to ${fmt(widen)} times larger).` : '.');
  } else if (significanceSigma >= 2 || (bestSn && bestSn.signalToNoise >= 2)) {
    verdict =
      `Marginal: adding ${termsText} lowers chi-square by ${fmt(delta)} (${fmt(significanceSigma)} sigma) ${setText}, and the largest A_k is ${fmt(bestSn?.signalToNoise ?? 0)} times its uncertainty, ` +
      `below the usual detection level of 3; the gravity-only fit remains adequate unless the physics calls for the non-gravitational terms.`;
  } else {
    verdict =
      `The gravity-only fit is adequate: adding ${termsText} lowers chi-square by only ${fmt(delta)} (${fmt(significanceSigma)} sigma) ${setText}, and no A_k reaches 3 times its uncertainty; ` +
      `the non-gravitational fit would only widen the uncertainties${widen !== null ? ` (up to ${fmt(widen)} times)` : ''}.`;
  }
  const eg = sameSet?.result ? sameSet.result.encounter : gravity.encounter;
  const en = nonGrav.encounter;
  if (eg && en && Math.abs(eg.closeApproachTdbDays - en.closeApproachTdbDays) < 30) {
    verdict +=
      ` Closest Earth approach ${en.closeApproachUtc.slice(0, 10)}: distance 1-sigma ${fmt(eg.distanceSigmaKm)} km gravity-only, ` +
      `${fmt(en.distanceSigmaKm)} km with ${termsText} (time 1-sigma ${fmt(eg.timeSigmaMin)} and ${fmt(en.timeSigmaMin)} min).`;
  }
  const og = gravity.originalOrbit;
  const on = nonGrav.originalOrbit;
  if (og && on) {
    // numbers only: the interstellar call is the analyst's (METHODS §3.5 criteria)
    const invA = (o: NonNullable<FitResult['originalOrbit']>) =>
      `${o.inverseSemiMajorAxisPerAu.toExponential(4)}${o.inverseSemiMajorAxisSigmaPerAu !== null ? ` ± ${o.inverseSemiMajorAxisSigmaPerAu.toExponential(1)}` : ''}`;
    const state = (o: NonNullable<FitResult['originalOrbit']>) =>
      `${o.inverseSemiMajorAxisPerAu < 0 ? 'unbound' : 'bound'}${o.unboundSignificance !== null ? ` at ${fmt(Math.abs(o.unboundSignificance))} sigma` : ''}`;
    const where = (o: NonNullable<FitResult['originalOrbit']>) =>
      o.stop === 'distance'
        ? `at ${fmt(o.distanceAu)} AU, ${o.tdbCalendar.slice(0, 4)}`
        : `not reached: ${o.stop === 'aphelion' ? 'aphelion' : 'time limit'} at ${fmt(o.heliocentricDistanceAu)} AU, ${o.tdbCalendar.slice(0, 4)}`;
    const sameWhere = where(og) === where(on);
    const both = state(og).split(' ')[0] === state(on).split(' ')[0];
    verdict +=
      ` Original barycentric orbit (${sameWhere ? where(og) : `${where(og)} gravity-only, ${where(on)} with ${termsText}`}): ` +
      `1/a = ${invA(og)} /AU gravity-only, ${invA(on)} with ${termsText}: ` +
      (both && og.unboundSignificance !== null && on.unboundSignificance !== null
        ? `${state(og).split(' ')[0]} at ${fmt(Math.abs(og.unboundSignificance))} and ${fmt(Math.abs(on.unboundSignificance))} sigma.`
        : `${state(og)} gravity-only, ${state(on)} with ${termsText}.`);
  }
  return {
    addedParameters: [...terms],
    deltaChiSquare: delta,
    observationsCompared: common,
    gravityOnlyRefitted: Boolean(sameSet),
    gravityOnlyEncounter: eg,
    pValue,
    significanceSigma,
    parameterSignificance,
    elementSigmas,
    residualTrend: { gravityOnlySigma: tg.sigma, nonGravSigma: tn.sigma, description },
    verdict,
  };
}
