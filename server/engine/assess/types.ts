/**
 * Engine II (issue 4) interface between the assessment composer (LIN: assess.ts, linear.ts, lov.ts) and the
 * Monte Carlo runner (MC: montecarlo.ts, batch.ts, windows.ts, jobs/). Names are fixed by the engine contract;
 * MC may add fields it needs. Units in names; times are TDB days since J2000.0 (`tdbDays`).
 */
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import type { EphemerisBody } from '../ephemeris';
import type { ChebyshevEphemeris } from '../ephemeris';

/** The normalised orbit solution every engine run starts from (server/engine/input/solution.ts). */
export type OrbitSolution = NormalizedOrbit;

export type AssessMethod = 'linear' | 'mc' | 'lov';

export type AssessOptions = {
  /** End of the assessment window, TDB days since J2000.0 (the window starts at the solution epoch). */
  untilTdbDays: number;
  /** Methods to run ('all' on the CLI means all three). */
  methods: AssessMethod[];
  /** Monte Carlo sample size (number of virtual asteroids). */
  clones: number;
  /** Seed of the per-clone random streams (RandomStream.forClone(seed, k)). */
  seed: number;
  /** Bodies whose close approaches are monitored (default ['earth'] in the CLI). */
  bodies: EphemerisBody[];
  /** Close-approach reporting threshold, AU. */
  maxAu: number;
  /** Date of the analysis (for Palermo Delta T), TDB days since J2000.0. */
  analysisTdbDays: number;
  /** Worker threads for Monte Carlo (default: every core). */
  workers?: number;
  /** Repair a non-positive-definite covariance by eigenvalue clipping (reported in the output). Default false. */
  repairCovariance?: boolean;
  /** IAS15 precision parameter epsilon (default 1e-9). */
  tolerance?: number;
};

export type McProgress = { done: number; total: number; rateClonesPerS: number; etaS: number | null };

export type McHooks = {
  onProgress?(p: McProgress): void;
  signal?: AbortSignal;
};

/**
 * One encounter window of the Monte Carlo run: clone close approaches to the same body grouped by time
 * (gap rule documented in windows.ts).
 */
export type McWindow = {
  body: EphemerisBody;
  tdbDaysMin: number;
  tdbDaysMax: number;
  tdbDaysMedian: number;
  /** Clones that reached the surface in this window. */
  hits: number;
  /** Clones propagated (the denominator of the estimate). */
  samples: number;
  minDistanceKm: { min: number; median: number; max: number };
  /** A capped subset (e.g. <= 5000) of b-plane points for plots. */
  bPlanePoints: { xiKm: number; zetaKm: number; impact: boolean }[];
  /** Median geocentric (planet-centred) v-infinity of the clones in the window, km/s. */
  vInfinityKmS: number;
};

export type McResult = { samples: number; seed: number; windows: McWindow[] };

/** Signature of MC's runMonteCarlo (server/engine/assess/montecarlo.ts). */
export type RunMonteCarlo = (
  solution: OrbitSolution,
  opts: AssessOptions & { ephemeris?: ChebyshevEphemeris },
  hooks?: McHooks,
) => Promise<McResult>;

/** Hooks accepted by assess(): progress of the long-running parts, cancellation. */
export type AssessHooks = {
  onProgress?(p: { stage: 'linear' | 'lov' | 'mc'; done: number; total: number; rateClonesPerS?: number; etaS?: number | null }): void;
  signal?: AbortSignal;
};
