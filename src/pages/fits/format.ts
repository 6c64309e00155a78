// Display helpers of the orbit-fit screens: element labels and units, TDB day counts as dates, p-values.
import { formatNumber } from '../objects/format';

/** J2000.0 = JD 2451545.0 TDB = 2000-01-01T12:00 TDB (METHODS.md §1). */
const J2000_MS = Date.UTC(2000, 0, 1, 12);

/** TDB days since J2000 as "YYYY-MM-DD hh:mm TDB" (a TDB calendar date, not UTC: they differ by about a minute). */
export function formatTdbDays(days: number): string {
  const ms = J2000_MS + days * 86_400_000;
  if (!Number.isFinite(ms)) return '—';
  return new Date(ms).toISOString().slice(0, 16).replace('T', ' ') + ' TDB';
}

export const ELEMENT_LABELS: Record<string, { label: string; unit: string; digits: number }> = {
  perihelionDistanceAu: { label: 'Perihelion distance q', unit: 'AU', digits: 9 },
  eccentricity: { label: 'Eccentricity e', unit: '', digits: 9 },
  inclinationDeg: { label: 'Inclination i', unit: '°', digits: 8 },
  ascendingNodeDeg: { label: 'Ascending node Ω', unit: '°', digits: 8 },
  argPerihelionDeg: { label: 'Argument of perihelion ω', unit: '°', digits: 8 },
  perihelionTimeTdbDays: { label: 'Perihelion time Tp', unit: 'TDB days since J2000', digits: 10 },
};

export function elementLabel(key: string): string {
  const e = ELEMENT_LABELS[key];
  return e ? `${e.label}${e.unit ? ` [${e.unit}]` : ''}` : key;
}

/** A probability: fixed for ordinary values, exponent form when tiny; "< 1e-300" for underflow. */
export function formatP(p: number): string {
  if (!Number.isFinite(p)) return '—';
  if (p === 0) return '< 10⁻³⁰⁰';
  if (p >= 0.001) return p.toPrecision(3);
  return formatNumber(p, 3);
}

export const fixed = (x: number | null | undefined, digits: number) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : x.toFixed(digits));

export const FIT_LABELS = { 'gravity-only': 'Gravity only', 'non-gravitational': 'With non-gravitational terms' } as const;

/** Residuals as CSV (one header line, full precision, the units in the column names). */
export function residualsCsv(rows: readonly { line: number; stn: string; obsTime: string; raCosDecArcsec: number; decArcsec: number; sigmaRaArcsec: number; sigmaDecArcsec: number; chiSquare: number; status: string }[]): string {
  const head = 'line,stn,obsTimeUtc,oMinusCRaCosDecArcsec,oMinusCDecArcsec,sigmaRaArcsec,sigmaDecArcsec,chiSquare,status';
  const quote = (s: string) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  return [head, ...rows.map((r) => [r.line, quote(r.stn), r.obsTime, r.raCosDecArcsec, r.decArcsec, r.sigmaRaArcsec, r.sigmaDecArcsec, r.chiSquare, r.status].join(','))].join('\n') + '\n';
}
