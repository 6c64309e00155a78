// Orbit determination (issue 8): observatories, optical astrometry, orbit fits and the gravity-only versus
// non-gravitational comparison. Shared by the engine (result shapes), the server (validation, stored JSON) and the
// client (forms, residual plots, comparison view). METHODS.md §9.
//
// Units are in the names: arcsec, deg, AU, AU/d, AU/d², km, TDB days since J2000 (`TdbDays`). Residuals are
// observed minus computed, RA residuals multiplied by cos(dec) (METHODS.md §9.1). UTC strings are ISO 8601 "…Z".
import { z } from 'zod';
import { nonGravLawSchema, epochTextSchema } from './orbit';

const finite = z.number().refine(Number.isFinite, 'must be a finite number');

// ---------------------------------------------------------------------------------------------------------------
// Observatories (the office's own table; METHODS.md §9.4)
// ---------------------------------------------------------------------------------------------------------------

/** Observatory code as used in the ADES `stn` field: 1 to 8 letters or digits. */
export const observatoryCodeSchema = z
  .string()
  .trim()
  .regex(/^[A-Za-z0-9]{1,8}$/, 'Code: 1 to 8 letters or digits');

/**
 * An observatory: east longitude plus either the parallax constants (rho cos phi', rho sin phi', in units of the
 * Earth's equatorial radius) or the geodetic latitude and height above the ellipsoid. Exactly one of the two pairs.
 */
export const observatorySchema = z
  .strictObject({
    code: observatoryCodeSchema,
    name: z.string().trim().min(1, 'Enter a name').max(128, 'Name is too long'),
    /** East longitude, degrees, [0, 360). */
    longitudeDeg: finite.refine((v) => v >= 0 && v < 360, 'Longitude must be in [0, 360) degrees east'),
    rhoCosPhi: finite.refine((v) => v >= 0 && v <= 1.001, 'rho cos phi\' must be in [0, 1.001]').nullable().default(null),
    rhoSinPhi: finite.refine((v) => v >= -1.001 && v <= 1.001, 'rho sin phi\' must be in [-1.001, 1.001]').nullable().default(null),
    geodeticLatitudeDeg: finite.refine((v) => v >= -90 && v <= 90, 'Latitude must be in [-90, 90] degrees').nullable().default(null),
    heightM: finite.refine((v) => v > -500 && v < 10_000, 'Height must be between -500 and 10 000 m').nullable().default(null),
  })
  .superRefine((o, ctx) => {
    const parallax = o.rhoCosPhi !== null || o.rhoSinPhi !== null;
    const geodetic = o.geodeticLatitudeDeg !== null || o.heightM !== null;
    if (parallax === geodetic) {
      ctx.addIssue({ code: 'custom', message: 'Give either both parallax constants or the geodetic latitude and height', path: ['rhoCosPhi'] });
      return;
    }
    if (parallax && (o.rhoCosPhi === null || o.rhoSinPhi === null)) {
      ctx.addIssue({ code: 'custom', message: 'Give both rho cos phi\' and rho sin phi\'', path: [o.rhoCosPhi === null ? 'rhoCosPhi' : 'rhoSinPhi'] });
    }
    if (geodetic && (o.geodeticLatitudeDeg === null || o.heightM === null)) {
      ctx.addIssue({ code: 'custom', message: 'Give both the geodetic latitude and the height', path: [o.geodeticLatitudeDeg === null ? 'geodeticLatitudeDeg' : 'heightM'] });
    }
  });
export type Observatory = z.output<typeof observatorySchema>;
export type ObservatoryInput = z.input<typeof observatorySchema>;

/** A file of observatories (CLI `--observatories FILE.json`, demo seed): `{ "observatories": [...] }`. */
export const observatoryFileSchema = z.strictObject({
  format: z.literal('tocsin-observatories/1').optional(),
  observatories: z.array(observatorySchema).min(1),
});

// ---------------------------------------------------------------------------------------------------------------
// Optical astrometry (IAU ADES PSV; METHODS.md §9.5)
// ---------------------------------------------------------------------------------------------------------------

/** One optical observation as read from an ADES PSV data line. */
export const opticalObservationSchema = z.object({
  /** 1-based line number in the file it came from. */
  line: z.number().int().positive(),
  permID: z.string().nullable(),
  provID: z.string().nullable(),
  trkSub: z.string().nullable(),
  /** ADES mode, e.g. CCD. */
  mode: z.string(),
  /** Observatory code (looked up in the office's table). */
  stn: z.string(),
  /** As written in the file, ISO 8601 UTC with "Z". */
  obsTime: z.string(),
  /** Same instant as TDB days since J2000 (engine time scales). */
  obsTimeTdbDays: finite,
  raDeg: finite,
  decDeg: finite,
  /** Uncertainty of RA·cos(dec), arcsec (null when the line has none: the fit then uses its default). */
  rmsRaArcsec: finite.nullable(),
  rmsDecArcsec: finite.nullable(),
  /** RA/Dec correlation in (-1, 1). */
  rmsCorr: finite.nullable(),
  astCat: z.string().nullable(),
  mag: finite.nullable(),
  band: z.string().nullable(),
  remarks: z.string().nullable(),
});
export type OpticalObservation = z.infer<typeof opticalObservationSchema>;

export const adesIssueSchema = z.object({
  /** 1-based line number (0 for the file as a whole). */
  line: z.number().int().min(0),
  /** ADES field name when one field is at fault. */
  field: z.string().nullable(),
  message: z.string(),
});
export type AdesIssue = z.infer<typeof adesIssueSchema>;

// ---------------------------------------------------------------------------------------------------------------
// Fit settings and results
// ---------------------------------------------------------------------------------------------------------------

export const NONGRAV_TERMS = ['a1', 'a2', 'a3'] as const;
export const nonGravTermSchema = z.enum(NONGRAV_TERMS);
export type NonGravTerm = z.infer<typeof nonGravTermSchema>;

/** Default uncertainty of an observation without rmsRA/rmsDec, arcsec (common practice, no source). */
export const DEFAULT_OBSERVATION_SIGMA_ARCSEC = 1.0;

/** Largest analyst sigma for a station (arcsec): beyond a minute of arc the observations carry no useful weight. */
export const MAX_STATION_SIGMA_ARCSEC = 60;

/** One station's analyst-set sigma (arcsec), used for RA·cos(dec) and Dec of all its observations in a fit. */
export const stationWeightSchema = z.strictObject({
  stn: observatoryCodeSchema,
  sigmaArcsec: z
    .number({ error: 'Sigma: enter a number of arcseconds' })
    .refine(Number.isFinite, 'Sigma must be a finite number of arcseconds')
    .refine((v) => v > 0, 'Sigma must be greater than 0 arcsec')
    .refine((v) => v <= MAX_STATION_SIGMA_ARCSEC, `Sigma must be at most ${MAX_STATION_SIGMA_ARCSEC} arcsec`),
});
export type StationWeight = z.infer<typeof stationWeightSchema>;

/** Largest |UT1 − UTC| in seconds: leap seconds keep UTC within 0.9 s of UT1 (IERS; common practice, no source). */
export const MAX_UT1_MINUS_UTC_SECONDS = 0.9;

export const fitSettingsSchema = z.strictObject({
  /** Solution epoch; default: the middle of the arc rounded to 0h TDB. */
  epoch: epochTextSchema.nullable().default(null),
  /** Non-gravitational terms to add in the second fit ([] = gravity-only fit only, no comparison). */
  nonGravTerms: z
    .array(nonGravTermSchema)
    .refine((t) => new Set(t).size === t.length, 'Each term once')
    .default([]),
  nonGravLaw: nonGravLawSchema.default('water-ice'),
  /** Reject and recover outliers by the chi-square rule (METHODS.md §9.1). */
  rejectOutliers: z.boolean().default(true),
  /** Where the iteration starts: Gauss's method (default) or an existing solution version of the object. */
  initialSolutionId: z.number().int().positive().nullable().default(null),
  /** Upper bound on differential-correction iterations per fit. */
  maxIterations: z.number().int().min(1).max(100).default(25),
  /**
   * Analyst reweighting of whole stations (METHODS.md §9.1 weights): observations of a listed station use
   * sigmaArcsec for both RA·cos(dec) and Dec, correlation dropped, instead of their reported rmsRA/rmsDec; the
   * nightly de-weighting still applies on top. [] = reported uncertainties everywhere (stored fits without the
   * field parse to []).
   */
  stationWeights: z
    .array(stationWeightSchema)
    .superRefine((list, ctx) => {
      const seen = new Map<string, number>();
      list.forEach((w, i) => {
        const before = seen.get(w.stn);
        if (before !== undefined) {
          ctx.addIssue({ code: 'custom', path: [i, 'stn'], message: `Station ${w.stn} is reweighted twice (entries ${before + 1} and ${i + 1}); give each station once` });
        } else seen.set(w.stn, i);
      });
    })
    .default([]),
  /**
   * UT1 − UTC (seconds) for the Earth rotation angle of the observer positions (METHODS.md §9.4), one value for the
   * whole arc (the analyst reads it from the IERS bulletins for the arc's dates). 0 means UT1 taken as UTC (stored
   * fits without the field parse to 0). Leap seconds keep UTC within 0.9 s of UT1 (IERS; common practice).
   */
  ut1MinusUtcSeconds: z
    .number({ error: 'UT1 − UTC: enter a number of seconds' })
    .refine(Number.isFinite, 'UT1 − UTC must be a finite number of seconds')
    .refine((v) => v >= -MAX_UT1_MINUS_UTC_SECONDS && v <= MAX_UT1_MINUS_UTC_SECONDS, `UT1 − UTC must be between −${MAX_UT1_MINUS_UTC_SECONDS} and ${MAX_UT1_MINUS_UTC_SECONDS} s (leap seconds keep UTC within ${MAX_UT1_MINUS_UTC_SECONDS} s of UT1)`)
    .default(0),
});
export type FitSettings = z.output<typeof fitSettingsSchema>;
export type FitSettingsInput = z.input<typeof fitSettingsSchema>;

export const RESIDUAL_STATUSES = ['used', 'rejected'] as const;

export const residualSchema = z.object({
  /** Index into the observation list the fit was given. */
  index: z.number().int().min(0),
  line: z.number().int().positive(),
  stn: z.string(),
  obsTime: z.string(),
  obsTimeTdbDays: finite,
  /** Observed minus computed RA·cos(dec), arcsec. */
  raCosDecArcsec: finite,
  decArcsec: finite,
  /** Weights used (arcsec). */
  sigmaRaArcsec: finite,
  sigmaDecArcsec: finite,
  /** chi_i² of METHODS.md §9.1 (2 degrees of freedom). */
  chiSquare: finite,
  status: z.enum(RESIDUAL_STATUSES),
});
export type Residual = z.infer<typeof residualSchema>;

/**
 * Residual statistics of one observatory in one fit (server/engine/od/stationStatistics.ts): whether its stated
 * uncertainties are borne out by its residuals, and its mean offset per coordinate. Null where no observation of
 * the station was used.
 */
export const stationStatisticsSchema = z.object({
  stn: z.string(),
  used: z.number().int(),
  notUsed: z.number().int(),
  rmsArcsec: finite.nullable(),
  rmsNormalized: finite.nullable(),
  /** 'too-few': fewer than 3 used observations, no verdict. */
  weights: z.enum(['consistent', 'understated', 'overstated', 'too-few']),
  /** Two-sided p-value of sum (xi/sigma)^2 against chi-square with 2n degrees of freedom. */
  weightsPValue: finite.nullable(),
  offsetRaCosDecArcsec: finite.nullable(),
  /** Offset / its standard error (scaled by the normalised RMS when above 1). */
  offsetRaCosDecSigma: finite.nullable(),
  offsetDecArcsec: finite.nullable(),
  offsetDecSigma: finite.nullable(),
});
export type StationStatistics = z.infer<typeof stationStatisticsSchema>;

export const fitIterationSchema = z.object({
  iteration: z.number().int().min(1),
  rmsNormalized: finite,
  /** dx^T C dx / dim of the correction (METHODS.md §9.1 convergence measure). */
  correctionMeasure: finite,
  used: z.number().int(),
  rejected: z.number().int(),
});

/** Heliocentric cometary elements in the J2000 ecliptic with their 1-sigma (from the fit covariance). */
export const elementWithSigmaSchema = z.object({ value: finite, sigma: finite.nullable() });
export const fittedElementsSchema = z.object({
  perihelionDistanceAu: elementWithSigmaSchema,
  eccentricity: elementWithSigmaSchema,
  inclinationDeg: elementWithSigmaSchema,
  ascendingNodeDeg: elementWithSigmaSchema,
  argPerihelionDeg: elementWithSigmaSchema,
  /** Time of perihelion, TDB days since J2000. */
  perihelionTimeTdbDays: elementWithSigmaSchema,
});

/** Predicted closest Earth approach after the arc and its linear 1-sigma (for the comparison). */
export const encounterUncertaintySchema = z.object({
  body: z.string(),
  closeApproachTdbDays: finite,
  closeApproachUtc: z.string(),
  distanceKm: finite,
  /** 1-sigma of the approach distance, km (linear propagation of the fit covariance). */
  distanceSigmaKm: finite,
  /** Largest 1-sigma semi-axis of the position uncertainty at that time, km. */
  positionSigmaMaxKm: finite,
  /** 1-sigma of the approach time, minutes. */
  timeSigmaMin: finite,
});

/**
 * Original (pre-entry) barycentric orbit of a near-parabolic or unbound fit (engine od/originalOrbit.ts, METHODS.md
 * §3.5): the fit integrated back (n-body, fitted non-grav) to heliocentric distanceAu, then barycentric two-body
 * elements (μ = Sun + planets). stop: 'distance' = an original orbit; 'aphelion' = a bound orbit turned back inside
 * the distance; 'time-limit' = neither within the time limit (the elements are then those at the stop).
 */
export const originalOrbitSchema = z.object({
  /** 1/a, 1/AU (negative = unbound) and its 1-sigma (linear propagation; null without covariance) */
  inverseSemiMajorAxisPerAu: finite,
  inverseSemiMajorAxisSigmaPerAu: finite.nullable(),
  eccentricity: finite,
  eccentricitySigma: finite.nullable(),
  /** −(1/a)/σ(1/a): positive = unbound */
  unboundSignificance: finite.nullable(),
  /** barycentric v∞, km/s, when 1/a < 0 */
  vInfinityKmS: finite.nullable(),
  stop: z.enum(['distance', 'aphelion', 'time-limit']),
  /** where the elements were taken: time (TDB days since J2000 and TDB calendar), heliocentric distance (AU) */
  tdbDays: finite,
  tdbCalendar: z.string(),
  heliocentricDistanceAu: finite,
  /** the target distance, AU */
  distanceAu: finite,
  yearsBack: finite,
  /** GM used, AU³/d² */
  muAu3D2: finite,
});
export type OriginalOrbitResult = z.infer<typeof originalOrbitSchema>;

export const fitResultSchema = z.object({
  label: z.enum(['gravity-only', 'non-gravitational']),
  status: z.enum(['converged', 'not-converged', 'failed']),
  /** Why it did not converge or failed (null when converged). */
  message: z.string().nullable(),
  epochTdbDays: finite,
  epochTdbJd: finite,
  positionAu: z.tuple([finite, finite, finite]),
  velocityAuD: z.tuple([finite, finite, finite]),
  nonGrav: z.object({ a1: finite, a2: finite, a3: finite, law: nonGravLawSchema }).nullable(),
  /** Solve-for parameters: x y z vx vy vz then the fitted non-grav terms. */
  parameters: z.array(z.enum(['x', 'y', 'z', 'vx', 'vy', 'vz', 'a1', 'a2', 'a3'])),
  /** Covariance of the parameters (AU, AU/d, AU/d²), same order; null if the normal matrix was singular. */
  covariance: z.array(z.array(finite)).nullable(),
  rmsNormalized: finite,
  rmsArcsec: finite,
  chiSquare: finite,
  observationsUsed: z.number().int(),
  observationsTotal: z.number().int(),
  degreesOfFreedom: z.number().int(),
  iterations: z.array(fitIterationSchema),
  residuals: z.array(residualSchema),
  elements: fittedElementsSchema.nullable(),
  /** Unbound orbits: eccentricity significance (e - 1) / sigma_e; null for e < 1 or without covariance. */
  unboundSignificance: finite.nullable(),
  vInfinityKmS: finite.nullable(),
  encounter: encounterUncertaintySchema.nullable(),
  /**
   * Original barycentric orbit, computed when the osculating e > 0.98 (null when not computed; absent in fits stored
   * before the field existed).
   */
  originalOrbit: originalOrbitSchema.nullable().optional(),
  /** Residual statistics by observatory (absent in fits stored before the field existed). */
  stations: z.array(stationStatisticsSchema).optional(),
});
export type FitResult = z.infer<typeof fitResultSchema>;

export const fitComparisonSchema = z.object({
  addedParameters: z.array(nonGravTermSchema),
  /**
   * chi²(gravity-only) - chi²(non-grav) over one set of observations: the set the non-gravitational fit uses. When
   * the gravity-only fit had rejected some of them, a gravity-only fit is redone on exactly that set (no outlier
   * passes) so both models are fitted to the same data (nested likelihood-ratio test).
   */
  deltaChiSquare: finite,
  /** How many observations the Δχ² is summed over (absent in fits stored before the field existed). */
  observationsCompared: z.number().int().optional(),
  /** Whether the gravity-only fit was redone on the non-gravitational fit's observation set for the Δχ². */
  gravityOnlyRefitted: z.boolean().optional(),
  /**
   * The gravity-only encounter prediction this comparison uses: the refit's when gravityOnlyRefitted (same data as
   * the non-gravitational fit), else the gravity-only fit's own; absent in fits stored before the field existed.
   */
  gravityOnlyEncounter: encounterUncertaintySchema.nullable().optional(),
  /** P(chi²_k >= deltaChiSquare) for k added parameters (likelihood-ratio test). */
  pValue: finite,
  /** The same p-value as a two-sided Gaussian sigma. */
  significanceSigma: finite,
  parameterSignificance: z.array(z.object({ term: nonGravTermSchema, valueAuD2: finite, sigmaAuD2: finite, signalToNoise: finite })),
  /**
   * 1-sigma of each element in both fits and their ratio (non-grav / gravity-only); when gravityOnlyRefitted, the
   * gravity-only sigmas are those of the refit on the non-gravitational fit's observations (same data).
   */
  elementSigmas: z.array(z.object({ element: z.string(), gravityOnly: finite.nullable(), nonGrav: finite.nullable(), ratio: finite.nullable() })),
  /** Systematic trend in the gravity-only residuals (e.g. a fitted slope/curvature of the residuals in time, in sigma). */
  residualTrend: z.object({ gravityOnlySigma: finite, nonGravSigma: finite, description: z.string() }),
  /** Plain-language summary of which fit the numbers favour and why. */
  verdict: z.string(),
});
export type FitComparison = z.infer<typeof fitComparisonSchema>;

/** What one orbit-determination job produces (engine `determineOrbit`). */
export const orbitDeterminationResultSchema = z.object({
  engineVersion: z.string(),
  observationsSha256: z.string(),
  observatoriesSha256: z.string(),
  settings: fitSettingsSchema,
  preliminary: z
    .object({
      method: z.enum(['gauss', 'initial-solution']),
      /** Indices of the three observations Gauss used. */
      observationIndices: z.array(z.number().int()),
      /** Admissible roots r2 (AU) and which was kept. */
      rootsAu: z.array(finite),
      chosenRootAu: finite.nullable(),
    })
    .nullable(),
  gravityOnly: fitResultSchema,
  nonGrav: fitResultSchema.nullable(),
  comparison: fitComparisonSchema.nullable(),
  arc: z.object({ firstUtc: z.string(), lastUtc: z.string(), days: finite, observations: z.number().int(), stations: z.array(z.string()) }),
  warnings: z.array(z.string()),
});
export type OrbitDeterminationResult = z.infer<typeof orbitDeterminationResultSchema>;
