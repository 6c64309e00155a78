// Tracked objects and their orbit-solution versions (issue 5 items 1, 2 and 6).
// Shared by the server (validation, response shapes) and the client (forms, tables).
// Dates are ISO 8601 strings (UTC); epochs are TDB days since J2000 (name ends in TdbDays).
import { z } from 'zod';
import { normalizedOrbitSchema } from './orbit';

export const TRACKED_OBJECT_KINDS = ['near-earth-asteroid', 'comet', 'unbound'] as const;
export const trackedObjectKindSchema = z.enum(TRACKED_OBJECT_KINDS);
export type TrackedObjectKind = z.infer<typeof trackedObjectKindSchema>;

export const TRACKED_OBJECT_KIND_LABELS: Record<TrackedObjectKind, string> = {
  'near-earth-asteroid': 'Near-Earth asteroid',
  comet: 'Comet',
  unbound: 'Unbound (interstellar)',
};

export const designationSchema = z
  .string()
  .trim()
  .min(1, 'Enter a designation')
  .max(32, 'Designation is too long (at most 32 characters)')
  .regex(/^[A-Za-z0-9][A-Za-z0-9 ./_-]*$/, 'Use letters, digits, spaces and . / _ - (starting with a letter or digit)');

const objectNameSchema = z.string().trim().max(120, 'Name is too long');
const notesSchema = z.string().max(10_000, 'Notes are too long (at most 10 000 characters)');

export const createObjectBodySchema = z.strictObject({
  designation: designationSchema,
  /** Empty string means "no name". */
  name: objectNameSchema.optional(),
  kind: trackedObjectKindSchema,
  notes: notesSchema.optional(),
  watch: z.boolean().optional(),
});
export type CreateObjectBody = z.infer<typeof createObjectBodySchema>;

export const updateObjectBodySchema = z
  .strictObject({
    name: objectNameSchema.optional(),
    notes: notesSchema.optional(),
    watch: z.boolean().optional(),
  })
  .refine((b) => b.name !== undefined || b.notes !== undefined || b.watch !== undefined, { message: 'Nothing to change' });
export type UpdateObjectBody = z.infer<typeof updateObjectBodySchema>;

/** Columns the object list can be sorted by; "-column" sorts descending. Each has an index. */
export const OBJECT_SORT_COLUMNS = [
  'designation',
  'name',
  'kind',
  'createdAt',
  'latestSolutionAt',
  'nextCloseApproachAt',
  'maxImpactProbability',
  'cumulativePalermo',
  'maxTorino',
  'lastRunAt',
] as const;
export type ObjectSortColumn = (typeof OBJECT_SORT_COLUMNS)[number];
const SORT_VALUES = [...OBJECT_SORT_COLUMNS, ...OBJECT_SORT_COLUMNS.map((c) => `-${c}` as const)] as const;
export const objectSortSchema = z.enum(SORT_VALUES);
export type ObjectSort = z.infer<typeof objectSortSchema>;

export const MAX_PAGE_SIZE = 200;

export const objectListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(MAX_PAGE_SIZE).default(50),
  sort: objectSortSchema.default('designation'),
  /** Search in designation and name (case-insensitive substring). */
  q: z.string().trim().max(64).optional(),
  kind: trackedObjectKindSchema.optional(),
  watch: z.enum(['true', 'false']).transform((v) => v === 'true').optional(),
});
export type ObjectListQuery = z.input<typeof objectListQuerySchema>;
export type ObjectListParams = z.output<typeof objectListQuerySchema>;

const userRefSchema = z.object({ id: z.number().int(), name: z.string() }).nullable();

/** One row of the object list (and the head of the object page). Risk columns stay null until runs exist. */
export const trackedObjectSchema = z.object({
  id: z.number().int(),
  designation: z.string(),
  name: z.string().nullable(),
  kind: trackedObjectKindSchema,
  notes: z.string(),
  watch: z.boolean(),
  createdBy: userRefSchema,
  createdAt: z.string(),
  updatedAt: z.string(),
  solutionCount: z.number().int(),
  latestSolutionVersion: z.number().int().nullable(),
  latestSolutionAt: z.string().nullable(),
  /** UTC of the next close approach found by the latest run. */
  nextCloseApproachAt: z.string().nullable(),
  maxImpactProbability: z.number().nullable(),
  cumulativePalermo: z.number().nullable(),
  maxTorino: z.number().int().nullable(),
  lastRunAt: z.string().nullable(),
});
export type TrackedObject = z.infer<typeof trackedObjectSchema>;

export const objectListResponseSchema = z.object({
  items: z.array(trackedObjectSchema),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
  sort: objectSortSchema,
});
export type ObjectListResponse = z.infer<typeof objectListResponseSchema>;

// ------------------------------------------------------------------------------------------------
// Orbit solutions

/** 'fit': adopted from an orbit fit of the object's astrometry (issue 8; the remark records which fit and why). */
export const SOLUTION_SOURCE_KINDS = ['opm', 'json', 'form', 'fit'] as const;
export const solutionSourceKindSchema = z.enum(SOLUTION_SOURCE_KINDS);
/** How each source kind is named on screen (the Tocsin JSON written by an adopted orbit fit reads "Orbit fit"). */
export const SOLUTION_SOURCE_LABELS: Record<(typeof SOLUTION_SOURCE_KINDS)[number], string> = {
  opm: 'CCSDS OPM',
  json: 'Tocsin JSON',
  form: 'Entered elements',
  fit: 'Orbit fit',
};
export const FORCE_MODELS = ['gravity-only', 'non-gravitational'] as const;
export const forceModelSchema = z.enum(FORCE_MODELS);
export const nonGravTermSchema = z.enum(['A1', 'A2', 'A3']);

/** Where an upload is wrong: "line 12", "field covariance.matrix[2][1]", "file", "designation". */
export const uploadIssueSchema = z.object({ where: z.string(), message: z.string() });
export type UploadIssue = z.infer<typeof uploadIssueSchema>;
/** `details` of the 422 answer to a refused upload. */
export const uploadErrorDetailsSchema = z.object({ issues: z.array(uploadIssueSchema).min(1) });

/** Fit statistics that OPM and the Tocsin JSON do not carry: sent beside the file (multipart fields) or in the form. */
export const solutionFitFieldsSchema = z.object({
  observationArcDays: z.coerce.number().min(0, 'must be >= 0').max(1e6).optional(),
  observationCount: z.coerce.number().int('must be a whole number').min(1, 'must be at least 1').max(10_000_000).optional(),
  fitRmsArcsec: z.coerce.number().min(0, 'must be >= 0').max(1e4).optional(),
  /** Free-text remark of the analyst about this version. */
  remark: z.string().max(2000).optional(),
});
export type SolutionFitFields = z.infer<typeof solutionFitFieldsSchema>;

/** Multipart fields next to `file` (strings, coerced). */
export const solutionUploadFieldsSchema = solutionFitFieldsSchema.strict();

/**
 * JSON body of a solution entered in a form: `solution` is a Tocsin JSON orbit (shared/schemas/orbit.ts),
 * checked by the engine like an uploaded file; `designation` may be left out (the object's is used).
 */
export const solutionFormBodySchema = solutionFitFieldsSchema
  .extend({ solution: z.record(z.string(), z.unknown()) })
  .strict();
export type SolutionFormBody = z.infer<typeof solutionFormBodySchema>;

export const classificationSummarySchema = z.object({
  eccentricity: z.number(),
  eccentricitySigma: z.number().nullable(),
  /** (e − 1)/σ_e; null without a covariance. */
  unboundSignificance: z.number().nullable(),
  bound: z.boolean(),
  perihelionAu: z.number(),
  vInfinityKmS: z.number().nullable(),
  method: z.string(),
});
export type ClassificationSummary = z.infer<typeof classificationSummarySchema>;

export const solutionSummarySchema = z.object({
  id: z.number().int(),
  objectId: z.number().int(),
  version: z.number().int(),
  sourceKind: solutionSourceKindSchema,
  fileName: z.string().nullable(),
  inputSha256: z.string(),
  epochTdbDays: z.number(),
  epochUtc: z.string(),
  observationArcDays: z.number().nullable(),
  observationCount: z.number().int().nullable(),
  fitRmsArcsec: z.number().nullable(),
  forceModel: forceModelSchema,
  nonGravTerms: z.array(nonGravTermSchema),
  remark: z.string().nullable(),
  classification: classificationSummarySchema,
  createdBy: userRefSchema,
  createdAt: z.string(),
});
export type SolutionSummary = z.infer<typeof solutionSummarySchema>;

/** One quantity of a solution with its 1-sigma (null when the solution has no covariance for it). */
export const quantityRowSchema = z.object({
  key: z.string(),
  label: z.string(),
  unit: z.string(),
  value: z.number().nullable(),
  sigma: z.number().nullable(),
});
export type QuantityRow = z.infer<typeof quantityRowSchema>;

export const solutionSchema = solutionSummarySchema.extend({
  orbit: normalizedOrbitSchema,
  rawText: z.string(),
  /** Osculating heliocentric elements (J2000 ecliptic) at the epoch with 1-sigma (method as in the comparison). */
  elements: z.array(quantityRowSchema),
  nonGrav: z.array(quantityRowSchema),
});
export type Solution = z.infer<typeof solutionSchema>;

export const solutionListResponseSchema = z.object({ solutions: z.array(solutionSummarySchema) });
export type SolutionListResponse = z.infer<typeof solutionListResponseSchema>;

export const solutionParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
  version: z.coerce.number().int().positive(),
});

export const compareQuerySchema = z.object({
  a: z.coerce.number().int().positive(),
  b: z.coerce.number().int().positive(),
});

const valueSigmaSchema = z.object({ value: z.number().nullable(), sigma: z.number().nullable() });

export const compareRowSchema = z.object({
  key: z.string(),
  label: z.string(),
  unit: z.string(),
  a: valueSigmaSchema,
  b: valueSigmaSchema,
  /** σ(b)/σ(a); > 1 means the uncertainty widened from a to b. Null when either σ is missing or σ(a) = 0. */
  sigmaRatio: z.number().nullable(),
});
export type CompareRow = z.infer<typeof compareRowSchema>;

export const compareResponseSchema = z.object({
  objectId: z.number().int(),
  a: solutionSummarySchema,
  b: solutionSummarySchema,
  elements: z.array(compareRowSchema),
  nonGrav: z.array(compareRowSchema),
  summary: z.object({
    /** Elements whose σ grew / shrank by more than 10 % from a to b. */
    widened: z.array(z.string()),
    narrowed: z.array(z.string()),
    /** Geometric mean of the element σ ratios (b/a), null when none can be formed. */
    meanSigmaRatio: z.number().nullable(),
  }),
  method: z.string(),
});
export type CompareResponse = z.infer<typeof compareResponseSchema>;
