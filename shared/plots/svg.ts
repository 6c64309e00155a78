// Small helpers for Tocsin's pure SVG renderers (shared/plots): escaping, number printing, "nice" axis ticks,
// 2x2 covariance ellipses. No DOM; the output is a standalone SVG string (server PDFs, downloads, the client).

/** Escape text for SVG/XML content and attribute values. */
export function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** A coordinate printed with 2 decimals (keeps files small and byte-stable). */
export function n2(x: number): string {
  const s = (Math.round(x * 100) / 100).toFixed(2);
  return s === '-0.00' ? '0.00' : s;
}

/** About `count` round tick values covering [lo, hi] (1, 2, 5 x 10^k steps). */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [lo];
  const raw = (hi - lo) / Math.max(1, count);
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const norm = raw / mag;
  const step = (norm <= 1 ? 1 : norm <= 2 ? 2 : norm <= 5 ? 5 : 10) * mag;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** Tick label: compact, exponent form for very large/small values. */
export function tickLabel(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) return v.toExponential(1).replace('e+', 'e');
  const s = Number(v.toPrecision(6)).toString();
  return a >= 1000 ? s.replace(/\B(?=(\d{3})+(?!\d))/g, ',') : s;
}

export type Ellipse = {
  /** Semi-axes, same unit as the covariance's square root. */
  semiMajor: number;
  semiMinor: number;
  /** Angle of the major axis from the +x axis, radians (counter-clockwise). */
  angleRad: number;
};

/** The k-sigma ellipse of a 2x2 covariance [[sxx, sxy], [sxy, syy]] (eigen-decomposition, closed form). */
export function covarianceEllipse(cov: readonly (readonly number[])[], k: number): Ellipse | null {
  const sxx = cov?.[0]?.[0], sxy = cov?.[0]?.[1], syy = cov?.[1]?.[1];
  if (![sxx, sxy, syy].every((x) => typeof x === 'number' && Number.isFinite(x))) return null;
  const tr = sxx + syy;
  const det = sxx * syy - sxy * sxy;
  const disc = Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
  const l1 = tr / 2 + disc;
  const l2 = Math.max(0, tr / 2 - disc);
  if (!(l1 > 0)) return null;
  const angleRad = 0.5 * Math.atan2(2 * sxy, sxx - syy);
  return { semiMajor: k * Math.sqrt(l1), semiMinor: k * Math.sqrt(l2), angleRad };
}

/** Points of an ellipse centred at (cx, cy), `segments` + 1 points (closed). */
export function ellipsePoints(cx: number, cy: number, e: Ellipse, segments = 180): [number, number][] {
  const out: [number, number][] = [];
  const c = Math.cos(e.angleRad), s = Math.sin(e.angleRad);
  for (let i = 0; i <= segments; i++) {
    const t = (2 * Math.PI * i) / segments;
    const x = e.semiMajor * Math.cos(t), y = e.semiMinor * Math.sin(t);
    out.push([cx + c * x - s * y, cy + s * x + c * y]);
  }
  return out;
}

/** Common colours of Tocsin plots (screen and print). */
export const PLOT_COLORS = {
  axis: '#334155',
  grid: '#e2e8f0',
  text: '#0f172a',
  muted: '#64748b',
  capture: '#dc2626',
  captureFill: 'rgba(220,38,38,0.12)',
  planet: '#1d4ed8',
  sigma1: '#7c3aed',
  sigma3: '#a78bfa',
  nominal: '#0f172a',
  mcMiss: 'rgba(14,116,144,0.55)',
  mcHit: '#dc2626',
  band: 'rgba(124,58,237,0.18)',
} as const;
