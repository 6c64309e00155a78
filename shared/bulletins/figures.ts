// Linked figures: the value a bulletin figure shows, taken from a run's assess JSON (shared/schemas/assessment.ts)
// and formatted with units and uncertainty (shared/format.ts). Pure; used by the server (staleness, version
// snapshots, e-mail summary) and the client (editor preview, rebind).
//
// An approach-level figure names its approach by (body, epochTdbJd): the approach of that body nearest in time
// within FIGURE_MATCH_DAYS is taken (nominal approaches first, then the run's other encounter windows found by Monte
// Carlo or LOV), so a figure can be rebound to a newer run whose encounter epoch moved a little.
import {
  describeImpactProbability,
  formatDiameterRange,
  formatDistance,
  formatDistanceRange,
  formatEnergyRange,
  formatPalermo,
  formatSigmaSeconds,
  formatSpeedKmS,
  formatTorino,
  formatUtc,
} from '../format';
import { safeParseAssessment, type Approach, type AssessmentResult, type OtherWindow } from '../schemas/assessment';
import { FIGURE_MATCH_DAYS, OBJECT_LEVEL_QUANTITIES, type FigureQuantity, type FigureValue, type LinkedFigureAttrs } from './document';

/** What identifies the run a value comes from (stored with every snapshot). */
export interface RunRef {
  runId: number;
  solutionId: number;
  solutionVersion: number;
  inputSha256: string;
}

/** A figure that cannot be taken from this run (no such approach, quantity missing, result unreadable). */
export class FigureError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FigureError';
  }
}

type Encounter = { kind: 'approach'; a: Approach } | { kind: 'window'; w: OtherWindow };

/** The approach (or other window) of `body` nearest to `epochTdbJd`, within FIGURE_MATCH_DAYS; null if none. */
export function matchApproach(result: AssessmentResult, body: string, epochTdbJd: number): Encounter | null {
  let best: { e: Encounter; dt: number } | null = null;
  for (const a of result.approaches) {
    const dt = Math.abs(a.epochTdbJd - epochTdbJd);
    if (a.body === body && dt <= FIGURE_MATCH_DAYS && (!best || dt < best.dt)) best = { e: { kind: 'approach', a }, dt };
  }
  if (best) return best.e;
  for (const w of result.otherWindows ?? []) {
    const dt = Math.abs(w.epochTdbJd - epochTdbJd);
    if (w.body === body && dt <= FIGURE_MATCH_DAYS && (!best || dt < best.dt)) best = { e: { kind: 'window', w }, dt };
  }
  return best?.e ?? null;
}

function isNum(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

/**
 * The value of one linked figure from a run's result. Throws FigureError when the run does not have it (e.g. no
 * approach of that body near that epoch). `result` is the run's assess JSON (unknown: it is validated here).
 */
export function extractFigure(result: unknown, runRef: RunRef, ref: Pick<LinkedFigureAttrs, 'quantity' | 'body' | 'epochTdbJd'>): FigureValue {
  const parsed = safeParseAssessment(result);
  if (!parsed.ok) throw new FigureError(`the run's result cannot be read (${parsed.error})`);
  const r = parsed.value;
  const provenance = {
    runId: runRef.runId,
    solutionId: runRef.solutionId,
    solutionVersion: runRef.solutionVersion,
    inputSha256: runRef.inputSha256,
    engineVersion: typeof r.provenance.engineVersion === 'string' ? r.provenance.engineVersion : null,
  };
  const q: FigureQuantity = ref.quantity;
  const base = { quantity: q, runId: runRef.runId, provenance, low: null as number | null, high: null as number | null, unit: null as string | null, method: null as string | null };

  if (OBJECT_LEVEL_QUANTITIES.includes(q)) {
    switch (q) {
      case 'diameter': {
        const d = r.diameterM;
        if (!isNum(d.nominal)) throw new FigureError('the run has no diameter (no absolute magnitude in the solution)');
        return { ...base, text: formatDiameterRange(d), value: d.nominal, low: d.low, high: d.high, unit: 'm', approach: null };
      }
      case 'palermoCumulative':
        if (!isNum(r.palermoCumulative)) throw new FigureError('the run has no cumulative Palermo rating');
        return { ...base, text: formatPalermo(r.palermoCumulative), value: r.palermoCumulative, approach: null };
      default:
        if (!isNum(r.torinoMax)) throw new FigureError('the run has no Torino rating');
        return { ...base, text: formatTorino(r.torinoMax), value: r.torinoMax, approach: null };
    }
  }

  if (ref.body === null || ref.epochTdbJd === null) throw new FigureError(`${q} needs an approach (body and epoch)`);
  const enc = matchApproach(r, ref.body, ref.epochTdbJd);
  if (!enc) throw new FigureError(`the run has no ${ref.body} approach within ${FIGURE_MATCH_DAYS} days of JD ${ref.epochTdbJd.toFixed(2)} TDB`);
  const src = enc.kind === 'approach' ? enc.a : enc.w;
  const approach = { body: src.body, epochTdbJd: src.epochTdbJd };

  switch (q) {
    case 'impactProbability': {
      const s = describeImpactProbability(src.impactProbability, src.ratingProbabilitySource ?? null);
      if (s.value === null && s.high === null) throw new FigureError('the run has no impact probability for this approach');
      return { ...base, text: s.text, value: s.value, low: s.low, high: s.high, method: s.method, approach };
    }
    case 'palermo':
      if (!isNum(src.palermo)) throw new FigureError('the approach has no Palermo rating');
      return { ...base, text: formatPalermo(src.palermo), value: src.palermo, method: src.ratingProbabilitySource ?? null, approach };
    case 'torino':
      if (!isNum(src.torino)) throw new FigureError('the approach has no Torino rating');
      return { ...base, text: formatTorino(src.torino), value: src.torino, method: src.ratingProbabilitySource ?? null, approach };
    case 'energy': {
      const e = src.energyMt;
      if (!isNum(e.nominal)) throw new FigureError('the approach has no impact energy');
      return { ...base, text: formatEnergyRange(e), value: e.nominal, low: e.low, high: e.high, unit: 'Mt', approach };
    }
    case 'vInfinity':
      if (!isNum(src.vInfinityKmS)) throw new FigureError('the approach has no v-infinity');
      return { ...base, text: formatSpeedKmS(src.vInfinityKmS), value: src.vInfinityKmS, unit: 'km/s', approach };
    case 'missDistance': {
      if (enc.kind === 'window') {
        const m = enc.w.minDistanceKm;
        if (!m) throw new FigureError('the window has no distance');
        return { ...base, text: `${formatDistance(m.median)} (clones: ${formatDistanceRange([m.min, m.max])})`, value: m.median, low: m.min, high: m.max, unit: 'km', method: enc.w.source, approach };
      }
      const a = enc.a;
      const range = a.distanceRangeKm?.threeSigma ?? null;
      const text = range ? `${formatDistance(a.distanceKm)} (3σ: ${formatDistanceRange(range)})` : formatDistance(a.distanceKm);
      return { ...base, text, value: a.distanceKm, low: range ? range[0] : null, high: range ? range[1] : null, unit: 'km', method: range ? 'linear' : null, approach };
    }
    case 'encounterDate': {
      const sigma = enc.kind === 'approach' ? (enc.a.encounterTime?.sigmaSeconds ?? null) : null;
      const text = isNum(sigma) ? `${formatUtc(src.utc)} ${formatSigmaSeconds(sigma)} (1σ)` : formatUtc(src.utc);
      return { ...base, text, value: src.utc, low: isNum(sigma) ? -sigma : null, high: isNum(sigma) ? sigma : null, unit: isNum(sigma) ? 's' : null, approach };
    }
  }
  throw new FigureError(`unknown quantity ${q}`);
}

/** Like extractFigure, but a problem comes back as a message instead of an exception. */
export function tryExtractFigure(result: unknown, runRef: RunRef, ref: Pick<LinkedFigureAttrs, 'quantity' | 'body' | 'epochTdbJd'>): { value: FigureValue; problem: null } | { value: null; problem: string } {
  try {
    return { value: extractFigure(result, runRef, ref), problem: null };
  } catch (err) {
    if (err instanceof FigureError) return { value: null, problem: err.message };
    throw err;
  }
}
