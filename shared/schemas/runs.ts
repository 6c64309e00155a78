// Assessment runs (issue 5 item 3): durable engine jobs over one orbit-solution version.
// Shared by the server (validation, response shapes) and the client (start-run form, run page).
// Dates are ISO 8601 strings (UTC). The engine's assess JSON is carried as-is under `result`.
import { z } from 'zod';

export const RUN_STATUSES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export const runStatusSchema = z.enum(RUN_STATUSES);
export type RunStatus = z.infer<typeof runStatusSchema>;
/** Statuses a run never leaves. */
export const FINISHED_RUN_STATUSES: readonly RunStatus[] = ['done', 'failed', 'cancelled'];

export const RUN_METHODS = ['linear', 'lov', 'mc'] as const;
export const runMethodSchema = z.enum(RUN_METHODS);
export type RunMethod = z.infer<typeof runMethodSchema>;
export const RUN_METHOD_LABELS: Record<RunMethod, string> = {
  linear: 'Linear (b-plane)',
  lov: 'Line of variations',
  mc: 'Monte Carlo',
};

/** Bodies whose close approaches a run can monitor (the engine ephemeris bodies; the Sun is the origin). */
export const RUN_BODIES = ['mercury', 'venus', 'earth', 'moon', 'mars', 'jupiter', 'saturn', 'uranus', 'neptune'] as const;
export const runBodySchema = z.enum(RUN_BODIES);
export type RunBody = z.infer<typeof runBodySchema>;

/** Largest Monte Carlo sample one run may ask for (2 cores; larger runs belong to a batch tool). */
export const MAX_RUN_CLONES = 100_000;
export const MAX_RUN_SEED = 2 ** 31 - 1;

/**
 * POST /api/runs. `until` is an epoch in one of the engine's forms: "2030-01-01T00:00:00Z" (UTC),
 * "TDB:2030-01-01T00:00:00" (TDB) or "JD:2462502.5" (TDB Julian date); it must be after the solution epoch
 * (checked by the server, 422). `clones` only matters for 'mc'.
 */
export const createRunBodySchema = z.strictObject({
  solutionId: z.number().int().positive(),
  until: z.string().trim().min(1, 'Enter the end of the window').max(64, 'Too long for an epoch'),
  methods: z
    .array(runMethodSchema)
    .min(1, 'Choose at least one method')
    .refine((m) => new Set(m).size === m.length, 'Each method once'),
  clones: z.number().int('must be a whole number').min(1, 'at least 1').max(MAX_RUN_CLONES, `at most ${MAX_RUN_CLONES}`).default(1000),
  seed: z.number().int('must be a whole number').min(0, 'must be >= 0').max(MAX_RUN_SEED, `at most ${MAX_RUN_SEED}`).default(1),
  bodies: z
    .array(runBodySchema)
    .min(1, 'Choose at least one body')
    .refine((b) => new Set(b).size === b.length, 'Each body once')
    .default(['earth']),
  /** Close-approach reporting threshold, AU (engine default 0.05). */
  maxAu: z.number().gt(0, 'must be > 0').lt(10, 'must be < 10').default(0.05),
});
export type CreateRunBody = z.input<typeof createRunBodySchema>;
export type CreateRunParams = z.output<typeof createRunBodySchema>;

export const runListQuerySchema = z.object({
  objectId: z.coerce.number().int().positive().optional(),
  solutionId: z.coerce.number().int().positive().optional(),
  status: runStatusSchema.optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type RunListQuery = z.input<typeof runListQuerySchema>;

/** What was asked for, as stored (epochs also converted, so the run can be repeated exactly). */
export const runOptionsSchema = z.object({
  until: z.string(),
  untilTdbDays: z.number(),
  methods: z.array(runMethodSchema),
  clones: z.number().int(),
  seed: z.number().int(),
  bodies: z.array(runBodySchema),
  maxAu: z.number(),
  /** Analysis date for Palermo's Delta T: the time the run was requested. */
  analysisUtc: z.string(),
  analysisTdbDays: z.number(),
});
export type RunOptions = z.infer<typeof runOptionsSchema>;

export const runProgressSchema = z.object({
  /** Engine stage reported last ('linear', 'lov', 'mc'), null before the first report. */
  stage: z.string().nullable(),
  done: z.number(),
  total: z.number(),
  rateClonesPerS: z.number().nullable(),
  etaS: z.number().nullable(),
});
export type RunProgress = z.infer<typeof runProgressSchema>;

const userRefSchema = z.object({ id: z.number().int(), name: z.string() }).nullable();

export const runSummarySchema = z.object({
  id: z.number().int(),
  objectId: z.number().int(),
  objectDesignation: z.string(),
  solutionId: z.number().int(),
  solutionVersion: z.number().int(),
  inputSha256: z.string(),
  options: runOptionsSchema,
  status: runStatusSchema,
  progress: runProgressSchema,
  /** Why it failed (status 'failed') or who/what cancelled it (status 'cancelled'). */
  error: z.string().nullable(),
  attempts: z.number().int(),
  createdBy: userRefSchema,
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});
export type RunSummary = z.infer<typeof runSummarySchema>;

/**
 * Provenance of a run: the solution version and its hash, the options, and (once the engine answered) its
 * version, ephemeris, integrator, tolerance, seed and clones. Kept open for the engine's extra fields.
 */
export const runProvenanceSchema = z
  .object({
    objectId: z.number().int(),
    designation: z.string(),
    solutionId: z.number().int(),
    solutionVersion: z.number().int(),
    inputSha256: z.string(),
    methods: z.array(runMethodSchema),
    /** Monte Carlo sample size and seed actually used; null when no Monte Carlo ran (the engine's convention). */
    clones: z.number().int().nullable(),
    seed: z.number().int().nullable(),
    engineVersion: z.string().optional(),
    ephemeris: z.string().optional(),
    integrator: z.string().optional(),
    tolerance: z.number().optional(),
  })
  .loose();
export type RunProvenance = z.infer<typeof runProvenanceSchema>;

export const runSchema = runSummarySchema.extend({
  provenance: runProvenanceSchema.nullable(),
  /** The engine's assess JSON (issue 4 item 8) when status is 'done', else null. */
  result: z.record(z.string(), z.unknown()).nullable(),
});
export type Run = z.infer<typeof runSchema>;

export const runListResponseSchema = z.object({ runs: z.array(runSummarySchema) });
export type RunListResponse = z.infer<typeof runListResponseSchema>;
