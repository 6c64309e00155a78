/**
 * Outlier rejection and recovery by the chi-square rule (METHODS.md §9.1; Carpino, Milani & Chesley 2003,
 * Icarus 166, 248):
 *
 *   chi_i² = xi_iᵀ Γ_xi_i⁻¹ xi_i,  Γ_xi_i = Γ_obs,i − P_i Γ P_iᵀ (observation in the fit),
 *                                          Γ_obs,i + P_i Γ P_iᵀ (observation excluded),
 *   reject a used observation if chi_i² > 8 + 400·1.2^(−N_used) (the small-sample term of the public
 *   implementation METHODS cites), recover an excluded one if chi_i² < 7.
 *
 * P_i = ∂(computed)/∂p (the sign does not matter in P Γ Pᵀ), Γ the fit covariance. Only a few percent of the used
 * observations are rejected per pass, worst first (METHODS §9.1 "dropping only a few percent per pass"):
 * at most max(1, ⌊REJECT_FRACTION_PER_PASS · N_used⌋). An included observation whose Γ_xi is not positive
 * definite (it alone fixes the solution along some direction) cannot be judged; its chi² is computed with
 * Γ_obs alone and it is never rejected.
 */

export const CHI2_REJECT = 8;
export const CHI2_RECOVER = 7;
export const REJECT_FRACTION_PER_PASS = 0.03;

/** Rejection threshold for N used observations: 8 + 400·1.2^(−N). */
export function rejectThreshold(nUsed: number): number {
  return CHI2_REJECT + 400 * Math.pow(1.2, -nUsed);
}

/**
 * chi_i² of every observation. residuals 2N (rad), partials 2N x n, obsCovariance 3N packed (rad²), covariance n x n.
 * Returns chi² and whether the value could be judged (positive-definite Γ_xi).
 */
export function observationChiSquares(
  residuals: Float64Array,
  partials: Float64Array,
  obsCovariance: Float64Array,
  covariance: Float64Array,
  used: ArrayLike<boolean | number>,
  n: number,
): { chiSquare: Float64Array; judged: Uint8Array } {
  const N = residuals.length / 2;
  const chi = new Float64Array(N);
  const judged = new Uint8Array(N);
  const gp0 = new Float64Array(n);
  const gp1 = new Float64Array(n);
  for (let i = 0; i < N; i++) {
    const o0 = 2 * i * n;
    const o1 = o0 + n;
    // Γ P_iᵀ columns
    for (let j = 0; j < n; j++) {
      let a = 0, b = 0;
      for (let k = 0; k < n; k++) {
        a += covariance[j * n + k] * partials[o0 + k];
        b += covariance[j * n + k] * partials[o1 + k];
      }
      gp0[j] = a;
      gp1[j] = b;
    }
    let q00 = 0, q01 = 0, q11 = 0;
    for (let j = 0; j < n; j++) {
      q00 += partials[o0 + j] * gp0[j];
      q01 += partials[o0 + j] * gp1[j];
      q11 += partials[o1 + j] * gp1[j];
    }
    const sgn = used[i] ? -1 : 1;
    let c00 = obsCovariance[3 * i] + sgn * q00;
    let c01 = obsCovariance[3 * i + 1] + sgn * q01;
    let c11 = obsCovariance[3 * i + 2] + sgn * q11;
    let det = c00 * c11 - c01 * c01;
    let ok = 1;
    if (!(c00 > 0 && c11 > 0 && det > 1e-12 * c00 * c11)) {
      ok = 0;
      c00 = obsCovariance[3 * i];
      c01 = obsCovariance[3 * i + 1];
      c11 = obsCovariance[3 * i + 2];
      det = c00 * c11 - c01 * c01;
    }
    const r0 = residuals[2 * i], r1 = residuals[2 * i + 1];
    chi[i] = (c11 * r0 * r0 - 2 * c01 * r0 * r1 + c00 * r1 * r1) / det;
    judged[i] = ok;
  }
  return { chiSquare: chi, judged };
}

export interface OutlierDecision {
  reject: number[];
  recover: number[];
  threshold: number;
}

/**
 * One pass of the rule. `locked[i]` marks observations the analyst excluded (never recovered, never judged).
 */
export function outlierPass(
  chiSquare: Float64Array,
  judged: Uint8Array,
  used: ArrayLike<boolean | number>,
  locked: ArrayLike<boolean | number>,
): OutlierDecision {
  let nUsed = 0;
  for (let i = 0; i < chiSquare.length; i++) if (used[i]) nUsed++;
  const threshold = rejectThreshold(nUsed);
  const candidates: number[] = [];
  const recover: number[] = [];
  for (let i = 0; i < chiSquare.length; i++) {
    if (locked[i]) continue;
    if (used[i]) {
      if (judged[i] && chiSquare[i] > threshold) candidates.push(i);
    } else if (chiSquare[i] < CHI2_RECOVER) {
      recover.push(i);
    }
  }
  candidates.sort((a, b) => chiSquare[b] - chiSquare[a]);
  const maxReject = Math.max(1, Math.floor(REJECT_FRACTION_PER_PASS * nUsed));
  return { reject: candidates.slice(0, maxReject), recover, threshold };
}
