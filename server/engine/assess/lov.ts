/**
 * Line-of-variations (LOV) sampling (issue 4 item 4; METHODS.md §6.4; Milani et al. 2005, Icarus 173, 362 [C
 * abstract]). A simple, complete version:
 *
 * 1. The LOV. Scaled coordinates y = D^-1 (x - x_nominal) with D = diag(|r| x3, |v| x3, sigma_Ai for A1..A3)
 *    (relative position and velocity changes; the non-grav parameters in their own sigmas). The weak direction
 *    v_w is the eigenvector of the largest eigenvalue lambda of Gamma_y = D^-1 Gamma D^-1. Without observations the
 *    constrained differential correction of METHODS §6.4 (fix the weak component, minimise chi^2 over the rest)
 *    has the closed-form answer y = s v_w (v_w is an eigenvector), so the LOV is the straight line
 *      x(sigma) = x_nominal + sigma sqrt(lambda) D v_w,
 *    with sigma_LOV = the constraint coordinate in standard deviations (chi^2 = sigma^2 exactly; its marginal
 *    distribution is N(0, 1)). For a Gaussian solution this is the linear LOV; no orbit refit is done.
 * 2. Virtual asteroids (VAs) at `samples` equally spaced sigma in [-sigmaMax, sigmaMax] (default 161 in [-3, 3],
 *    spacing 0.0375 sigma; 0 included) are propagated with the full dynamics; their close approaches (within
 *    max(maxAu, 0.2 AU), wider than the report threshold so the trace is continuous) are grouped into encounter
 *    windows per body (a new window after a 30-day gap, Tocsin choice).
 * 3. In each window the b-plane trace (xi(sigma), zeta(sigma)) is scanned for local minima of the distance from the
 *    planet's centre on the piecewise-linear trace; each minimum closer than 100 capture radii is refined by
 *    regula falsi (Illinois) on g(sigma) = b(sigma) . t (t = local trace direction), each evaluation a new VA,
 *    until the bracket spans < 5% of the capture radius on the b-plane (at most 30 evaluations).
 * 4. At the refined point sigma*, the VA is propagated with its state transition matrix: B_J = d(xi, zeta)/dx0, the
 *    trace derivative b' = B_J dx/dsigma, and the b-plane covariance of the solutions conditioned on sigma,
 *    Gamma_c = Gamma - Gamma c c^T Gamma / (c^T Gamma c), c = D^-1 v_w, mapped to the b-plane: Gamma_Bc = B_J Gamma_c B_J^T.
 *    IP of the virtual impactor (lovSegmentIp): integral over sigma of phi(sigma) times the probability that
 *    N(b(sigma), Gamma_Bc) falls in the capture disk (risk/linear-ip), b(sigma) = b* + (sigma - sigma*) b'. This is
 *    the "1-D probability mass along the LOV segment x Gaussian fraction of the rest" of METHODS §6.4 item 4, with the
 *    conditional spread kept in both b-plane directions: the LOV direction need not carry all of the spread along
 *    the trace, and dropping the along-trace part underestimated a 3-sigma-tail IP by a factor of 7 on the demo
 *    asteroid. Exact for a Gaussian solution in the linear regime; the straight trace is extrapolated past the
 *    sampled sigma range when the crossing lies beyond it.
 * Limits (say so in the output): a straight LOV (no refit, no curvature in initial-condition space); a VI narrower
 * than the sample spacing whose trace minimum is not a local minimum of the sampled trace can be missed; after
 * deep encounters the trace folds and needs denser sampling; when the region is wide in two directions the LOV
 * does not represent it (METHODS §6.4) — Monte Carlo is the check.
 */
import { AU_KM, GM_KM3_S2 } from '../constants';
import type { CloseApproach } from '../dynamics';
import type { PlanetEphemeris } from '../dynamics/types';
import type { EphemerisBody } from '../ephemeris';
import { jacobiEigenSymmetric } from '../linalg';
import { normalIntervalProbability, normalPdf, gaussLegendre, linearImpactProbability } from '../risk';
import { approachesOf, bPlaneJacobianAt, captureRadiusFor, displace, type SolutionPoint, type WorkingCovariance } from './linear';

export type LovOptions = {
  sigmaMax?: number;
  samples?: number;
  windowGapDays?: number;
  onProgress?(done: number, total: number): void;
  signal?: AbortSignal;
};

export type LovVirtualImpactor = {
  body: EphemerisBody;
  tdbDays: number;
  sigmaLov: number;
  /** Distance of the refined trace point from the planet's centre on the b-plane, km. */
  bPlaneDistanceKm: number;
  /** Cross-trace offset of the (locally straight) trace from the centre, km. */
  crossTraceOffsetKm: number;
  /** Semilinear cross-trace 1-sigma width, km. */
  crossTraceSigmaKm: number;
  /** |d b / d sigma_LOV|, km per sigma. */
  traceStretchKmPerSigma: number;
  captureRadiusKm: number;
  vInfinityKmS: number;
  impactProbability: number;
  /** The refined VA reached the surface in the full propagation. */
  vaImpacts: boolean;
  evaluations: number;
};

export type LovWindow = {
  body: EphemerisBody;
  tdbDaysMin: number;
  tdbDaysMax: number;
  /** VAs with an encounter in this window / VAs sampled. */
  vasWithEncounter: number;
  /** Sum of the virtual impactors' IPs, or null when none was found. */
  impactProbability: number | null;
  virtualImpactors: LovVirtualImpactor[];
  /** Sampled trace (sigma, xi, zeta, impact). */
  trace: { sigmaLov: number; xiKm: number; zetaKm: number; impact: boolean }[];
};

export type LovResult = {
  method: string;
  sigmaRange: [number, number];
  samples: number;
  propagations: number;
  /** Weak direction in the covariance's parameters (unit in the scaled metric, then unscaled: dx/dsigma). */
  dxPerSigma: number[];
  names: string[];
  windows: LovWindow[];
  seconds: number;
  notes: string[];
};

type Ctx = {
  nominal: SolutionPoint;
  covariance: WorkingCovariance;
  ephemeris: PlanetEphemeris;
  untilTdbDays: number;
  bodies: EphemerisBody[];
  maxAu: number;
  tolerance?: number;
};

/** dx/dsigma of the LOV and the constraint normal c (see module comment). */
export function lovDirection(nominal: SolutionPoint, cov: WorkingCovariance): { dx: Float64Array; c: Float64Array; lambda: number } {
  const n = cov.n;
  const d = new Float64Array(n);
  const rn = Math.hypot(...nominal.positionAu), vn = Math.hypot(...nominal.velocityAuD);
  for (let i = 0; i < n; i++) d[i] = i < 3 ? rn : i < 6 ? vn : Math.sqrt(cov.matrix[i * n + i]);
  const gs = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) gs[i * n + j] = cov.matrix[i * n + j] / (d[i] * d[j]);
  const eig = jacobiEigenSymmetric(gs, n);
  const lambda = eig.values[n - 1];
  const vw = new Float64Array(n);
  for (let i = 0; i < n; i++) vw[i] = eig.vectors[i * n + (n - 1)];
  // Sign convention: positive sigma increases the component of largest magnitude.
  let big = 0;
  for (let i = 1; i < n; i++) if (Math.abs(vw[i]) > Math.abs(vw[big])) big = i;
  if (vw[big] < 0) for (let i = 0; i < n; i++) vw[i] = -vw[i];
  const dx = new Float64Array(n);
  const c = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    dx[i] = Math.sqrt(lambda) * d[i] * vw[i];
    c[i] = vw[i] / d[i];
  }
  return { dx, c, lambda };
}

type Enc = { sigma: number; a: CloseApproach };

export function lovAssessment(ctx: Ctx, opts: LovOptions = {}): LovResult {
  const t0 = performance.now();
  const sigmaMax = opts.sigmaMax ?? 3;
  const N = Math.max(3, opts.samples ?? 161);
  const gap = opts.windowGapDays ?? 30;
  const { nominal, covariance: cov } = ctx;
  const n = cov.n;
  const { dx, c } = lovDirection(nominal, cov);
  const searchAu = Math.max(ctx.maxAu, 0.2);
  let propagations = 0;
  const notes: string[] = [];
  const runVa = (sigma: number): CloseApproach[] => {
    propagations++;
    return approachesOf(displace(nominal, cov.names, dx, sigma), ctx, ctx.untilTdbDays, searchAu);
  };

  const sigmas: number[] = [];
  for (let i = 0; i < N; i++) sigmas.push(-sigmaMax + (2 * sigmaMax * i) / (N - 1));
  const all: Enc[] = [];
  for (let i = 0; i < N; i++) {
    if (opts.signal?.aborted) throw new Error('LOV sampling cancelled');
    for (const a of runVa(sigmas[i])) all.push({ sigma: sigmas[i], a });
    opts.onProgress?.(i + 1, N);
  }

  // Windows per body by time gap.
  const windows: LovWindow[] = [];
  for (const body of ctx.bodies) {
    const list = all.filter((e) => e.a.body === body).sort((p, q) => p.a.tdbDays - q.a.tdbDays);
    let cur: Enc[] = [];
    const flush = () => {
      if (cur.length) windows.push(buildWindow(body, cur));
      cur = [];
    };
    for (const e of list) {
      if (cur.length && e.a.tdbDays - cur[cur.length - 1].a.tdbDays > gap) flush();
      cur.push(e);
    }
    flush();
  }

  function buildWindow(body: EphemerisBody, encs: Enc[]): LovWindow {
    // One approach per VA: the closest in the window.
    const best = new Map<number, CloseApproach>();
    for (const e of encs) {
      const prev = best.get(e.sigma);
      if (!prev || e.a.distanceKm < prev.distanceKm) best.set(e.sigma, e.a);
    }
    const tMin = Math.min(...encs.map((e) => e.a.tdbDays));
    const tMax = Math.max(...encs.map((e) => e.a.tdbDays));
    const trace = [...best.entries()]
      .filter(([, a]) => a.bPlane)
      .sort((p, q) => p[0] - q[0])
      .map(([sigma, a]) => ({ sigmaLov: sigma, xiKm: a.bPlane!.xiKm, zetaKm: a.bPlane!.zetaKm, impact: a.impact, a }));
    const win: LovWindow = {
      body,
      tdbDaysMin: tMin,
      tdbDaysMax: tMax,
      vasWithEncounter: best.size,
      impactProbability: null,
      virtualImpactors: [],
      trace: trace.map(({ sigmaLov, xiKm, zetaKm, impact }) => ({ sigmaLov, xiKm, zetaKm, impact })),
    };
    const step = (2 * sigmaMax) / (N - 1);
    // Local minima of the distance on the piecewise-linear trace (consecutive samples only).
    const candidates: { lo: number; hi: number }[] = [];
    const dist = trace.map((p) => Math.hypot(p.xiKm, p.zetaKm));
    for (let i = 0; i < trace.length; i++) {
      const prevOk = i > 0 && Math.abs(trace[i].sigmaLov - trace[i - 1].sigmaLov - step) < 1e-9;
      const nextOk = i + 1 < trace.length && Math.abs(trace[i + 1].sigmaLov - trace[i].sigmaLov - step) < 1e-9;
      const leftDown = !prevOk || dist[i - 1] >= dist[i];
      const rightUp = !nextOk || dist[i + 1] >= dist[i];
      if (!(leftDown && rightUp)) continue;
      const cap = captureRadiusFor(body, trace[i].a.vInfinityKmS) ?? 0;
      if (!(cap > 0)) continue;
      // distance of the neighbouring segments from the centre
      let segMin = dist[i];
      for (const j of [i - 1, i + 1]) {
        if (j < 0 || j >= trace.length || !(j === i - 1 ? prevOk : nextOk)) continue;
        const ax = trace[i].xiKm, az = trace[i].zetaKm, bx = trace[j].xiKm, bz = trace[j].zetaKm;
        const ux = bx - ax, uz = bz - az;
        const tt = Math.max(0, Math.min(1, -(ax * ux + az * uz) / (ux * ux + uz * uz || 1)));
        segMin = Math.min(segMin, Math.hypot(ax + tt * ux, az + tt * uz));
      }
      if (segMin > 100 * cap) continue;
      candidates.push({ lo: prevOk ? trace[i - 1].sigmaLov : trace[i].sigmaLov, hi: nextOk ? trace[i + 1].sigmaLov : trace[i].sigmaLov });
    }
    for (const cand of candidates) {
      const vi = refine(body, tMin, tMax, cand.lo, cand.hi);
      if (vi) win.virtualImpactors.push(vi);
    }
    if (win.virtualImpactors.length) win.impactProbability = win.virtualImpactors.reduce((s, v) => s + v.impactProbability, 0);
    return win;
  }

  function encounterIn(sigma: number, body: EphemerisBody, tMin: number, tMax: number): CloseApproach | null {
    const list = runVa(sigma).filter((a) => a.body === body && a.tdbDays >= tMin - gap && a.tdbDays <= tMax + gap && a.bPlane);
    if (!list.length) return null;
    return list.reduce((p, q) => (q.distanceKm < p.distanceKm ? q : p));
  }

  function refine(body: EphemerisBody, tMin: number, tMax: number, lo: number, hi: number): LovVirtualImpactor | null {
    let evaluations = 0;
    const at = (s: number) => {
      evaluations++;
      return encounterIn(s, body, tMin, tMax);
    };
    let A = at(lo), B = at(hi);
    if (!A || !B) return null;
    let sa = lo, sb = hi;
    let bestS = sa, bestA = A;
    const consider = (s: number, a: CloseApproach) => {
      if (Math.hypot(a.bPlane!.xiKm, a.bPlane!.zetaKm) < Math.hypot(bestA.bPlane!.xiKm, bestA.bPlane!.zetaKm)) {
        bestS = s;
        bestA = a;
      }
    };
    consider(sb, B);
    if (hi > lo) {
      // direction of the trace across the bracket
      let tx = B.bPlane!.xiKm - A.bPlane!.xiKm, tz = B.bPlane!.zetaKm - A.bPlane!.zetaKm;
      const tn = Math.hypot(tx, tz) || 1;
      tx /= tn; tz /= tn;
      const g = (a: CloseApproach) => a.bPlane!.xiKm * tx + a.bPlane!.zetaKm * tz;
      let ga = g(A), gb = g(B);
      const cap0 = captureRadiusFor(body, bestA.vInfinityKmS)!;
      let side = 0;
      if (ga < 0 && gb > 0) {
        for (let it = 0; it < 30; it++) {
          const span = Math.hypot(B.bPlane!.xiKm - A.bPlane!.xiKm, B.bPlane!.zetaKm - A.bPlane!.zetaKm);
          if (span < 0.05 * cap0) break;
          let s = sa - (ga * (sb - sa)) / (gb - ga);
          if (!(s > sa && s < sb)) s = 0.5 * (sa + sb);
          const C = at(s);
          if (!C) break;
          consider(s, C);
          const gc = g(C);
          if (gc < 0) {
            sa = s; A = C; ga = gc;
            if (side === -1) gb *= 0.5;
            side = -1;
          } else {
            sb = s; B = C; gb = gc;
            if (side === 1) ga *= 0.5;
            side = 1;
          }
        }
      }
    }
    // STM at the refined VA.
    const p = displace(nominal, cov.names, dx, bestS);
    const jac = bPlaneJacobianAt(p, cov.names, bestA, ctx.ephemeris, ctx.tolerance);
    evaluations++;
    propagations++;
    if (!jac) return null;
    const bj = jac.bj;
    const vInf = bestA.vInfinityKmS!;
    const capture = captureRadiusFor(body, vInf)!;
    // trace derivative b' = B_J dx
    let bpX = 0, bpZ = 0;
    for (let j = 0; j < n; j++) {
      bpX += bj[j] * dx[j];
      bpZ += bj[n + j] * dx[j];
    }
    const stretch = Math.hypot(bpX, bpZ);
    const tX = bpX / stretch, tZ = bpZ / stretch;
    const nX = -tZ, nZ = tX;
    // conditional covariance Gamma_c = Gamma - Gamma c c^T Gamma / (c^T Gamma c); width across the trace
    const G = cov.matrix;
    const gc = new Float64Array(n);
    let cgc = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += G[i * n + j] * c[j];
      gc[i] = s;
      cgc += c[i] * s;
    }
    const row = new Float64Array(n);
    for (let j = 0; j < n; j++) row[j] = nX * bj[j] + nZ * bj[n + j];
    let w2 = 0, rg = 0;
    for (let i = 0; i < n; i++) {
      rg += row[i] * gc[i];
      for (let j = 0; j < n; j++) w2 += row[i] * G[i * n + j] * row[j];
    }
    w2 -= (rg * rg) / cgc;
    const sPerp = Math.sqrt(Math.max(0, w2));
    // Full conditional b-plane covariance Gamma_Bc = B_J Gamma_c B_J^T (2x2): its along-trace part matters too,
    // because the LOV direction (weak direction in the scaled metric) need not carry all of the b-plane spread.
    const covBc = conditionalBPlaneCovariance(bj, n, G, gc, cgc);
    const bx = bestA.bPlane!.xiKm, bz = bestA.bPlane!.zetaKm;
    const m = bx * nX + bz * nZ;
    const ip = lovSegmentIp({
      traceKm: [bx, bz],
      traceDerivKmPerSigma: [bpX, bpZ],
      sigmaAtTrace: bestS,
      conditionalCovKm2: covBc,
      captureRadiusKm: capture,
    });
    return {
      body,
      tdbDays: bestA.tdbDays,
      sigmaLov: bestS,
      bPlaneDistanceKm: Math.hypot(bx, bz),
      crossTraceOffsetKm: m,
      crossTraceSigmaKm: sPerp,
      traceStretchKmPerSigma: stretch,
      captureRadiusKm: capture,
      vInfinityKmS: vInf,
      impactProbability: ip,
      vaImpacts: bestA.impact,
      evaluations,
    };
  }

  const result: LovResult = {
    method:
      'line of variations: straight LOV along the weak direction of the scaled covariance, VAs propagated with the full dynamics, ' +
      'virtual impactors refined by regula falsi on the b-plane trace, semilinear IP (1-D mass along the LOV x Gaussian fraction across the trace)',
    sigmaRange: [-sigmaMax, sigmaMax],
    samples: N,
    propagations,
    dxPerSigma: Array.from(dx),
    names: [...cov.names],
    windows,
    seconds: (performance.now() - t0) / 1000,
    notes,
  };
  notes.push(
    `sampled ${N} VAs with sigma_LOV in [-${sigmaMax}, ${sigmaMax}] (spacing ${((2 * sigmaMax) / (N - 1)).toFixed(4)}); ` +
      `probability mass outside that range (${(2 * normalIntervalProbability(sigmaMax, Infinity)).toExponential(2)}) is not searched`,
  );
  result.propagations = propagations;
  return result;
}

const GL10 = gaussLegendre(10);

/**
 * IP of a locally straight trace: integral over the along-trace coordinate a in [-b, b] of
 * phi(sigma(a)) P(|cross| <= h(a)) da / stretch, with a = b sin(theta).
 */
export function semilinearIp(b: number, m: number, sPerp: number, sigmaOf: (a: number) => number, stretch: number): number {
  const panels = 64;
  let total = 0;
  for (let k = 0; k < panels; k++) {
    const t0 = -Math.PI / 2 + (Math.PI * k) / panels;
    const t1 = t0 + Math.PI / panels;
    const h = 0.5 * (t1 - t0), mid = 0.5 * (t0 + t1);
    let s = 0;
    for (let i = 0; i < GL10.x.length; i++) {
      const th = mid + h * GL10.x[i];
      const a = b * Math.sin(th);
      const half = b * Math.cos(th);
      const dens = normalPdf(sigmaOf(a)) / stretch;
      let frac: number;
      if (sPerp > 0) frac = normalIntervalProbability((-half - m) / sPerp, (half - m) / sPerp);
      else frac = Math.abs(m) <= half ? 1 : 0;
      s += GL10.w[i] * dens * frac * b * Math.cos(th);
    }
    total += s * h;
  }
  return Math.min(1, Math.max(0, total));
}


/** B_J Gamma_c B_J^T with Gamma_c = Gamma - (Gamma c)(Gamma c)^T / (c^T Gamma c); bj holds the two rows of B_J. */
function conditionalBPlaneCovariance(bj: Float64Array, n: number, G: Float64Array, gc: Float64Array, cgc: number): number[][] {
  const out = [[0, 0], [0, 0]];
  for (let a = 0; a < 2; a++) {
    for (let b = 0; b < 2; b++) {
      let q = 0, ra = 0, rb = 0;
      for (let i = 0; i < n; i++) {
        ra += bj[a * n + i] * gc[i];
        rb += bj[b * n + i] * gc[i];
        for (let j = 0; j < n; j++) q += bj[a * n + i] * G[i * n + j] * bj[b * n + j];
      }
      out[a][b] = q - (ra * rb) / cgc;
    }
  }
  const sym = 0.5 * (out[0][1] + out[1][0]);
  out[0][1] = out[1][0] = sym;
  return out;
}

/**
 * IP of a virtual-impactor segment of a locally straight LOV trace, exact for a Gaussian solution in the linear
 * regime: IP = integral over sigma of phi(sigma) P(N(b(sigma), Gamma_Bc) in the capture disk) d sigma, with
 * b(sigma) = b* + (sigma - sigma*) b' the trace and Gamma_Bc the b-plane covariance of the solutions conditioned on
 * sigma (both across and along the trace). The inner disk probability is risk/linear-ip (principal axes, erfc
 * across the narrow axis). Gauss-Legendre over sigma on 48 panels of 10 points, across the span where the
 * conditional cloud can touch the disk (capture radius + 10 conditional sigmas either side).
 */
export function lovSegmentIp(p: {
  traceKm: [number, number];
  traceDerivKmPerSigma: [number, number];
  sigmaAtTrace: number;
  conditionalCovKm2: number[][];
  captureRadiusKm: number;
}): number {
  const [bx, bz] = p.traceKm;
  const [dx, dz] = p.traceDerivKmPerSigma;
  const s2 = dx * dx + dz * dz;
  if (!(s2 > 0)) return 0;
  const c = p.conditionalCovKm2;
  const lMax = 0.5 * (c[0][0] + c[1][1]) + Math.sqrt(0.25 * (c[0][0] - c[1][1]) ** 2 + c[0][1] ** 2);
  // A floor keeps the 2x2 covariance positive definite when the conditional spread is (nearly) rank one.
  const floor = Math.max(1e-12 * lMax, 1e-12);
  const cov = [[c[0][0] + floor, c[0][1]], [c[1][0], c[1][1] + floor]];
  const sClosest = p.sigmaAtTrace - (bx * dx + bz * dz) / s2;
  const half = (p.captureRadiusKm + 10 * Math.sqrt(Math.max(lMax, 0))) / Math.sqrt(s2);
  const panels = 48;
  const a = sClosest - half;
  const width = (2 * half) / panels;
  let total = 0;
  for (let k = 0; k < panels; k++) {
    const mid = a + (k + 0.5) * width;
    let sum = 0;
    for (let i = 0; i < GL10.x.length; i++) {
      const sigma = mid + 0.5 * width * GL10.x[i];
      const ds = sigma - p.sigmaAtTrace;
      const pDisk = linearImpactProbability({ meanKm: [bx + ds * dx, bz + ds * dz], covarianceKm2: cov }, p.captureRadiusKm).probability;
      sum += GL10.w[i] * normalPdf(sigma) * pDisk;
    }
    total += 0.5 * width * sum;
  }
  return Math.min(1, Math.max(0, total));
}
