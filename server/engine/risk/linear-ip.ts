/**
 * Linear impact probability: the integral of the 2-D Gaussian N(mu_B, Gamma_B) on the b-plane over the capture
 * disk |b| <= b_capture (Chodas 1993; Milani & Valsecchi 1999; METHODS.md 6.3), evaluated robustly for very
 * elongated ellipses (sigma_major/sigma_minor up to 1e6 and beyond):
 *  1. rotate to the principal axes (u major, w minor) of Gamma_B;
 *  2. integrate analytically across the minor axis:
 *       IP = int_{-b}^{b} phi(u; m_u, s_u) [Phi((s(u) - m_w)/s_w) - Phi((-s(u) - m_w)/s_w)] du,  s(u) = sqrt(b^2 - u^2),
 *     with the bracket evaluated without cancellation (normalIntervalProbability: erfc differences of the same tail,
 *     or direct quadrature of the density over short intervals);
 *  3. integrate over u with Gauss-Legendre after u = b sin(theta) (removes the square-root endpoint behaviour),
 *     adaptively: panels are split at the places where the integrand changes on a small scale (u = m_u + k s_u and
 *     where the disk edge crosses m_w + k s_w), then bisected until a 20-point rule and its two halves agree.
 * Results below ~1e-300 underflow to 0 (they are physically meaningless).
 */
import { gaussLegendre } from './quadrature';
import { normalIntervalProbability } from './special';

export type BPlaneGaussian = {
  /** Mean (xi, zeta) of the b-plane coordinates, km. */
  meanKm: readonly [number, number];
  /** 2x2 covariance of (xi, zeta), km^2, as rows [[xx, xz], [xz, zz]]. */
  covarianceKm2: readonly (readonly number[])[];
};

export type LinearImpactProbability = {
  probability: number;
  method: 'b-plane Gaussian over capture disk: principal axes, erfc across the minor axis, adaptive Gauss-Legendre in u = b sin(theta)';
  captureRadiusKm: number;
  sigmaMajorKm: number;
  sigmaMinorKm: number;
  axisRatio: number;
  /** Angle of the major axis from the xi axis, radians. */
  majorAxisAngleRad: number;
  /** Mean in the principal frame (u along the major axis, w along the minor), km. */
  meanPrincipalKm: [number, number];
  /** pi b^2 N(0; mu, Gamma): valid when b << sigma_minor; reported for comparison. */
  smallDiskApproximation: number;
  /** Number of integrand evaluations. */
  evaluations: number;
};

/** a*b - c*d with one rounding (Kahan's algorithm using Dekker's error-free product). */
function diffOfProducts(a: number, b: number, c: number, d: number): number {
  const split = (x: number) => {
    const t = 134217729 * x; // 2^27 + 1
    const hi = t - (t - x);
    return [hi, x - hi];
  };
  const twoProd = (x: number, y: number): [number, number] => {
    const p = x * y;
    const [xh, xl] = split(x);
    const [yh, yl] = split(y);
    const e = xh * yh - p + xh * yl + xl * yh + xl * yl;
    return [p, e];
  };
  const [p1, e1] = twoProd(a, b);
  const [p2, e2] = twoProd(c, d);
  return p1 - p2 + (e1 - e2);
}

/** Principal axes of a 2x2 covariance: sigmas (major first), the major-axis angle, precise minor variance. */
export function principalAxes2(cov: readonly (readonly number[])[]): { sigmaMajor: number; sigmaMinor: number; angleRad: number } {
  const a = cov[0][0];
  const b = 0.5 * (cov[0][1] + cov[1][0]);
  const c = cov[1][1];
  if (!(a > 0 && c > 0) || !Number.isFinite(b)) throw new RangeError('b-plane covariance must have positive finite variances');
  const det = diffOfProducts(a, c, b, b);
  if (!(det > 0)) {
    throw new RangeError(`b-plane covariance is not positive definite (det = ${det.toExponential(3)} km^4)`);
  }
  const half = 0.5 * (a + c);
  const rad = Math.hypot(0.5 * (a - c), b);
  const lMajor = half + rad;
  const lMinor = det / lMajor; // avoids the cancellation in half - rad
  return { sigmaMajor: Math.sqrt(lMajor), sigmaMinor: Math.sqrt(lMinor), angleRad: 0.5 * Math.atan2(2 * b, a - c) };
}

/** Probability that a 2-D Gaussian falls in the disk of radius b centred on the origin (see module comment). */
export function linearImpactProbability(
  gaussian: BPlaneGaussian,
  captureRadiusKm: number,
  options: { relativeTolerance?: number } = {},
): LinearImpactProbability {
  const b = captureRadiusKm;
  if (!(b > 0)) throw new RangeError(`capture radius must be > 0 km, got ${b}`);
  const relTol = options.relativeTolerance ?? 1e-10;
  const { sigmaMajor: su, sigmaMinor: sw, angleRad } = principalAxes2(gaussian.covarianceKm2);
  const cu = Math.cos(angleRad);
  const sn = Math.sin(angleRad);
  const [mx, mz] = gaussian.meanKm;
  const mu = mx * cu + mz * sn;
  const mw = -mx * sn + mz * cu;

  const smallDiskApproximation = ((b * b) / (2 * su * sw)) * Math.exp(-0.5 * ((mu / su) ** 2 + (mw / sw) ** 2));

  let evaluations = 0;
  const invSqrt2Pi = 0.3989422804014327;
  // integrand in theta: phi_u(b sin t) * P_w(b sin t) * b cos t
  const f = (t: number): number => {
    evaluations++;
    const u = b * Math.sin(t);
    const s = b * Math.cos(t);
    if (s <= 0) return 0;
    const zu = (u - mu) / su;
    const dens = (invSqrt2Pi / su) * Math.exp(-0.5 * zu * zu);
    if (dens === 0) return 0;
    return dens * normalIntervalProbability((-s - mw) / sw, (s - mw) / sw) * s;
  };

  // Breakpoints in theta where the integrand varies on a short scale.
  const half = Math.PI / 2;
  const breaks = new Set<number>([-half, half]);
  const ks = [-8, -3, -1, 0, 1, 3, 8];
  for (const k of ks) {
    const u = mu + k * su;
    if (u > -b && u < b) breaks.add(Math.asin(u / b));
    const c = (Math.abs(mw) + k * sw) / b; // disk edge s(u) = |m_w| + k s_w
    if (c > 0 && c < 1) {
      const t = Math.acos(c);
      breaks.add(t);
      breaks.add(-t);
    }
  }
  const pts = [...breaks].sort((x, y) => x - y);

  const { x: gx, w: gw } = gaussLegendre(20);
  const panel = (a0: number, a1: number): number => {
    const h = 0.5 * (a1 - a0);
    const m = 0.5 * (a0 + a1);
    let s = 0;
    for (let i = 0; i < 20; i++) s += gw[i] * f(m + h * gx[i]);
    return s * h;
  };

  const whole: number[] = [];
  let total0 = 0;
  for (let i = 0; i + 1 < pts.length; i++) {
    const v = panel(pts[i], pts[i + 1]);
    whole.push(v);
    total0 += v;
  }
  const absFloor = 1e-3 * relTol * total0;
  const refine = (a0: number, a1: number, est: number, depth: number): number => {
    const m = 0.5 * (a0 + a1);
    const left = panel(a0, m);
    const right = panel(m, a1);
    const both = left + right;
    const err = Math.abs(both - est);
    if (depth >= 40 || err <= relTol * Math.abs(both) || err <= absFloor) return both;
    return refine(a0, m, left, depth + 1) + refine(m, a1, right, depth + 1);
  };
  let probability = 0;
  for (let i = 0; i + 1 < pts.length; i++) probability += refine(pts[i], pts[i + 1], whole[i], 0);
  probability = Math.min(1, Math.max(0, probability));

  return {
    probability,
    method:
      'b-plane Gaussian over capture disk: principal axes, erfc across the minor axis, adaptive Gauss-Legendre in u = b sin(theta)',
    captureRadiusKm: b,
    sigmaMajorKm: su,
    sigmaMinorKm: sw,
    axisRatio: su / sw,
    majorAxisAngleRad: angleRad,
    meanPrincipalKm: [mu, mw],
    smallDiskApproximation,
    evaluations,
  };
}
