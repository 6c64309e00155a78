// Geocentric (planet-centred) distance against time around one close approach, nominal and spread, as a pure
// series (for the interactive plot) and a standalone SVG string (server PDFs, downloads).
//
// Where the curve comes from (the engine's result has no time series): it is DERIVED from the result's linear data
// with the planet-centred two-body hyperbola of the approach:
//  - nominal: periapsis q = distanceKm (the engine's nominal closest distance), v-infinity = vInfinityKmS,
//    periapsis time = epochTdbJd; r(t) from Kepler's hyperbolic equation M = e sinh H - H (Newton's method);
//  - spread (3-sigma band): the envelope of the hyperbolae with q anywhere in distanceRangeKm.threeSigma (the linear
//    3-sigma range of the closest distance) and periapsis time shifted by up to +-3 encounterTime.sigmaSeconds:
//    lower edge min_q r_q(max(0, |dt| - 3 sigma_t)), upper edge max_q r_q(|dt| + 3 sigma_t) (r grows with |dt|; over
//    q, 25 values evenly spanning the range and the nominal one are taken, since r does not always grow with q).
// The two-body curve ignores the Sun's tide: good near the encounter (inside about a Hill radius, ~1.5e6 km for
// Earth), approximate further out. When v-infinity is missing, a straight line at the relative speed is used.
import type { Approach, AssessmentResult } from '../schemas/assessment';
import { convertDistanceKm, DISTANCE_UNITS, type DistanceUnit } from '../format';
import { esc, n2, niceTicks, PLOT_COLORS as C, tickLabel } from './svg';
import { BODY_RADIUS_KM, bodyName } from './bplane';

/** GM (km^3/s^2) of the bodies close approaches are reported for: DE440 (Park et al. 2021), as in server/engine/constants.ts. */
export const BODY_GM_KM3_S2: Record<string, number> = {
  mercury: 2.2031868551400003e4,
  venus: 3.24858592e5,
  earth: 3.9860043550702266e5,
  moon: 4.9028001184575496e3,
  mars: 4.2828375815756102e4,
  jupiter: 1.2671276409999998e8,
  saturn: 3.7940584841799997e7,
  uranus: 5.7945563999999985e6,
  neptune: 6.8365271005803989e6,
};

/**
 * Distance (km) at time `dtS` seconds from periapsis on a planet-centred hyperbola with periapsis `qKm`,
 * excess speed `vInfKmS` and planet GM `muKm3S2`.
 */
export function hyperbolaDistanceKm(qKm: number, vInfKmS: number, muKm3S2: number, dtS: number): number {
  const aAbs = muKm3S2 / (vInfKmS * vInfKmS);
  const e = 1 + qKm / aAbs;
  const n = Math.sqrt(muKm3S2 / (aAbs * aAbs * aAbs));
  const M = Math.abs(n * dtS);
  if (M === 0) return qKm;
  // Solve e sinh H - H = M (H >= 0) by Newton from H0 = asinh(M/e), where f < 0; f is convex for H > 0, so
  // the first step lands right of the root and the iteration then decreases monotonically onto it.
  let H = Math.asinh(M / e);
  for (let i = 0; i < 60; i++) {
    const f = e * Math.sinh(H) - H - M;
    const fp = e * Math.cosh(H) - 1;
    const step = f / fp;
    H -= step;
    if (H < 0) H = 1e-12;
    if (Math.abs(step) < 1e-13 * Math.max(1, H)) break;
  }
  return aAbs * (e * Math.cosh(H) - 1);
}

export type DistanceSeries = {
  body: string;
  /** Hours from the nominal closest approach. */
  tHours: number[];
  nominalKm: number[];
  /** 3-sigma band (null when the approach has no linear data). */
  lowKm: number[] | null;
  highKm: number[] | null;
  centreTdbJd: number;
  centreUtc: string;
  planetRadiusKm: number | null;
  /** How the series was made (shown with the plot). */
  method: string;
};

export type DistanceSeriesOptions = {
  /** Half-width of the time window, hours. Default: chosen so the nominal distance at the edges is ~10x periapsis, 6 h to 5 d. */
  halfWindowHours?: number;
  /** Number of samples (default 241). */
  samples?: number;
};

function defaultHalfWindowHours(a: Approach, mu: number | undefined): number {
  const v = a.vInfinityKmS ?? a.relativeSpeedKmS;
  const q = Math.max(a.distanceKm, 1);
  // time to cover ~10 q at v, or the band's time spread, whichever is larger; clamped.
  const sigmaH = a.encounterTime ? (3 * a.encounterTime.sigmaSeconds) / 3600 : 0;
  const h = Math.max((10 * q) / Math.max(v, 0.1) / 3600, 2 * sigmaH);
  void mu;
  return Math.min(120, Math.max(6, h));
}

/** The nominal curve and its 3-sigma band around approach `approachIndex` (derivation in the header comment). */
export function distanceSeries(result: AssessmentResult, approachIndex: number, opts: DistanceSeriesOptions = {}): DistanceSeries {
  const a = result.approaches[approachIndex];
  if (!a) throw new RangeError(`approach ${approachIndex} does not exist (the result has ${result.approaches.length})`);
  const mu = BODY_GM_KM3_S2[a.body];
  const half = opts.halfWindowHours ?? defaultHalfWindowHours(a, mu);
  const n = Math.max(3, opts.samples ?? 241);
  const hyper = mu !== undefined && a.vInfinityKmS !== null && a.vInfinityKmS > 0;
  const r = (q: number, dtS: number) =>
    hyper ? hyperbolaDistanceKm(Math.max(q, 1e-3), a.vInfinityKmS!, mu!, dtS) : Math.hypot(q, a.relativeSpeedKmS * dtS);
  const range = a.distanceRangeKm?.threeSigma ?? null;
  const sigT = a.encounterTime ? 3 * a.encounterTime.sigmaSeconds : 0;
  const Q_SAMPLES = 24;
  const qs = range ? [a.distanceKm, ...Array.from({ length: Q_SAMPLES + 1 }, (_, k) => range[0] + ((range[1] - range[0]) * k) / Q_SAMPLES)] : [];
  const tHours: number[] = [], nominalKm: number[] = [], lowKm: number[] = [], highKm: number[] = [];
  for (let i = 0; i < n; i++) {
    const h = -half + (2 * half * i) / (n - 1);
    const dt = h * 3600;
    tHours.push(h);
    nominalKm.push(r(a.distanceKm, dt));
    if (range) {
      // r grows with |dt| for each q, but not always with q (far from periapsis a near-radial path lags behind a
      // wider one), so the envelope is taken over a set of q values spanning the range, the nominal included.
      let lo = Infinity, hi = -Infinity;
      for (const q of qs) {
        lo = Math.min(lo, r(q, Math.max(0, Math.abs(dt) - sigT)));
        hi = Math.max(hi, r(q, Math.abs(dt) + sigT));
      }
      lowKm.push(lo);
      highKm.push(hi);
    }
  }
  const method = hyper
    ? `planet-centred two-body hyperbola from the linear data (q = nominal distance, v∞ = ${a.vInfinityKmS!.toFixed(2)} km/s); band: 3σ distance range and ±3σ encounter time`
    : `straight line at the relative speed (${a.relativeSpeedKmS.toFixed(2)} km/s): no v-infinity for this approach`;
  const caveat = a.linearValidity?.valid === false ? ' (linear method NOT validated at this approach: the band is indicative only)' : '';
  return {
    body: a.body,
    tHours,
    nominalKm,
    lowKm: range ? lowKm : null,
    highKm: range ? highKm : null,
    centreTdbJd: a.epochTdbJd,
    centreUtc: a.utc,
    planetRadiusKm: BODY_RADIUS_KM[a.body] ?? null,
    method: range ? method + caveat : method.replace(/; band:.*$/, '') + ' (no linear spread at this approach)',
  };
}

export type DistanceSvgOptions = DistanceSeriesOptions & {
  width?: number;
  height?: number;
  unit?: DistanceUnit;
  title?: string;
  caption?: string;
};

/** SVG string of the distance to the body against time around approach `approachIndex`. */
export function distanceSvg(result: AssessmentResult, approachIndex: number, opts: DistanceSvgOptions = {}): string {
  const width = opts.width ?? 720;
  const height = opts.height ?? 400;
  const unit = opts.unit ?? 'km';
  const s = distanceSeries(result, approachIndex, opts);
  const a = result.approaches[approachIndex];
  const title = opts.title ?? `Distance from ${bodyName(a.body)}: ${result.object}, closest approach ${a.utc.slice(0, 16).replace('T', ' ')} UTC`;
  const box = { x: 84, y: 40, w: width - 84 - 20, h: height - 40 - 96 };
  const conv = (km: number) => convertDistanceKm(km, unit);
  const ys = [...s.nominalKm, ...(s.lowKm ?? []), ...(s.highKm ?? [])].map(conv);
  if (s.planetRadiusKm !== null) ys.push(conv(s.planetRadiusKm));
  const yMin = 0;
  const yMax = Math.max(...ys) * 1.05 || 1;
  const tMin = s.tHours[0], tMax = s.tHours[s.tHours.length - 1];
  const X = (h: number) => box.x + ((h - tMin) / (tMax - tMin)) * box.w;
  const Y = (v: number) => box.y + box.h - ((v - yMin) / (yMax - yMin)) * box.h;
  const p: string[] = [];
  p.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="Helvetica, Arial, sans-serif" font-size="12">`,
    `<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`,
    `<text x="${n2(width / 2)}" y="22" text-anchor="middle" font-size="14" font-weight="bold" fill="${C.text}">${esc(title)}</text>`,
    `<rect data-role="plot-area" x="${n2(box.x)}" y="${n2(box.y)}" width="${n2(box.w)}" height="${n2(box.h)}" fill="#f8fafc" stroke="${C.axis}"/>`,
  );
  for (const t of niceTicks(tMin, tMax, 8)) {
    const x = X(t);
    p.push(`<line x1="${n2(x)}" y1="${n2(box.y)}" x2="${n2(x)}" y2="${n2(box.y + box.h)}" stroke="${C.grid}"/>`);
    p.push(`<text x="${n2(x)}" y="${n2(box.y + box.h + 16)}" text-anchor="middle" fill="${C.text}">${esc(tickLabel(t))}</text>`);
  }
  for (const t of niceTicks(yMin, yMax, 6)) {
    const y = Y(t);
    p.push(`<line x1="${n2(box.x)}" y1="${n2(y)}" x2="${n2(box.x + box.w)}" y2="${n2(y)}" stroke="${C.grid}"/>`);
    p.push(`<text x="${n2(box.x - 6)}" y="${n2(y + 4)}" text-anchor="end" fill="${C.text}">${esc(tickLabel(t))}</text>`);
  }
  p.push(`<text x="${n2(box.x + box.w / 2)}" y="${n2(box.y + box.h + 34)}" text-anchor="middle" fill="${C.text}">hours from the nominal closest approach (0 h = ${esc(a.utc.slice(0, 19).replace('T', ' '))} UTC = JD ${esc(a.epochTdbJd.toFixed(5))} TDB)</text>`);
  p.push(`<text transform="translate(18 ${n2(box.y + box.h / 2)}) rotate(-90)" text-anchor="middle" fill="${C.text}">distance (${esc(DISTANCE_UNITS[unit].label)})</text>`);
  if (s.lowKm && s.highKm) {
    const up = s.tHours.map((t, i) => `${i === 0 ? 'M' : 'L'}${n2(X(t))} ${n2(Y(conv(s.highKm![i])))}`).join('');
    const down = s.tHours
      .map((t, i) => [t, i] as const)
      .reverse()
      .map(([t, i]) => `L${n2(X(t))} ${n2(Y(conv(s.lowKm![i])))}`)
      .join('');
    p.push(`<path data-role="band" d="${up}${down}Z" fill="${C.band}" stroke="none"/>`);
  }
  if (s.planetRadiusKm !== null) {
    const y = Y(conv(s.planetRadiusKm));
    p.push(`<line data-role="surface" x1="${n2(box.x)}" y1="${n2(y)}" x2="${n2(box.x + box.w)}" y2="${n2(y)}" stroke="${C.capture}" stroke-dasharray="5 3"/>`);
    p.push(`<text x="${n2(box.x + box.w - 4)}" y="${n2(y - 4)}" text-anchor="end" font-size="10" fill="${C.capture}">${esc(bodyName(a.body))} surface</text>`);
  }
  const nom = s.tHours.map((t, i) => `${i === 0 ? 'M' : 'L'}${n2(X(t))} ${n2(Y(conv(s.nominalKm[i])))}`).join('');
  p.push(`<path data-role="nominal" d="${nom}" fill="none" stroke="${C.nominal}" stroke-width="1.8"/>`);
  const ly = box.y + box.h + 54;
  p.push(
    `<text x="${n2(box.x)}" y="${n2(ly)}" fill="${C.text}"><tspan fill="${C.nominal}">—</tspan> nominal${s.lowKm ? `   <tspan fill="${C.sigma1}">■</tspan> 3σ spread` : ''}</text>`,
  );
  // The method note, wrapped to the plot width (about 5.2 px per character at 10 px).
  const maxChars = Math.max(40, Math.floor(box.w / 5.2));
  const words = s.method.split(' ');
  const lines: string[] = [''];
  for (const w of words) {
    if ((lines[lines.length - 1] + ' ' + w).trim().length > maxChars) lines.push(w);
    else lines[lines.length - 1] = (lines[lines.length - 1] + ' ' + w).trim();
  }
  lines.slice(0, 2).forEach((line, i) => p.push(`<text x="${n2(box.x)}" y="${n2(ly + 14 + 12 * i)}" font-size="10" fill="${C.muted}">${esc(line)}</text>`));
  if (opts.caption) p.push(`<text x="${n2(box.x)}" y="${n2(height - 6)}" font-size="10" fill="${C.muted}">${esc(opts.caption)}</text>`);
  p.push('</svg>');
  return p.join('\n');
}
