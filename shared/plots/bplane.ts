// The b-plane of one close approach as a standalone SVG string (pure; used on the server for PDFs and exports and
// by the client for downloads). Axes xi (horizontal) and zeta (vertical, up) in the planet-centred b-plane, drawn
// with ONE scale on both axes so the capture disk is a true circle to scale.
// Drawn: the capture disk (radius from the engine's captureRadiusKm, gravitational focusing included), the planet's
// physical disk, the nominal b-plane point, the linear 1- and 3-sigma ellipses from bPlaneCovarianceKm2, and the
// Monte Carlo clones' b-plane points when the result carries them (hits in red).
import type { Approach, AssessmentResult, BPlanePoint } from '../schemas/assessment';
import { DISTANCE_UNITS } from '../format';
import { covarianceEllipse, ellipsePoints, esc, n2, niceTicks, PLOT_COLORS as C, tickLabel, type Ellipse } from './svg';

/** Physical radii (km) of the bodies the engine detects impacts on (same values as server/engine/constants.ts). */
export const BODY_RADIUS_KM: Record<string, number> = { earth: 6378.137, moon: 1737.4, venus: 6051.8, mars: 3396.19 };

export type BPlaneUnit = 'km' | 're';

/** "earth" -> "Earth". */
export function bodyName(body: string): string {
  return body.charAt(0).toUpperCase() + body.slice(1);
}

export type BPlaneSvgOptions = {
  width?: number;
  height?: number;
  /** Axis unit: km or Earth radii (6378.137 km). Default km. */
  unit?: BPlaneUnit;
  /**
   * 'fit': everything (ellipses, points, capture disk) in view; 'capture': centred on the planet, a few capture
   * radii wide (the nominal point included). Or explicit bounds in km. Default 'fit'.
   */
  view?: 'fit' | 'capture' | { xiMinKm: number; xiMaxKm: number; zetaMinKm: number; zetaMaxKm: number };
  /** Most Monte Carlo points drawn (default 5000; the first ones, hits always kept). */
  maxPoints?: number;
  /** Title line (default: "b-plane: <object>, <body> <utc date>"). */
  title?: string;
  /** Provenance caption under the plot (e.g. "Run 12 · solution v2 · linear"). */
  caption?: string;
};

export type BPlaneData = {
  approach: Approach;
  body: string;
  captureRadiusKm: number | null;
  planetRadiusKm: number | null;
  nominal: { xiKm: number; zetaKm: number } | null;
  sigma1: Ellipse | null;
  sigma3: Ellipse | null;
  points: BPlanePoint[];
};

/** Everything the b-plane plots draw, from one approach of the result. */
export function bPlaneData(result: AssessmentResult, approachIndex: number): BPlaneData {
  const a = result.approaches[approachIndex];
  if (!a) throw new RangeError(`approach ${approachIndex} does not exist (the result has ${result.approaches.length})`);
  const cov = a.bPlaneCovarianceKm2 ?? null;
  return {
    approach: a,
    body: a.body,
    captureRadiusKm: a.captureRadiusKm ?? null,
    planetRadiusKm: BODY_RADIUS_KM[a.body] ?? null,
    nominal: a.bPlane ? { xiKm: a.bPlane.xiKm, zetaKm: a.bPlane.zetaKm } : null,
    sigma1: cov ? covarianceEllipse(cov, 1) : null,
    sigma3: cov ? covarianceEllipse(cov, 3) : null,
    points: a.monteCarloBPlanePoints ?? [],
  };
}

export type BPlaneBounds = { xiMinKm: number; xiMaxKm: number; zetaMinKm: number; zetaMaxKm: number };

/** Bounds (km) of a view of the data, before the equal-scale adjustment. */
export function bPlaneBounds(d: BPlaneData, view: BPlaneSvgOptions['view'] = 'fit'): BPlaneBounds {
  if (view && typeof view === 'object') return view;
  const xs: number[] = [];
  const ys: number[] = [];
  const add = (x: number, y: number) => {
    if (Number.isFinite(x) && Number.isFinite(y)) {
      xs.push(x);
      ys.push(y);
    }
  };
  const rc = d.captureRadiusKm ?? d.planetRadiusKm ?? 0;
  add(-rc, -rc);
  add(rc, rc);
  if (d.nominal) add(d.nominal.xiKm, d.nominal.zetaKm);
  if (view === 'capture') {
    const r = Math.max(3 * rc, d.nominal ? 1.15 * Math.hypot(d.nominal.xiKm, d.nominal.zetaKm) : 0, 1);
    return { xiMinKm: -r, xiMaxKm: r, zetaMinKm: -r, zetaMaxKm: r };
  }
  if (d.nominal && d.sigma3) for (const [x, y] of ellipsePoints(d.nominal.xiKm, d.nominal.zetaKm, d.sigma3, 72)) add(x, y);
  for (const p of d.points) add(p.xiKm, p.zetaKm);
  let x0 = Math.min(...xs), x1 = Math.max(...xs), y0 = Math.min(...ys), y1 = Math.max(...ys);
  const padX = 0.06 * (x1 - x0 || 1), padY = 0.06 * (y1 - y0 || 1);
  x0 -= padX; x1 += padX; y0 -= padY; y1 += padY;
  return { xiMinKm: x0, xiMaxKm: x1, zetaMinKm: y0, zetaMaxKm: y1 };
}

export type BPlaneLayout = {
  width: number;
  height: number;
  /** Plot box in SVG pixels. */
  box: { x: number; y: number; w: number; h: number };
  /** Pixels per km (same on both axes). */
  pxPerKm: number;
  /** Data bounds shown (km), after widening one axis for the equal scale. */
  bounds: BPlaneBounds;
  toX(xiKm: number): number;
  toY(zetaKm: number): number;
};

/** Plot box and the single scale (px per km) for bounds in a width x height picture. */
export function bPlaneLayout(bounds: BPlaneBounds, width = 640, height = 640): BPlaneLayout {
  const box = { x: 78, y: 44, w: width - 78 - 20, h: height - 44 - 92 };
  const dx = bounds.xiMaxKm - bounds.xiMinKm || 1;
  const dy = bounds.zetaMaxKm - bounds.zetaMinKm || 1;
  const pxPerKm = Math.min(box.w / dx, box.h / dy);
  const cx = (bounds.xiMinKm + bounds.xiMaxKm) / 2, cy = (bounds.zetaMinKm + bounds.zetaMaxKm) / 2;
  const hx = box.w / pxPerKm / 2, hy = box.h / pxPerKm / 2;
  const b: BPlaneBounds = { xiMinKm: cx - hx, xiMaxKm: cx + hx, zetaMinKm: cy - hy, zetaMaxKm: cy + hy };
  return {
    width,
    height,
    box,
    pxPerKm,
    bounds: b,
    toX: (xi) => box.x + (xi - b.xiMinKm) * pxPerKm,
    toY: (zeta) => box.y + box.h - (zeta - b.zetaMinKm) * pxPerKm,
  };
}

function unitKm(unit: BPlaneUnit): number {
  return unit === 're' ? DISTANCE_UNITS.re.km : 1;
}

/** Keep at most `max` points: every hit, then misses evenly thinned. */
export function thinPoints(points: BPlanePoint[], max: number): BPlanePoint[] {
  if (points.length <= max) return points;
  const hits = points.filter((p) => p.impact);
  const misses = points.filter((p) => !p.impact);
  const room = Math.max(0, max - hits.length);
  const step = misses.length / Math.max(1, room);
  const kept: BPlanePoint[] = [];
  for (let i = 0; i < room && Math.floor(i * step) < misses.length; i++) kept.push(misses[Math.floor(i * step)]);
  return [...kept, ...hits];
}

/**
 * SVG string of the b-plane of approach `approachIndex` of an assess result.
 * Elements carry data-role attributes (plot-area, capture-disk, planet-disk, sigma1, sigma3, nominal, mc-point) so
 * tests and scripts can find them.
 */
export function bPlaneSvg(result: AssessmentResult, approachIndex: number, opts: BPlaneSvgOptions = {}): string {
  const width = opts.width ?? 640;
  const height = opts.height ?? 640;
  const unit = opts.unit ?? 'km';
  const d = bPlaneData(result, approachIndex);
  const a = d.approach;
  const title = opts.title ?? `b-plane: ${result.object}, ${bodyName(a.body)} encounter ${a.utc.slice(0, 10)}`;
  const parts: string[] = [];
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="Helvetica, Arial, sans-serif" font-size="12">`,
    `<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`,
    `<text x="${n2(width / 2)}" y="22" text-anchor="middle" font-size="14" font-weight="bold" fill="${C.text}">${esc(title)}</text>`,
  );
  if (!d.nominal) {
    parts.push(
      `<text x="${n2(width / 2)}" y="${n2(height / 2)}" text-anchor="middle" fill="${C.muted}">No b-plane for this approach (the encounter is not hyperbolic relative to ${esc(a.body)}).</text>`,
    );
    if (opts.caption) parts.push(`<text x="${n2(width / 2)}" y="${height - 10}" text-anchor="middle" font-size="10" fill="${C.muted}">${esc(opts.caption)}</text>`);
    parts.push('</svg>');
    return parts.join('\n');
  }
  const L = bPlaneLayout(bPlaneBounds(d, opts.view), width, height);
  const { box } = L;
  const u = unitKm(unit);
  const uLabel = unit === 're' ? 'Earth radii' : 'km';
  const clipId = `bp-clip-${approachIndex}`;
  parts.push(`<defs><clipPath id="${clipId}"><rect x="${n2(box.x)}" y="${n2(box.y)}" width="${n2(box.w)}" height="${n2(box.h)}"/></clipPath></defs>`);
  parts.push(`<rect data-role="plot-area" x="${n2(box.x)}" y="${n2(box.y)}" width="${n2(box.w)}" height="${n2(box.h)}" fill="#f8fafc" stroke="${C.axis}"/>`);

  // Grid and ticks (in the chosen unit).
  const b = L.bounds;
  const xt = niceTicks(b.xiMinKm / u, b.xiMaxKm / u, 6);
  const yt = niceTicks(b.zetaMinKm / u, b.zetaMaxKm / u, 6);
  for (const t of xt) {
    const x = L.toX(t * u);
    if (x < box.x - 0.5 || x > box.x + box.w + 0.5) continue;
    parts.push(`<line x1="${n2(x)}" y1="${n2(box.y)}" x2="${n2(x)}" y2="${n2(box.y + box.h)}" stroke="${C.grid}"/>`);
    parts.push(`<text x="${n2(x)}" y="${n2(box.y + box.h + 16)}" text-anchor="middle" fill="${C.text}">${esc(tickLabel(t))}</text>`);
  }
  for (const t of yt) {
    const y = L.toY(t * u);
    if (y < box.y - 0.5 || y > box.y + box.h + 0.5) continue;
    parts.push(`<line x1="${n2(box.x)}" y1="${n2(y)}" x2="${n2(box.x + box.w)}" y2="${n2(y)}" stroke="${C.grid}"/>`);
    parts.push(`<text x="${n2(box.x - 6)}" y="${n2(y + 4)}" text-anchor="end" fill="${C.text}">${esc(tickLabel(t))}</text>`);
  }
  parts.push(`<text x="${n2(box.x + box.w / 2)}" y="${n2(box.y + box.h + 34)}" text-anchor="middle" fill="${C.text}">ξ (${esc(uLabel)})</text>`);
  parts.push(
    `<text transform="translate(16 ${n2(box.y + box.h / 2)}) rotate(-90)" text-anchor="middle" fill="${C.text}">ζ (${esc(uLabel)})</text>`,
  );

  parts.push(`<g clip-path="url(#${clipId})">`);
  const ox = L.toX(0), oy = L.toY(0);
  if (d.captureRadiusKm !== null) {
    parts.push(
      `<circle data-role="capture-disk" cx="${n2(ox)}" cy="${n2(oy)}" r="${n2(d.captureRadiusKm * L.pxPerKm)}" fill="${C.captureFill}" stroke="${C.capture}" stroke-width="1.5"/>`,
    );
  }
  if (d.planetRadiusKm !== null) {
    parts.push(`<circle data-role="planet-disk" cx="${n2(ox)}" cy="${n2(oy)}" r="${n2(d.planetRadiusKm * L.pxPerKm)}" fill="none" stroke="${C.planet}" stroke-dasharray="3 2"/>`);
  }
  // Centre mark (always visible, even when the disk is below a pixel).
  parts.push(`<path d="M${n2(ox - 5)} ${n2(oy)}H${n2(ox + 5)}M${n2(ox)} ${n2(oy - 5)}V${n2(oy + 5)}" stroke="${C.planet}" stroke-width="1"/>`);

  const pts = thinPoints(d.points, opts.maxPoints ?? 5000);
  let drawn = 0;
  const dots: string[] = [];
  for (const p of pts) {
    const x = L.toX(p.xiKm), y = L.toY(p.zetaKm);
    if (!(x >= box.x && x <= box.x + box.w && y >= box.y && y <= box.y + box.h)) continue;
    drawn++;
    dots.push(`<circle data-role="mc-point" cx="${n2(x)}" cy="${n2(y)}" r="${p.impact ? 2.2 : 1.3}" fill="${p.impact ? C.mcHit : C.mcMiss}"/>`);
  }
  parts.push(...dots);
  const ellipsePath = (e: Ellipse) =>
    ellipsePoints(d.nominal!.xiKm, d.nominal!.zetaKm, e, 240)
      .map(([x, y], i) => `${i === 0 ? 'M' : 'L'}${n2(L.toX(x))} ${n2(L.toY(y))}`)
      .join('') + 'Z';
  if (d.sigma3) parts.push(`<path data-role="sigma3" d="${ellipsePath(d.sigma3)}" fill="none" stroke="${C.sigma3}" stroke-width="1.5" stroke-dasharray="6 3"/>`);
  if (d.sigma1) parts.push(`<path data-role="sigma1" d="${ellipsePath(d.sigma1)}" fill="none" stroke="${C.sigma1}" stroke-width="1.8"/>`);
  const nx = L.toX(d.nominal.xiKm), ny = L.toY(d.nominal.zetaKm);
  parts.push(`<circle data-role="nominal" cx="${n2(nx)}" cy="${n2(ny)}" r="3.5" fill="${C.nominal}"/>`);
  parts.push('</g>');

  // Legend (below the plot box).
  const ly = box.y + box.h + 52;
  const legend: string[] = [];
  if (d.captureRadiusKm !== null) legend.push(`<tspan fill="${C.capture}">●</tspan> capture disk r = ${esc(tickLabel(Math.round(d.captureRadiusKm)))} km`);
  if (d.sigma1) legend.push(`<tspan fill="${C.sigma1}">—</tspan> linear 1σ`);
  if (d.sigma3) legend.push(`<tspan fill="${C.sigma3}">- -</tspan> linear 3σ`);
  legend.push(`<tspan fill="${C.nominal}">●</tspan> nominal`);
  if (d.points.length) legend.push(`<tspan fill="${C.mcMiss}">●</tspan> Monte Carlo (${drawn} of ${d.points.length} shown)`);
  parts.push(`<text x="${n2(box.x)}" y="${n2(ly)}" fill="${C.text}">${legend.join('   ')}</text>`);
  if (!d.sigma1) parts.push(`<text x="${n2(box.x)}" y="${n2(ly + 16)}" fill="${C.muted}">No linear covariance at this approach: ellipses not drawn.</text>`);
  if (opts.caption) parts.push(`<text x="${n2(box.x)}" y="${n2(height - 8)}" font-size="10" fill="${C.muted}">${esc(opts.caption)}</text>`);
  parts.push('</svg>');
  return parts.join('\n');
}
