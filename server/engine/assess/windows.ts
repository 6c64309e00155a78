/**
 * Encounter windows of a Monte Carlo run: the close approaches of all clones to one body, grouped in time.
 *
 * Rule: per body, the approaches of all clones are sorted by time and cut wherever two consecutive approach
 * times are more than `gapDays` apart (default 30 d: much longer than the spread of one encounter among clones
 * of a well-determined orbit, much shorter than the ~1-year spacing of returns for a near-Earth orbit; common
 * practice, no source). A window therefore collects one encounter of every clone that comes within maxAu.
 * Computed after the results of all workers are merged in clone order, so the windows depend only on the seed.
 *
 * Per window: per clone, its closest approach in the window (an impact counts with its surface-crossing record);
 *  - hits: clones that reached the surface in the window; samples: every clone of the run (the denominator);
 *  - the estimate with binomialEstimate (Wilson 95%; zero hits -> one-sided upper bound, never 0);
 *  - minDistanceKm over the clones' closest approaches (min, median, max);
 *  - times (min, max, median) of the clones' closest approaches;
 *  - b-plane points of the clones in clone-index order up to `maxPoints` (clones are independent draws, so the
 *    first maxPoints by index are an unbiased random subset), with the count of all points;
 *  - median v-infinity.
 */
import type { EphemerisBody } from '../ephemeris';
import { binomialEstimate, type BinomialEstimate } from '../risk/intervals';
import type { McWindow } from './types';

/** One close approach of one clone (compact form used between workers and the merge). */
export type CloneApproach = {
  clone: number;
  body: EphemerisBody;
  tdbDays: number;
  distanceKm: number;
  /** null when the planet-centred orbit is not hyperbolic (no b-plane). */
  xiKm: number | null;
  zetaKm: number | null;
  vInfinityKmS: number | null;
  impact: boolean;
};

/** McWindow plus what the Monte Carlo runner adds (fields beyond the contract). */
export type McWindowDetail = McWindow & {
  /** Clones with an approach below maxAu in the window. */
  clones: number;
  /** Number of b-plane points before the cap. */
  bPlanePointsTotal: number;
  /** Binomial statement for hits/samples (Wilson 95%, Clopper-Pearson, one-sided upper bound, phrase). */
  impactProbability: BinomialEstimate;
};

export type WindowOptions = { gapDays?: number; maxPoints?: number };

export const DEFAULT_WINDOW_GAP_DAYS = 30;
export const DEFAULT_MAX_BPLANE_POINTS = 5000;

export function median(sorted: number[]): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const m = n >> 1;
  return n % 2 === 1 ? sorted[m] : 0.5 * (sorted[m - 1] + sorted[m]);
}

/** Group approaches into windows (see the module comment). `samples` = clones in the run. */
export function groupWindows(approaches: readonly CloneApproach[], samples: number, opts: WindowOptions = {}): McWindowDetail[] {
  const gap = opts.gapDays ?? DEFAULT_WINDOW_GAP_DAYS;
  const maxPoints = opts.maxPoints ?? DEFAULT_MAX_BPLANE_POINTS;
  const byBody = new Map<EphemerisBody, CloneApproach[]>();
  for (const a of approaches) {
    let list = byBody.get(a.body);
    if (!list) byBody.set(a.body, (list = []));
    list.push(a);
  }
  const windows: McWindowDetail[] = [];
  for (const [body, list] of byBody) {
    list.sort((a, b) => a.tdbDays - b.tdbDays || a.clone - b.clone);
    let start = 0;
    for (let i = 1; i <= list.length; i++) {
      if (i === list.length || list[i].tdbDays - list[i - 1].tdbDays > gap) {
        windows.push(summarise(body, list.slice(start, i), samples, maxPoints));
        start = i;
      }
    }
  }
  windows.sort((a, b) => a.tdbDaysMin - b.tdbDaysMin || (a.body < b.body ? -1 : a.body > b.body ? 1 : 0));
  return windows;
}

function summarise(body: EphemerisBody, group: CloneApproach[], samples: number, maxPoints: number): McWindowDetail {
  // Closest approach of each clone in the window (an impact always wins: it is at the surface).
  const best = new Map<number, CloneApproach>();
  for (const a of group) {
    const b = best.get(a.clone);
    if (!b || (a.impact && !b.impact) || (a.impact === b.impact && a.distanceKm < b.distanceKm)) best.set(a.clone, a);
  }
  const per = [...best.values()].sort((a, b) => a.clone - b.clone);
  const hits = per.filter((a) => a.impact).length;
  const dist = per.map((a) => a.distanceKm).sort((a, b) => a - b);
  const times = per.map((a) => a.tdbDays).sort((a, b) => a - b);
  const vinf = per.filter((a) => a.vInfinityKmS !== null).map((a) => a.vInfinityKmS as number).sort((a, b) => a - b);
  const withPlane = per.filter((a) => a.xiKm !== null && a.zetaKm !== null);
  const bPlanePoints = withPlane.slice(0, maxPoints).map((a) => ({ xiKm: a.xiKm as number, zetaKm: a.zetaKm as number, impact: a.impact }));
  return {
    body,
    tdbDaysMin: times[0],
    tdbDaysMax: times[times.length - 1],
    tdbDaysMedian: median(times),
    hits,
    samples,
    minDistanceKm: { min: dist[0], median: median(dist), max: dist[dist.length - 1] },
    bPlanePoints,
    vInfinityKmS: vinf.length > 0 ? median(vinf) : NaN,
    clones: per.length,
    bPlanePointsTotal: withPlane.length,
    impactProbability: binomialEstimate(hits, samples),
  };
}
