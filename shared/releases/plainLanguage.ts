// Plain-language statements for the public, generated from a frozen figure snapshot of an approved bulletin version
// (shared/schemas/bulletins.ts FigureSnapshot): "about 1 in 12,000", "about 3 times the Moon's distance", and one
// sentence that says honestly how uncertain the figures are. Pure functions: the server stores them with a locked
// release version and renders them on the public pages; the client shows them beside the editor.
//
// Rule of the house for public wording (common practice, no source): never state more certainty than the figure
// carries: odds to two significant digits, an interval or bound when the figure has one, "about" everywhere, and a
// chance of missing that is never rounded up to 100 %.
import { DISTANCE_UNITS, formatOdds } from '../format';
import type { FigureValue } from '../bulletins/document';
import type { PlainLanguage, PlainStatement } from '../schemas/releases';

/** The caution shown with every public release (the office's own standing text). */
export const PUBLIC_CAUTION =
  'These figures are analysis aids; official impact-risk statements come from the responsible national and ' +
  'international authorities. They describe what is known about the orbit today. They are estimates, not forecasts of what will happen: ' +
  'as new observations come in they change, and for most objects the chance of impact falls to zero. ' +
  'This office does not ask anyone to take action; follow the advice of your civil-protection authorities.';

/** Mean Earth–Moon distance used for "times the Moon's distance" (the LD of the unit switch, shared/format.ts). */
export const MOON_DISTANCE_KM = DISTANCE_UNITS.ld.km;
/** Earth equatorial radius (WGS84; the engine's impact radius). */
export const EARTH_RADIUS_KM = DISTANCE_UNITS.re.km;

export const PLAIN_LABELS: Record<string, string> = {
  impactProbability: 'Chance of impact',
  palermo: 'Compared with the background hazard',
  torino: 'Torino scale',
  missDistance: 'Closest distance',
  encounterDate: 'Date of the close approach',
  vInfinity: 'Speed relative to the Earth',
  diameter: 'Size',
  energy: 'Energy if it struck',
  palermoCumulative: 'All encounters compared with the background hazard',
  torinoMax: 'Torino scale (highest)',
};

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

function isNum(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

/** Round to `sig` significant digits and group thousands: 12048 -> "12,000", 2.64 -> "2.6". */
export function roundForPublic(x: number, sig = 2): string {
  if (!isNum(x)) return '—';
  if (x === 0) return '0';
  const digits = Math.floor(Math.log10(Math.abs(x)));
  const factor = 10 ** (digits - sig + 1);
  const r = Math.round(x / factor) * factor;
  const decimals = Math.max(0, sig - 1 - digits);
  const s = r.toFixed(decimals);
  const [int, frac] = s.split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return frac !== undefined ? `${grouped}.${frac}` : grouped;
}

/** "1 in 12,000" without "about" (from a probability 0 < p < 1). */
function oneIn(p: number): string {
  return formatOdds(p).replace(/^about /, '');
}

/**
 * The chance of missing as a percentage that is never rounded up to 100 %: enough decimals to reach the first digit
 * that is not a 9, truncated (8.3e-5 -> "99.991%", 0.01 -> "99%").
 */
export function missPercent(p: number): string {
  if (!isNum(p) || p <= 0) return '100%';
  if (p >= 1) return '0%';
  const decimals = Math.max(0, Math.ceil(-Math.log10(p)) - 2);
  const factor = 10 ** decimals;
  const pct = Math.floor((1 - p) * 100 * factor) / factor;
  return `${pct.toFixed(decimals)}%`;
}

/** "about 1 in 12,000" (with the interval or bound when the figure has one). */
export function plainImpactProbability(f: Pick<FigureValue, 'value' | 'low' | 'high'>): string {
  const p = isNum(f.value) ? f.value : null;
  if (p === null) {
    if (isNum(f.high) && f.high > 0) return `less than 1 in ${roundForPublic(1 / f.high)} (an upper bound: no simulated orbit struck the Earth)`;
    return 'not known';
  }
  if (p <= 0) return 'no impact possible on the present orbit';
  if (p >= 1) return 'an impact is certain on the present orbit';
  let s = `about ${oneIn(p)}`;
  if (isNum(f.low) && isNum(f.high) && f.low > 0 && f.high > 0 && f.high < 1) s += ` (somewhere between ${oneIn(f.high)} and ${oneIn(f.low)})`;
  return `${s}, that is a ${missPercent(p)} chance that it misses`;
}

/** A distance as a multiple of the Moon's distance, without "about": "3 times the Moon's distance", "the Moon's distance", "40% of the Moon's distance". */
export function moonMultiple(distanceKm: number): string {
  const ratio = distanceKm / MOON_DISTANCE_KM;
  if (ratio >= 1.5) return `${roundForPublic(ratio, ratio < 10 ? 1 : 2)} times the Moon's distance`;
  if (ratio >= 0.75) return "the Moon's distance";
  return `${roundForPublic(ratio * 100, 2)}% of the Moon's distance`;
}

/** "about 3 times the Moon's distance" from a distance from the centre of the Earth in km. */
export function plainDistanceKm(distanceKm: number): string {
  if (!isNum(distanceKm)) return 'not known';
  if (distanceKm < EARTH_RADIUS_KM) return 'less than the radius of the Earth from its centre (the nominal path meets the Earth)';
  const ratio = distanceKm / MOON_DISTANCE_KM;
  if (ratio >= 1.5) return `about ${roundForPublic(ratio, ratio < 10 ? 1 : 2)} times the Moon's distance`;
  if (ratio >= 0.75) return "about the Moon's distance";
  const radii = distanceKm / EARTH_RADIUS_KM;
  return `closer than the Moon: about ${roundForPublic(ratio * 100, 2)}% of the Moon's distance, or ${roundForPublic(radii, 2)} Earth radii from the centre of the Earth`;
}

/** Torino category in words (the scale's published category meanings, paraphrased; common practice, no source). */
export function plainTorino(t: number): string {
  const n = Math.round(t);
  if (n <= 0) return 'category 0: no unusual hazard';
  if (n === 1) return 'category 1: a routine discovery that merits no public concern';
  if (n <= 4) return `category ${n}: merits attention by astronomers; no cause for public concern`;
  if (n <= 7) return `category ${n}: a threatening close encounter that merits critical attention`;
  return `category ${n}: a collision is certain`;
}

/** Palermo scale in words: the ratio to the background hazard (P = log10 of that ratio). */
export function plainPalermo(p: number): string {
  const ratio = 10 ** p;
  if (p < 0) {
    const times = roundForPublic(1 / ratio);
    return `below the background hazard: about ${times} times less likely than an impact of similar size from any object before that date`;
  }
  return `at or above the background hazard: about ${roundForPublic(ratio)} times the chance of an impact of similar size from any object before that date`;
}

function plainDate(iso: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(iso);
  if (!m) return null;
  return `${Number(m[3])} ${MONTHS[Number(m[2]) - 1]} ${m[1]}`;
}

/** One figure in plain words, or null when it has no public statement. */
export function plainStatement(figureIndex: number, f: FigureValue): PlainStatement | null {
  const label = PLAIN_LABELS[f.quantity] ?? f.quantity;
  const v = f.value;
  let text: string | null = null;
  switch (f.quantity) {
    case 'impactProbability':
      text = plainImpactProbability(f);
      break;
    case 'missDistance':
      if (isNum(v)) text = plainDistanceKm(v);
      break;
    case 'torino':
    case 'torinoMax':
      if (isNum(v)) text = plainTorino(v);
      break;
    case 'palermo':
    case 'palermoCumulative':
      if (isNum(v)) text = plainPalermo(v);
      break;
    case 'encounterDate':
      if (typeof v === 'string') {
        const d = plainDate(v);
        const sigmaS = isNum(f.high) ? f.high : null;
        if (d) text = sigmaS !== null && sigmaS > 12 * 3600 ? `around ${d} (the time is uncertain by about ${roundForPublic(sigmaS / 86400, 1)} days)` : `on ${d}`;
      }
      break;
    case 'vInfinity':
      if (isNum(v)) text = `about ${roundForPublic(v, 2)} km per second`;
      break;
    case 'diameter':
      if (isNum(v)) {
        // One unit for the whole statement, chosen by the largest value (metres below 1 km).
        const km = Math.max(v, isNum(f.high) ? f.high : v) >= 1000;
        const n = (x: number) => roundForPublic(km ? x / 1000 : x, 2);
        const unit = km ? 'km' : 'metres';
        text = isNum(f.low) && isNum(f.high) ? `about ${n(v)} ${unit} across (between ${n(f.low)} and ${n(f.high)} ${unit})` : `about ${n(v)} ${unit} across`;
      }
      break;
    case 'energy':
      if (isNum(v)) {
        const e = (x: number) => (x < 1 ? `${roundForPublic(x * 1000, 2)} kilotons` : `${roundForPublic(x, 2)} megatons`);
        text = isNum(f.low) && isNum(f.high) ? `about ${e(v)} of TNT (between ${e(f.low)} and ${e(f.high)})` : `about ${e(v)} of TNT`;
      }
      break;
  }
  return text === null ? null : { figureIndex, quantity: f.quantity, label, text };
}

/**
 * One honest sentence about the uncertainty of the figures: how the chance of impact was found and what range it
 * may have, how wide the distance range is, and that the figures will change with new observations.
 */
export function uncertaintySentence(figures: readonly { value: FigureValue }[]): string {
  const parts: string[] = [];
  const ip = figures.find((f) => f.value.quantity === 'impactProbability')?.value;
  if (ip) {
    const method = (ip.method ?? '').toLowerCase();
    if (!isNum(ip.value) && isNum(ip.high)) parts.push(`none of the simulated orbits struck the Earth, so we can only say the chance is below 1 in ${roundForPublic(1 / ip.high)}`);
    else if (method.includes('monte') && isNum(ip.low) && isNum(ip.high) && ip.low > 0) parts.push(`the chance of impact comes from simulating many possible orbits and, with the observations so far, may lie anywhere between ${oneIn(ip.high)} and ${oneIn(ip.low)}`);
    else if (isNum(ip.value)) parts.push('the chance of impact is computed from the best orbit and its measured uncertainty, so it is an estimate without a firm error range');
  }
  const d = figures.find((f) => f.value.quantity === 'missDistance')?.value;
  if (d && isNum(d.low) && isNum(d.high) && d.high > 0) {
    parts.push(
      d.low < EARTH_RADIUS_KM
        ? `the range of possible closest distances still includes the Earth itself (up to about ${moonMultiple(d.high)})`
        : `the closest distance could be anywhere from about ${moonMultiple(d.low)} to ${moonMultiple(d.high)}`,
    );
  }
  const head = parts.length ? parts.join(', and ') : 'these figures rest on the observations made so far';
  const sentence = `${head.charAt(0).toUpperCase()}${head.slice(1)}; all of them will change as new observations refine the orbit.`;
  return sentence;
}

/** The plain-language block of a release from its copied figures. */
export function plainLanguageFor(figures: readonly { index: number; value: FigureValue }[]): PlainLanguage {
  const statements: PlainStatement[] = [];
  for (const f of figures) {
    const s = plainStatement(f.index, f.value);
    if (s) statements.push(s);
  }
  return { statements, uncertainty: uncertaintySentence(figures), caution: PUBLIC_CAUTION };
}
