// Astrometric residuals of one orbit fit against time, as a pure point series and a standalone SVG string (the
// fit page, downloads, server PDFs). METHODS.md §9.1: residuals are observed minus computed, the RA residual
// multiplied by cos(dec), in arcseconds.
//
// Layout: two panels sharing the time axis (UTC dates), RA·cos(dec) on top and Dec below, each with a zero line.
// Points are coloured by observatory (one colour per station code, the same colour for a code in every plot made
// with the same `stations` list), and drawn by status:
//  - used:     filled circle in the station colour;
//  - rejected: a cross in the station colour (rejected by the chi-square rule of the fit, METHODS.md §9.1);
//  - excluded: hollow grey circle (kept out of the fit by the analyst).
// Optional ±1-sigma error bars use the weights the fit used. Points outside a forced vertical range are drawn as a
// small triangle on the panel edge, pointing the way they lie, so a zoom never hides that they exist.
// Optionally a line through the nightly means of the used points makes a systematic trend (a gravity-only fit of an
// object pushed by outgassing) stand out from the noise.
// Two fits compared side by side use the same `timeRangeMs`, `yMaxArcsec` and `stations` so they read alike.
import type { Residual } from '../schemas/od';
import { esc, n2, niceTicks, PLOT_COLORS as C, tickLabel } from './svg';

/** Station colours in order of assignment: distinct hues that stay apart in print and for common colour-vision deficiencies as far as 10 colours allow. */
export const STATION_COLORS = ['#1d4ed8', '#c2410c', '#15803d', '#a21caf', '#0e7490', '#b45309', '#be123c', '#4d7c0f', '#6d28d9', '#0f766e'] as const;
export const EXCLUDED_COLOR = '#94a3b8';

export type ResidualStatus = 'used' | 'rejected' | 'excluded';

export type ResidualPoint = {
  index: number;
  line: number;
  stn: string;
  obsTime: string;
  /** UTC instant, ms since 1970 (from obsTime). */
  timeMs: number;
  raCosDecArcsec: number;
  decArcsec: number;
  sigmaRaArcsec: number;
  sigmaDecArcsec: number;
  chiSquare: number;
  status: ResidualStatus;
};

/**
 * The plotted points of a fit's residuals. `excluded(r)` marks residuals of observations the analyst excluded
 * (drawn greyed whatever the fit's own status).
 */
export function residualPoints(residuals: readonly Residual[], excluded?: (r: Residual) => boolean): ResidualPoint[] {
  return residuals.map((r) => {
    const timeMs = Date.parse(r.obsTime);
    if (!Number.isFinite(timeMs)) throw new RangeError(`residual of line ${r.line}: obsTime "${r.obsTime}" is not a valid ISO 8601 instant`);
    return {
      index: r.index,
      line: r.line,
      stn: r.stn,
      obsTime: r.obsTime,
      timeMs,
      raCosDecArcsec: r.raCosDecArcsec,
      decArcsec: r.decArcsec,
      sigmaRaArcsec: r.sigmaRaArcsec,
      sigmaDecArcsec: r.sigmaDecArcsec,
      chiSquare: r.chiSquare,
      status: excluded?.(r) ? 'excluded' : r.status,
    };
  });
}

/** Station code -> colour, codes sorted so two plots of the same arc colour a station alike. */
export function stationColors(stations: readonly string[]): Record<string, string> {
  const codes = [...new Set(stations)].sort();
  const out: Record<string, string> = {};
  codes.forEach((c, i) => {
    out[c] = STATION_COLORS[i % STATION_COLORS.length];
  });
  return out;
}

/** Smallest symmetric range ±yMax (arcsec) holding every point (with its 1-sigma bar when `errorBars`), 5% margin. */
export function residualRangeArcsec(points: readonly ResidualPoint[], opts: { errorBars?: boolean; statuses?: readonly ResidualStatus[] } = {}): number {
  const keep = opts.statuses ?? ['used', 'rejected', 'excluded'];
  let m = 0;
  for (const p of points) {
    if (!keep.includes(p.status)) continue;
    m = Math.max(m, Math.abs(p.raCosDecArcsec) + (opts.errorBars ? p.sigmaRaArcsec : 0), Math.abs(p.decArcsec) + (opts.errorBars ? p.sigmaDecArcsec : 0));
  }
  return m > 0 ? m * 1.05 : 1;
}

const DAY_MS = 86_400_000;

export type NightMean = { timeMs: number; raCosDecArcsec: number; decArcsec: number; count: number };

/**
 * Mean residual of each night's used points: points (time-sorted) closer than `gapHours` (default 8 h) to the
 * previous one belong to the same night. A line through these means shows a systematic trend through the noise.
 */
export function nightMeans(points: readonly ResidualPoint[], gapHours = 8): NightMean[] {
  const used = points.filter((p) => p.status === 'used').sort((a, b) => a.timeMs - b.timeMs);
  const out: NightMean[] = [];
  let group: ResidualPoint[] = [];
  const flush = () => {
    if (!group.length) return;
    const n = group.length;
    out.push({
      timeMs: group.reduce((s, p) => s + p.timeMs, 0) / n,
      raCosDecArcsec: group.reduce((s, p) => s + p.raCosDecArcsec, 0) / n,
      decArcsec: group.reduce((s, p) => s + p.decArcsec, 0) / n,
      count: n,
    });
    group = [];
  };
  for (const p of used) {
    if (group.length && p.timeMs - group[group.length - 1].timeMs > gapHours * 3_600_000) flush();
    group.push(p);
  }
  flush();
  return out;
}

/** Tick instants (UTC ms) for a date axis: whole days, or the first of a month, or of a year, about `count` of them. */
export function dateTicks(minMs: number, maxMs: number, count = 6): number[] {
  if (!(maxMs > minMs)) return [minMs];
  const spanDays = (maxMs - minMs) / DAY_MS;
  // whole-day steps on arcs up to about six weeks; longer arcs read better on month boundaries
  const dayStep = spanDays <= 45 ? [1, 2, 5, 7, 10, 15].find((s) => spanDays / s <= count) : undefined;
  const out: number[] = [];
  if (dayStep !== undefined) {
    const start = Math.ceil(minMs / DAY_MS) * DAY_MS;
    for (let t = start; t <= maxMs; t += dayStep * DAY_MS) out.push(t);
    return out;
  }
  const monthStep = [1, 2, 3, 6, 12, 24, 60].find((s) => spanDays / (30.44 * s) <= count) ?? 120;
  const d = new Date(minMs);
  let y = d.getUTCFullYear();
  let mo = d.getUTCMonth();
  // first month boundary at or after minMs that is a multiple of the step (months from January)
  for (;;) {
    const t = Date.UTC(y, mo, 1);
    if (t >= minMs && mo % Math.min(monthStep, 12) === 0 && (monthStep < 12 || y % (monthStep / 12) === 0)) break;
    mo += 1;
    if (mo === 12) {
      mo = 0;
      y += 1;
    }
  }
  for (;;) {
    const t = Date.UTC(y, mo, 1);
    if (t > maxMs) break;
    out.push(t);
    mo += monthStep;
    y += Math.floor(mo / 12);
    mo %= 12;
  }
  return out;
}

export function dateLabel(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

export type ResidualsSvgOptions = {
  width?: number;
  height?: number;
  title?: string;
  caption?: string;
  /** Draw ±1-sigma bars (default false). */
  errorBars?: boolean;
  /** Draw the nightly means of the used points joined by a line (default false): shows a trend through the noise. */
  nightMeans?: boolean;
  /** Observations the analyst excluded (drawn greyed). */
  excluded?: (r: Residual) => boolean;
  /** Station codes for the colours and the legend (default: those in `residuals`); share it between plots compared side by side. */
  stations?: readonly string[];
  /** Half-height of both panels, arcsec (default: every point fits). Points beyond are drawn as edge markers. */
  yMaxArcsec?: number;
  /** Time range of the axis, UTC ms (default: the residuals' first and last instants, 2% margin). */
  timeRangeMs?: [number, number];
};

/** Width of one legend entry, px (the longest label, "excluded by the analyst", is about 150 px at 12 px). */
const LEGEND_SLOT = 160;

type Box = { x: number; y: number; w: number; h: number };

/** SVG string of a fit's residuals: RA·cos(dec) and Dec panels against UTC date (see the header comment). */
export function residualsSvg(residuals: readonly Residual[], opts: ResidualsSvgOptions = {}): string {
  const width = opts.width ?? 760;
  const height = opts.height ?? 520;
  const errorBars = opts.errorBars ?? false;
  const points = residualPoints(residuals, opts.excluded);
  const colors = stationColors(opts.stations ?? points.map((p) => p.stn));
  const yMax = opts.yMaxArcsec !== undefined && opts.yMaxArcsec > 0 ? opts.yMaxArcsec : residualRangeArcsec(points, { errorBars });
  let [tMin, tMax] = opts.timeRangeMs ?? [Math.min(...points.map((p) => p.timeMs)), Math.max(...points.map((p) => p.timeMs))];
  if (!Number.isFinite(tMin) || !Number.isFinite(tMax)) [tMin, tMax] = [0, DAY_MS];
  if (!opts.timeRangeMs) {
    const pad = Math.max((tMax - tMin) * 0.02, DAY_MS / 2);
    tMin -= pad;
    tMax += pad;
  }
  const stationCodes = Object.keys(colors);
  const perRow = Math.max(1, Math.floor((width - 84) / LEGEND_SLOT));
  const legendRows = Math.ceil((stationCodes.length + 3 + (opts.nightMeans ? 1 : 0)) / perRow);
  const top = opts.title === '' ? 16 : 40;
  const bottom = 52 + 16 * legendRows + (opts.caption ? 14 : 0);
  const gap = 28;
  const panelH = (height - top - bottom - gap) / 2;
  const boxes: Record<'ra' | 'dec', Box> = {
    ra: { x: 72, y: top, w: width - 72 - 16, h: panelH },
    dec: { x: 72, y: top + panelH + gap, w: width - 72 - 16, h: panelH },
  };
  const X = (t: number) => boxes.ra.x + ((t - tMin) / (tMax - tMin)) * boxes.ra.w;
  const Yof = (b: Box) => (v: number) => b.y + b.h / 2 - (v / yMax) * (b.h / 2);
  const p: string[] = [];
  const label = `${opts.title || 'Residuals'}: RA·cos(Dec) and Dec residuals in arcseconds against time, ${points.length} observations`;
  p.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="Helvetica, Arial, sans-serif" font-size="12" role="img" aria-label="${esc(label)}">`,
    `<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`,
  );
  if (opts.title !== '') {
    const title = opts.title ?? 'Residuals (observed − computed)';
    p.push(`<text x="${n2(width / 2)}" y="22" text-anchor="middle" font-size="14" font-weight="bold" fill="${C.text}">${esc(title)}</text>`);
  }
  const yTicks = niceTicks(-yMax, yMax, 6).filter((v) => Math.abs(v) <= yMax * (1 + 1e-9));
  const xTicks = dateTicks(tMin, tMax, Math.max(3, Math.floor(boxes.ra.w / 85)));
  for (const [panel, label] of [
    ['ra', 'RA·cos(Dec) (″)'],
    ['dec', 'Dec (″)'],
  ] as const) {
    const b = boxes[panel];
    const Y = Yof(b);
    p.push(`<g data-panel="${panel}">`);
    p.push(`<rect data-role="plot-area" x="${n2(b.x)}" y="${n2(b.y)}" width="${n2(b.w)}" height="${n2(b.h)}" fill="#f8fafc" stroke="${C.axis}"/>`);
    for (const t of xTicks) {
      const x = X(t);
      p.push(`<line x1="${n2(x)}" y1="${n2(b.y)}" x2="${n2(x)}" y2="${n2(b.y + b.h)}" stroke="${C.grid}"/>`);
      if (panel === 'dec') p.push(`<text data-role="x-tick" data-ms="${t}" x="${n2(x)}" y="${n2(b.y + b.h + 15)}" text-anchor="middle" fill="${C.text}">${esc(dateLabel(t))}</text>`);
    }
    for (const v of yTicks) {
      const y = Y(v);
      if (v !== 0) p.push(`<line x1="${n2(b.x)}" y1="${n2(y)}" x2="${n2(b.x + b.w)}" y2="${n2(y)}" stroke="${C.grid}"/>`);
      p.push(`<text data-role="y-tick" data-value="${v}" x="${n2(b.x - 6)}" y="${n2(y + 4)}" text-anchor="end" fill="${C.text}">${esc(tickLabel(v))}</text>`);
    }
    p.push(`<line data-role="zero" x1="${n2(b.x)}" y1="${n2(Y(0))}" x2="${n2(b.x + b.w)}" y2="${n2(Y(0))}" stroke="${C.axis}" stroke-width="1"/>`);
    p.push(`<text transform="translate(16 ${n2(b.y + b.h / 2)}) rotate(-90)" text-anchor="middle" fill="${C.text}">${esc(label)}</text>`);
    // Draw order: excluded (behind), used, rejected (on top, so an outlier's cross is never hidden).
    const order: ResidualStatus[] = ['excluded', 'used', 'rejected'];
    for (const status of order) {
      for (const pt of points) {
        if (pt.status !== status) continue;
        const v = panel === 'ra' ? pt.raCosDecArcsec : pt.decArcsec;
        const s = panel === 'ra' ? pt.sigmaRaArcsec : pt.sigmaDecArcsec;
        const x = X(pt.timeMs);
        const color = status === 'excluded' ? EXCLUDED_COLOR : (colors[pt.stn] ?? C.muted);
        const tip = `line ${pt.line} · ${pt.stn} · ${pt.obsTime} · ${v.toFixed(3)}″ ± ${s.toFixed(3)}″ · χ² ${pt.chiSquare.toFixed(2)} · ${status}`;
        const common = `data-role="residual" data-status="${status}" data-stn="${esc(pt.stn)}" data-line="${pt.line}" data-value="${v}"`;
        if (Math.abs(v) > yMax) {
          // off the panel: a triangle on the edge pointing outwards
          const yEdge = v > 0 ? b.y + 5 : b.y + b.h - 5;
          const d = v > 0 ? `M${n2(x - 4)} ${n2(yEdge + 3)}L${n2(x + 4)} ${n2(yEdge + 3)}L${n2(x)} ${n2(yEdge - 4)}Z` : `M${n2(x - 4)} ${n2(yEdge - 3)}L${n2(x + 4)} ${n2(yEdge - 3)}L${n2(x)} ${n2(yEdge + 4)}Z`;
          p.push(`<path ${common} data-offscale="true" d="${d}" fill="${status === 'used' ? color : 'none'}" stroke="${color}"><title>${esc(tip + ' (off scale)')}</title></path>`);
          continue;
        }
        const Y0 = Y(v);
        if (errorBars) {
          const lo = Math.max(b.y, Y(v - s)), hi = Math.min(b.y + b.h, Y(v + s));
          p.push(`<line data-role="error-bar" x1="${n2(x)}" y1="${n2(lo)}" x2="${n2(x)}" y2="${n2(hi)}" stroke="${color}" stroke-opacity="0.6"/>`);
        }
        if (status === 'rejected') {
          p.push(
            `<path ${common} d="M${n2(x - 4)} ${n2(Y0 - 4)}L${n2(x + 4)} ${n2(Y0 + 4)}M${n2(x - 4)} ${n2(Y0 + 4)}L${n2(x + 4)} ${n2(Y0 - 4)}" stroke="${color}" stroke-width="2" fill="none"><title>${esc(tip)}</title></path>`,
          );
        } else if (status === 'excluded') {
          p.push(`<circle ${common} cx="${n2(x)}" cy="${n2(Y0)}" r="3.2" fill="none" stroke="${color}" stroke-width="1.3"><title>${esc(tip)}</title></circle>`);
        } else {
          p.push(`<circle ${common} cx="${n2(x)}" cy="${n2(Y0)}" r="3" fill="${color}" stroke="#ffffff" stroke-width="0.6"><title>${esc(tip)}</title></circle>`);
        }
      }
    }
    if (opts.nightMeans) {
      const means = nightMeans(points).filter((m) => Math.abs(panel === 'ra' ? m.raCosDecArcsec : m.decArcsec) <= yMax);
      if (means.length > 1) {
        const d = means.map((m, i) => `${i === 0 ? 'M' : 'L'}${n2(X(m.timeMs))} ${n2(Y(panel === 'ra' ? m.raCosDecArcsec : m.decArcsec))}`).join('');
        p.push(`<path data-role="night-mean" d="${d}" fill="none" stroke="${C.nominal}" stroke-width="1.5" stroke-opacity="0.75"/>`);
      }
    }
    p.push('</g>');
  }
  // x-axis title and legend (stations, then the three markers), wrapped into rows
  const axisY = boxes.dec.y + boxes.dec.h + 32;
  p.push(`<text x="${n2(boxes.dec.x + boxes.dec.w / 2)}" y="${n2(axisY)}" text-anchor="middle" fill="${C.text}">observation time (UTC)</text>`);
  const entries: string[] = stationCodes.map(
    (code) => `<g data-role="legend-station" data-stn="${esc(code)}"><circle cx="6" cy="-4" r="4" fill="${colors[code]}"/><text x="14" y="0" fill="${C.text}">${esc(code)}</text></g>`,
  );
  entries.push(
    `<g data-role="legend-marker" data-status="used"><circle cx="6" cy="-4" r="3" fill="${C.muted}"/><text x="14" y="0" fill="${C.text}">used</text></g>`,
    `<g data-role="legend-marker" data-status="rejected"><path d="M2 -8L10 0M2 0L10 -8" stroke="${C.muted}" stroke-width="2"/><text x="14" y="0" fill="${C.text}">rejected (χ² rule)</text></g>`,
    ...(opts.nightMeans ? [`<g data-role="legend-marker" data-status="night-mean"><path d="M0 -4L12 -4" stroke="${C.nominal}" stroke-width="1.5"/><text x="16" y="0" fill="${C.text}">nightly mean (used)</text></g>`] : []),
    `<g data-role="legend-marker" data-status="excluded"><circle cx="6" cy="-4" r="3.2" fill="none" stroke="${EXCLUDED_COLOR}" stroke-width="1.3"/><text x="14" y="0" fill="${C.text}">excluded by the analyst</text></g>`,
  );
  entries.forEach((e, i) => {
    const row = Math.floor(i / perRow), col = i % perRow;
    p.push(`<g transform="translate(${n2(boxes.dec.x + col * LEGEND_SLOT)} ${n2(axisY + 20 + row * 16)})">${e}</g>`);
  });
  if (opts.caption) p.push(`<text x="${n2(boxes.dec.x)}" y="${n2(height - 6)}" font-size="10" fill="${C.muted}">${esc(opts.caption)}</text>`);
  p.push('</svg>');
  return p.join('\n');
}
