// The engine's assess JSON (issue 4 item 8; built by server/engine/assess/assess.ts) as a zod schema, for the
// client (result tables, plots), the server (seed, exports) and the PDF renderer.
// Every object is loose (passthrough): the engine may add fields beside the fixed ones and they are kept.
// Units are in the names: km, km/s, Mt, m; epochs are TDB Julian dates (epochTdbJd) or UTC ISO strings (utc).
import { z } from 'zod';

const num = z.number();
const numOrNull = z.number().nullable();

/** {nominal, low, high}; every value null when it does not apply. */
export const rangeSchema = z.looseObject({ nominal: numOrNull, low: numOrNull, high: numOrNull });
export type AssessRange = z.infer<typeof rangeSchema>;

const pairSchema = z.tuple([num, num]);

export const monteCarloIpSchema = z.looseObject({
  hits: numOrNull,
  samples: numOrNull,
  estimate: numOrNull,
  ci95: pairSchema.nullable(),
  upperBound95: numOrNull,
});
export type MonteCarloIp = z.infer<typeof monteCarloIpSchema>;

export const impactProbabilitySchema = z.looseObject({
  linear: numOrNull,
  monteCarlo: monteCarloIpSchema.nullable(),
  lov: numOrNull,
});
export type ImpactProbabilities = z.infer<typeof impactProbabilitySchema>;

/** A b-plane point of one Monte Carlo clone (km; impact = reached the surface). */
export const bPlanePointSchema = z.looseObject({ xiKm: num, zetaKm: num, impact: z.boolean().optional() });
export type BPlanePoint = z.infer<typeof bPlanePointSchema>;

export const linearValiditySchema = z.looseObject({
  valid: z.boolean().nullable(),
  nonlinearity: numOrNull,
  reasons: z.array(z.string()),
  /**
   * Near-disk test of the linear map (engine linear.ts; absent in older results or when not run): the test solution
   * where the linear trace passes closest to the disk centre, its cross-trace error and capture-radius change, the gap
   * m to the disk edge and its error delta (sigma_minor), and the factor exp(|m delta| + delta^2/2) on the tail IP.
   */
  nearDisk: z
    .looseObject({
      alongSigmas: num,
      clamped: z.boolean(),
      crossTraceErrorKm: num,
      crossTraceErrorSigmaMinor: num,
      captureRadiusChangeKm: num,
      gapSigmaMinor: num,
      gapErrorSigmaMinor: num,
      tailFactor: numOrNull,
      tailFactorLog10: num,
      negligible: z.boolean(),
    })
    .nullable()
    .optional(),
});

export const approachSchema = z.looseObject({
  body: z.string(),
  epochTdbJd: num,
  utc: z.string(),
  utcPredicted: z.boolean().optional(),
  /** Nominal closest distance, planet centre to object, km. */
  distanceKm: num,
  relativeSpeedKmS: num,
  vInfinityKmS: numOrNull,
  bPlane: z.looseObject({ xiKm: num, zetaKm: num }).nullable(),
  impact: z.boolean(),
  distanceSigmaKm: numOrNull,
  impactProbability: impactProbabilitySchema,
  energyMt: rangeSchema,
  palermo: numOrNull,
  torino: numOrNull,
  // Extra fields of assess.ts (optional: older results or windows may lack them).
  ratingProbabilitySource: z.string().nullable().optional(),
  methodFlags: z.array(z.string()).optional(),
  windowEdge: z.unknown().optional(),
  captureRadiusKm: numOrNull.optional(),
  /** 2 x 2 covariance of (xi, zeta), km^2. */
  bPlaneCovarianceKm2: z.array(z.array(num)).nullable().optional(),
  bPlaneSigmasKm: z.looseObject({ major: num, minor: num, majorAxisAngleRad: num }).nullable().optional(),
  distanceRangeKm: z.looseObject({ oneSigma: pairSchema, threeSigma: pairSchema }).nullable().optional(),
  encounterTime: z
    .looseObject({ sigmaSeconds: num, oneSigmaUtc: z.array(z.string()), threeSigmaUtc: z.array(z.string()) })
    .nullable()
    .optional(),
  linearValidity: linearValiditySchema.nullable().optional(),
  monteCarloPhrase: z.string().nullable().optional(),
  lovDetail: z.unknown().optional(),
  palermoDetail: z.unknown().optional(),
  notes: z.array(z.string()).optional(),
  /**
   * Monte Carlo b-plane points of the clones in this encounter's window (capped subset), when the engine passes
   * them through (McWindow.bPlanePoints). Absent in linear-only runs.
   */
  monteCarloBPlanePoints: z.array(bPlanePointSchema).optional(),
});
export type Approach = z.infer<typeof approachSchema>;

/** An encounter window found by Monte Carlo or LOV with no nominal approach. */
export const otherWindowSchema = z.looseObject({
  source: z.string(),
  body: z.string(),
  epochTdbJd: num,
  utc: z.string(),
  epochRangeTdbJd: pairSchema.optional(),
  minDistanceKm: z.looseObject({ min: num, median: num, max: num }).optional(),
  vInfinityKmS: numOrNull,
  impactProbability: impactProbabilitySchema,
  energyMt: rangeSchema,
  palermo: numOrNull,
  torino: numOrNull,
  ratingProbabilitySource: z.string().nullable().optional(),
  methodFlags: z.array(z.string()).optional(),
  bPlanePoints: z.array(bPlanePointSchema).optional(),
});
export type OtherWindow = z.infer<typeof otherWindowSchema>;

export const assumptionSchema = z.looseObject({ quantity: z.string(), value: z.string(), source: z.string() });
export type ConsequenceAssumption = z.infer<typeof assumptionSchema>;

export const assessProvenanceSchema = z.looseObject({
  inputSha256: z.string(),
  engineVersion: z.string(),
  ephemeris: z.string(),
  integrator: z.string(),
  tolerance: num,
  seed: numOrNull,
  clones: numOrNull,
  methods: z.array(z.string()).optional(),
  dynamics: z.string().optional(),
  analysisTdbJd: num.optional(),
  windowTdbJd: pairSchema.optional(),
  maxAu: num.optional(),
  bodies: z.array(z.string()).optional(),
  timings: z.record(z.string(), num).optional(),
});

export const assessResultSchema = z.looseObject({
  object: z.string(),
  analysisDateUtc: z.string(),
  provenance: assessProvenanceSchema,
  approaches: z.array(approachSchema),
  palermoCumulative: numOrNull,
  torinoMax: numOrNull,
  diameterM: rangeSchema,
  classification: z
    .looseObject({
      bound: z.boolean(),
      eccentricity: num,
      eccentricitySigma: numOrNull,
      unboundSignificance: numOrNull,
      heliocentricVInfinityKmS: numOrNull,
      perihelionAu: numOrNull,
      note: z.string(),
    })
    .optional(),
  covariance: z.unknown().optional(),
  otherWindows: z.array(otherWindowSchema).optional(),
  methodNotes: z
    .looseObject({
      linear: z.string().nullable().optional(),
      monteCarlo: z.string().nullable().optional(),
      lov: z.string().nullable().optional(),
      ratingProbability: z.string().nullable().optional(),
      consequences: z.array(assumptionSchema).nullable().optional(),
      palermo: z.string().nullable().optional(),
      torino: z.string().nullable().optional(),
    })
    .optional(),
  notes: z.array(z.string()).optional(),
});
export type AssessmentResult = z.infer<typeof assessResultSchema>;

/** Parse a run's `result` (unknown JSON) into the typed assessment, or throw a ZodError. */
export function parseAssessment(result: unknown): AssessmentResult {
  return assessResultSchema.parse(result);
}

/** Parse without throwing: the typed assessment or null with the first problem. */
export function safeParseAssessment(result: unknown): { ok: true; value: AssessmentResult } | { ok: false; error: string } {
  const r = assessResultSchema.safeParse(result);
  if (r.success) return { ok: true, value: r.data };
  const i = r.error.issues[0];
  return { ok: false, error: `${i.path.join('.') || '(root)'}: ${i.message}` };
}
