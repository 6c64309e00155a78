// Formatting of Tocsin's numbers with their units and uncertainty, used by the client, the server (exports, seed)
// and the PDF renderer. Pure functions; no locale dependence (thousands separated by ",", decimal point ".").
// Ranges use an en dash (–). Probabilities use plain exponent notation ("1.2e-4").

/** Distance units of the unit switch. `km` = how many kilometres one unit is; `source` says where it comes from. */
export const DISTANCE_UNITS = {
  km: { label: 'km', name: 'kilometres', km: 1, source: 'SI' },
  ld: {
    label: 'LD',
    name: 'lunar distances',
    km: 384_399,
    source: 'mean Earth–Moon distance 384,399 km (semi-major axis of the lunar orbit; NASA Moon fact sheet; value recalled from memory)',
  },
  re: {
    label: 'R⊕',
    name: 'Earth radii',
    km: 6378.137,
    source: 'Earth equatorial radius 6378.137 km (WGS84 / GRS80), the radius the engine uses for impacts',
  },
  au: { label: 'au', name: 'astronomical units', km: 149_597_870.7, source: 'IAU 2012 Resolution B2 (exact)' },
} as const;
export type DistanceUnit = keyof typeof DISTANCE_UNITS;
export const DISTANCE_UNIT_KEYS = Object.keys(DISTANCE_UNITS) as DistanceUnit[];

const DASH = '–';
const MINUS = '−';

function isNum(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

/** Group the integer part with commas: 8300 -> "8,300". */
function groupThousands(s: string): string {
  const neg = s.startsWith('-');
  const body = neg ? s.slice(1) : s;
  const [int, frac] = body.split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return (neg ? '-' : '') + grouped + (frac !== undefined ? '.' + frac : '');
}

/** `x` rounded to `sig` significant digits, fixed notation with thousands separators (e.g. 8,300 or 0.0123). */
export function formatSig(x: number, sig = 3): string {
  if (!isNum(x)) return '—';
  if (x === 0) return '0';
  const mag = Math.floor(Math.log10(Math.abs(x)));
  const decimals = Math.max(0, sig - 1 - mag);
  const rounded = Number(x.toPrecision(sig));
  return groupThousands(rounded.toFixed(Math.min(decimals, 20)));
}

/** Exponent notation with one decimal: 1.2e-4 (no "+" in positive exponents: 3.0e5). */
export function formatExp(x: number, decimals = 1): string {
  if (!isNum(x)) return '—';
  return x.toExponential(decimals).replace('e+', 'e');
}

/** Convert a distance in km into `unit`. */
export function convertDistanceKm(km: number, unit: DistanceUnit): number {
  return km / DISTANCE_UNITS[unit].km;
}

function distanceNumber(km: number, unit: DistanceUnit): string {
  const v = convertDistanceKm(km, unit);
  if (unit === 'km') return Math.abs(v) >= 100 ? groupThousands(Math.round(v).toString()) : formatSig(v, 3);
  if (Math.abs(v) !== 0 && (Math.abs(v) < 1e-3 || Math.abs(v) >= 1e6)) return formatExp(v, 2);
  return formatSig(v, 3);
}

/** "1,234,567 km", "3.21 LD", "5.30 R⊕", "0.0123 au". */
export function formatDistance(km: number | null | undefined, unit: DistanceUnit = 'km'): string {
  if (!isNum(km)) return '—';
  return `${distanceNumber(km, unit)} ${DISTANCE_UNITS[unit].label}`;
}

/** "12,000–45,000 km" (one unit for both ends). */
export function formatDistanceRange(range: readonly [number, number] | null | undefined, unit: DistanceUnit = 'km'): string {
  if (!range || !isNum(range[0]) || !isNum(range[1])) return '—';
  return `${distanceNumber(range[0], unit)}${DASH}${distanceNumber(range[1], unit)} ${DISTANCE_UNITS[unit].label}`;
}

/** "about 1 in 8,300" (1/p to two significant digits). */
export function formatOdds(p: number | null | undefined): string {
  if (!isNum(p) || p <= 0) return '—';
  if (p >= 1) return 'certain (1 in 1)';
  const n = 1 / p;
  const text = n < 10 ? formatSig(n, 2) : formatSig(n, 2);
  return `about 1 in ${text}`;
}

/** "1.2e-4 (95%: 8.0e-5–1.9e-4)", or "1.2e-4" without an interval. */
export function formatProbability(p: number | null | undefined, ci95?: readonly [number, number] | null): string {
  if (!isNum(p)) return '—';
  const base = formatExp(p);
  if (!ci95 || !isNum(ci95[0]) || !isNum(ci95[1])) return base;
  return `${base} (95%: ${formatExp(ci95[0])}${DASH}${formatExp(ci95[1])})`;
}

/** "below 3.0e-3 (95%)": the one-sided upper bound of a Monte Carlo run without hits. */
export function formatUpperBound(upperBound95: number | null | undefined): string {
  if (!isNum(upperBound95)) return '—';
  return `below ${formatExp(upperBound95)} (95%)`;
}

/** The impact probabilities of one approach or window as the engine gives them. */
export type IpInput = {
  linear: number | null;
  monteCarlo: { hits: number | null; samples: number | null; estimate: number | null; ci95: readonly [number, number] | null; upperBound95: number | null } | null;
  lov: number | null;
};

export type IpStatement = {
  /** The figure as shown, with its interval or bound. */
  text: string;
  /** The probability used (null for an upper bound only or nothing). */
  value: number | null;
  low: number | null;
  high: number | null;
  /** Which method gave the figure: 'linear', 'Monte Carlo', 'line of variations', or null. */
  method: string | null;
  /** Extra words on the method (e.g. hits in samples, "no sampling interval"). */
  methodDetail: string | null;
  /** "about 1 in 8,300" or null. */
  odds: string | null;
};

function mcDetail(mc: NonNullable<IpInput['monteCarlo']>): string {
  return `${mc.hits ?? 0} hit${mc.hits === 1 ? '' : 's'} in ${groupThousands(String(mc.samples ?? 0))} clones, Wilson 95% interval`;
}

/**
 * The impact probability to state for an approach: the one the engine rated with (`ratingSource`, assess.ts's
 * ratingProbabilitySource), with its interval (Monte Carlo) or its bound (Monte Carlo without hits).
 * Linear and LOV values are approximations without a sampling interval; that is said in methodDetail.
 */
export function describeImpactProbability(ip: IpInput | null | undefined, ratingSource?: string | null): IpStatement {
  const none: IpStatement = { text: '—', value: null, low: null, high: null, method: null, methodDetail: null, odds: null };
  if (!ip) return none;
  const mc = ip.monteCarlo;
  const src = ratingSource ?? null;
  if (src && src.startsWith('linear') && isNum(ip.linear)) {
    const flagged = src !== 'linear';
    return {
      text: formatProbability(ip.linear),
      value: ip.linear,
      low: null,
      high: null,
      method: 'linear',
      methodDetail: flagged ? 'linear method NOT validated (its linearity checks failed; see the method flags)' : 'Gaussian b-plane integral, no sampling interval',
      odds: ip.linear > 0 ? formatOdds(ip.linear) : null,
    };
  }
  if (src === 'monteCarlo' && mc && isNum(mc.estimate)) {
    return {
      text: formatProbability(mc.estimate, mc.ci95),
      value: mc.estimate,
      low: mc.ci95 ? mc.ci95[0] : null,
      high: mc.ci95 ? mc.ci95[1] : null,
      method: 'Monte Carlo',
      methodDetail: mcDetail(mc),
      odds: formatOdds(mc.estimate),
    };
  }
  if (src === 'lov' && isNum(ip.lov)) {
    return {
      text: formatProbability(ip.lov),
      value: ip.lov,
      low: null,
      high: null,
      method: 'line of variations',
      methodDetail: 'semilinear estimate at the virtual impactors',
      odds: ip.lov > 0 ? formatOdds(ip.lov) : null,
    };
  }
  // No rated probability: a Monte Carlo bound if there is one, else linear / LOV as given.
  if (mc && mc.hits === 0 && isNum(mc.upperBound95)) {
    return { text: formatUpperBound(mc.upperBound95), value: null, low: null, high: mc.upperBound95, method: 'Monte Carlo', methodDetail: mcDetail(mc), odds: null };
  }
  if (isNum(ip.linear)) {
    return { text: formatProbability(ip.linear), value: ip.linear, low: null, high: null, method: 'linear', methodDetail: 'Gaussian b-plane integral, no sampling interval', odds: ip.linear > 0 ? formatOdds(ip.linear) : null };
  }
  if (isNum(ip.lov)) {
    return { text: formatProbability(ip.lov), value: ip.lov, low: null, high: null, method: 'line of variations', methodDetail: null, odds: formatOdds(ip.lov) };
  }
  return none;
}

// ---------------------------------------------------------------------------------------------------------------
// Dates

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/** "2034-03-15 04:12:07 UTC" from an ISO string (seconds rounded down; the engine's UTC has ms). */
export function formatUtc(iso: string | null | undefined, opts: { seconds?: boolean } = {}): string {
  if (!iso) return '—';
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})(:\d{2})?/.exec(iso);
  if (!m) return iso;
  return `${m[1]} ${m[2]}${opts.seconds === false ? '' : (m[3] ?? ':00')} UTC`;
}

/**
 * Calendar date of a Julian date (proleptic Gregorian after 1582-10-15; Meeus, Astronomical Algorithms, ch. 7),
 * as { year, month, day, hour, minute, second } in the JD's own time scale.
 */
export function calendarFromJd(jd: number): { year: number; month: number; day: number; hour: number; minute: number; second: number } {
  const z = Math.floor(jd + 0.5);
  const f = jd + 0.5 - z;
  let a = z;
  if (z >= 2299161) {
    const alpha = Math.floor((z - 1867216.25) / 36524.25);
    a = z + 1 + alpha - Math.floor(alpha / 4);
  }
  const b = a + 1524;
  const c = Math.floor((b - 122.1) / 365.25);
  const d = Math.floor(365.25 * c);
  const e = Math.floor((b - d) / 30.6001);
  let day = b - d - Math.floor(30.6001 * e);
  const month = e < 14 ? e - 1 : e - 13;
  let year = month > 2 ? c - 4716 : c - 4715;
  let secs = Math.round(f * 86400);
  let monthOut = month;
  if (secs >= 86400) {
    // rounding reached midnight: recompute from the next day
    const next = calendarFromJd(Math.floor(jd + 0.5) + 0.5);
    ({ year, day } = next);
    monthOut = next.month;
    secs = 0;
  }
  return { year, month: monthOut, day, hour: Math.floor(secs / 3600), minute: Math.floor((secs % 3600) / 60), second: secs % 60 };
}

/** "2034-03-15 04:13:16 TDB" from a TDB Julian date. */
export function formatTdbJd(jd: number | null | undefined): string {
  if (!isNum(jd)) return '—';
  const c = calendarFromJd(jd);
  return `${c.year}-${pad(c.month)}-${pad(c.day)} ${pad(c.hour)}:${pad(c.minute)}:${pad(c.second)} TDB`;
}

/** "JD 2462938.67510 TDB". */
export function formatJd(jd: number | null | undefined, decimals = 5): string {
  if (!isNum(jd)) return '—';
  return `JD ${jd.toFixed(decimals)} TDB`;
}

/** A duration in seconds as "±41 s", "±12.3 min", "±3.4 h", "±2.1 d". */
export function formatSigmaSeconds(s: number | null | undefined): string {
  if (!isNum(s)) return '—';
  const a = Math.abs(s);
  if (a < 120) return `±${formatSig(a, 2)} s`;
  if (a < 7200) return `±${formatSig(a / 60, 3)} min`;
  if (a < 172800) return `±${formatSig(a / 3600, 3)} h`;
  return `±${formatSig(a / 86400, 3)} d`;
}

// ---------------------------------------------------------------------------------------------------------------
// Physical quantities

export type RangeInput = { nominal: number | null; low: number | null; high: number | null } | null | undefined;

/** Energy range with one unit (kt below 1 Mt at the high end, else Mt): "12 Mt (3.1–45 Mt)". 1 Mt TNT = 4.184e15 J. */
export function formatEnergyRange(e: RangeInput): string {
  if (!e || !isNum(e.nominal)) return '—';
  const top = isNum(e.high) ? e.high : e.nominal;
  const [k, unit] = top < 1 ? [1000, 'kt'] : [1, 'Mt'];
  const f = (x: number) => (x * k >= 1e6 ? formatExp(x * k, 1) : formatSig(x * k, 2));
  const main = `${f(e.nominal)} ${unit}`;
  if (!isNum(e.low) || !isNum(e.high)) return main;
  return `${main} (${f(e.low)}${DASH}${f(e.high)} ${unit})`;
}

/** Diameter range: "140 m (90–210 m)", in km from 1 km up. */
export function formatDiameterRange(d: RangeInput): string {
  if (!d || !isNum(d.nominal)) return '—';
  const top = isNum(d.high) ? d.high : d.nominal;
  const [k, unit] = top >= 1000 ? [1 / 1000, 'km'] : [1, 'm'];
  const f = (x: number) => formatSig(x * k, 2);
  const main = `${f(d.nominal)} ${unit}`;
  if (!isNum(d.low) || !isNum(d.high)) return main;
  return `${main} (${f(d.low)}${DASH}${f(d.high)} ${unit})`;
}

/** "12.34 km/s". */
/**
 * Unbound significance S = (e − 1)/σe (METHODS.md §3) for a table cell: '—' without a covariance; a bound orbit
 * (S < 0) says so; beyond 1000 σ the exact figure says nothing more than "far beyond any doubt".
 */
export function formatUnboundSignificance(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  const size = Math.abs(s) >= 1000 ? '> 1000 σ' : `${Math.abs(s).toFixed(1)} σ`;
  return s >= 0 ? size : `bound (e below 1 by ${size})`;
}

export function formatSpeedKmS(v: number | null | undefined, decimals = 2): string {
  if (!isNum(v)) return '—';
  return `${v.toFixed(decimals)} km/s`;
}

/** Palermo scale value with two decimals and a true minus sign: "−2.31"; "—" when not rated. */
export function formatPalermo(x: number | null | undefined): string {
  if (!isNum(x)) return '—';
  const s = Math.abs(x).toFixed(2);
  return x < 0 && s !== '0.00' ? `${MINUS}${s}` : s;
}

/** Torino scale category (integer 0..10); "—" when not rated. */
export function formatTorino(x: number | null | undefined): string {
  if (!isNum(x)) return '—';
  return String(Math.round(x));
}
