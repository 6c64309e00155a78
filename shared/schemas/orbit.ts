/**
 * Tocsin's own JSON orbit solution (input), and the normalised orbit every engine run starts from (output of
 * server/engine/input/solution.ts). Shared so the server validates uploads and the client shows the same fields.
 *
 * Conventions (units are in the field names):
 * - Cartesian state: heliocentric, ICRF equatorial axes ("EME2000" is taken as ICRF axes), AU and AU/day.
 * - Elements: heliocentric cometary elements in the J2000 ECLIPTIC, obliquity IAU 1976 (84381.448"), the convention
 *   of small-body element catalogues. Angles in degrees. Timing by time of perihelion `perihelionTime` (an epoch
 *   string) or `meanAnomalyDeg` (ellipses and hyperbolas only).
 * - Epoch strings: "2030-01-01T00:00:00Z" (UTC), "TDB:2030-01-01T00:00:00" (TDB calendar), "JD:2462502.5" (TDB JD).
 * - Non-gravitational parameters A1, A2, A3 in AU/day² with law 'water-ice' (Marsden–Sekanina–Yeomans g(r)) or
 *   'inverse-square' (g = (1 AU / r)²).
 * - Covariance: full symmetric matrix, up to 9×9, rows and columns named by `parameters`:
 *     Cartesian: x, y, z [AU], vx, vy, vz [AU/d]; elements: q [AU], e, i, node, argPeri [deg], and tp [d] or
 *     meanAnomaly [deg]; optionally a1, a2, a3 [AU/d²]. The six state (or element) parameters are required.
 */
import { z } from 'zod';

export const EPOCH_TEXT_PATTERN =
  /^(\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z|TDB:\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?|JD:\d{1,8}(\.\d*)?)$/;

export const epochTextSchema = z
  .string()
  .trim()
  .regex(
    EPOCH_TEXT_PATTERN,
    'epoch must be "2030-01-01T00:00:00Z" (UTC), "TDB:2030-01-01T00:00:00" (TDB) or "JD:2462502.5" (TDB Julian date)',
  );

const finite = z.number().refine(Number.isFinite, 'must be a finite number');
export const vec3Schema = z.tuple([finite, finite, finite]);

export const nonGravLawSchema = z.enum(['water-ice', 'inverse-square']);
export const nonGravSchema = z.object({
  /** radial A1, AU/d² */
  a1: finite,
  /** transverse A2, AU/d² */
  a2: finite,
  /** normal A3, AU/d² */
  a3: finite,
  law: nonGravLawSchema.default('water-ice'),
});

export const objectKindSchema = z.enum(['asteroid', 'comet', 'interstellar', 'unknown']);

export const cartesianStateSchema = z.object({
  positionAu: vec3Schema,
  velocityAuD: vec3Schema,
});

export const cometaryElementsSchema = z
  .object({
    perihelionDistanceAu: finite.refine((v) => v > 0, 'must be > 0'),
    eccentricity: finite.refine((v) => v >= 0, 'must be >= 0'),
    inclinationDeg: finite.refine((v) => v >= 0 && v <= 180, 'must be in [0, 180]'),
    ascendingNodeDeg: finite,
    argPerihelionDeg: finite,
    /** time of perihelion passage (epoch string) */
    perihelionTime: epochTextSchema.optional(),
    /** mean anomaly at the solution epoch (not for e = 1) */
    meanAnomalyDeg: finite.optional(),
  })
  .superRefine((el, ctx) => {
    const n = Number(el.perihelionTime !== undefined) + Number(el.meanAnomalyDeg !== undefined);
    if (n !== 1) {
      ctx.addIssue({
        code: 'custom',
        message: 'give exactly one of perihelionTime or meanAnomalyDeg',
        path: ['perihelionTime'],
      });
    }
    if (el.meanAnomalyDeg !== undefined && el.eccentricity === 1) {
      ctx.addIssue({ code: 'custom', message: 'mean anomaly is undefined for e = 1: use perihelionTime', path: ['meanAnomalyDeg'] });
    }
  });

export const CARTESIAN_PARAMETERS = ['x', 'y', 'z', 'vx', 'vy', 'vz'] as const;
export const ELEMENT_PARAMETERS = ['q', 'e', 'i', 'node', 'argPeri'] as const;
export const NONGRAV_PARAMETERS = ['a1', 'a2', 'a3'] as const;
export const COVARIANCE_PARAMETER_NAMES = [
  ...CARTESIAN_PARAMETERS,
  ...ELEMENT_PARAMETERS,
  'tp',
  'meanAnomaly',
  ...NONGRAV_PARAMETERS,
] as const;

export const covarianceSchema = z
  .object({
    parameters: z.array(z.enum(COVARIANCE_PARAMETER_NAMES)).min(6).max(9),
    matrix: z.array(z.array(finite)),
  })
  .superRefine((cov, ctx) => {
    const n = cov.parameters.length;
    if (new Set(cov.parameters).size !== n) {
      ctx.addIssue({ code: 'custom', message: 'parameter names must be unique', path: ['parameters'] });
    }
    if (cov.matrix.length !== n) {
      ctx.addIssue({ code: 'custom', message: `matrix must have ${n} rows (one per parameter)`, path: ['matrix'] });
      return;
    }
    cov.matrix.forEach((row, i) => {
      if (row.length !== n) {
        ctx.addIssue({ code: 'custom', message: `row ${i} must have ${n} entries`, path: ['matrix', i] });
      }
    });
    if (cov.matrix.some((row) => row.length !== n)) return;
    for (let i = 0; i < n; i++) {
      if (!(cov.matrix[i][i] >= 0)) {
        ctx.addIssue({ code: 'custom', message: 'variance (diagonal) must be >= 0', path: ['matrix', i, i] });
      }
      for (let j = 0; j < i; j++) {
        const a = cov.matrix[i][j];
        const b = cov.matrix[j][i];
        const scale = Math.sqrt(Math.abs(cov.matrix[i][i] * cov.matrix[j][j])) || Math.max(Math.abs(a), Math.abs(b));
        if (Math.abs(a - b) > 1e-9 * scale) {
          ctx.addIssue({ code: 'custom', message: `matrix is not symmetric ([${i}][${j}] ≠ [${j}][${i}])`, path: ['matrix', i, j] });
        }
      }
    }
  });

export const orbitSolutionInputSchema = z
  .object({
    /** optional format tag */
    format: z.literal('tocsin-orbit/1').optional(),
    designation: z.string().trim().min(1).max(64),
    name: z.string().trim().min(1).max(128).optional(),
    epoch: epochTextSchema,
    cartesian: cartesianStateSchema.optional(),
    elements: cometaryElementsSchema.optional(),
    covariance: covarianceSchema.optional(),
    nonGrav: nonGravSchema.optional(),
    hMagnitude: finite.refine((v) => v > -5 && v < 40, 'must be between -5 and 40').optional(),
    albedo: finite.refine((v) => v > 0 && v <= 1, 'must be in (0, 1]').optional(),
    kind: objectKindSchema.optional(),
    notes: z.string().max(10_000).optional(),
  })
  .strict()
  .superRefine((o, ctx) => {
    if ((o.cartesian === undefined) === (o.elements === undefined)) {
      ctx.addIssue({ code: 'custom', message: 'give exactly one of cartesian or elements', path: ['cartesian'] });
    }
    const cov = o.covariance;
    if (!cov) return;
    const required: readonly string[] =
      o.cartesian !== undefined
        ? CARTESIAN_PARAMETERS
        : [...ELEMENT_PARAMETERS, o.elements?.perihelionTime !== undefined ? 'tp' : 'meanAnomaly'];
    for (const p of required) {
      if (!cov.parameters.includes(p as (typeof COVARIANCE_PARAMETER_NAMES)[number])) {
        ctx.addIssue({ code: 'custom', message: `covariance must include parameter '${p}'`, path: ['covariance', 'parameters'] });
      }
    }
    cov.parameters.forEach((p, k) => {
      const isNg = (NONGRAV_PARAMETERS as readonly string[]).includes(p);
      if (!isNg && !required.includes(p)) {
        ctx.addIssue({
          code: 'custom',
          message: `parameter '${p}' does not belong to a ${o.cartesian ? 'Cartesian' : 'element'} solution`,
          path: ['covariance', 'parameters', k],
        });
      }
      if (isNg && !o.nonGrav) {
        ctx.addIssue({ code: 'custom', message: `parameter '${p}' needs nonGrav`, path: ['covariance', 'parameters', k] });
      }
    });
  });

export type OrbitSolutionInput = z.infer<typeof orbitSolutionInputSchema>;
export type NonGravInput = z.infer<typeof nonGravSchema>;
export type CovarianceInput = z.infer<typeof covarianceSchema>;

/**
 * The normalised orbit solution every engine run starts from: heliocentric ICRF state in AU and AU/d at the epoch
 * (TDB days since J2000), covariance in those units (rows x, y, z, vx, vy, vz [, a1, a2, a3]).
 */
export const normalizedOrbitSchema = z.object({
  designation: z.string(),
  name: z.string().nullable(),
  epochTdbDays: finite,
  epochTdbJd: finite,
  positionAu: vec3Schema,
  velocityAuD: vec3Schema,
  covariance: z
    .object({
      parameters: z.array(z.enum(['x', 'y', 'z', 'vx', 'vy', 'vz', 'a1', 'a2', 'a3'])),
      matrix: z.array(z.array(finite)),
    })
    .nullable(),
  nonGrav: z.object({ a1: finite, a2: finite, a3: finite, law: nonGravLawSchema }).nullable(),
  hMagnitude: finite.nullable(),
  albedo: finite.nullable(),
  kind: objectKindSchema,
  notes: z.array(z.string()),
  source: z.object({
    format: z.enum(['ccsds-opm-kvn', 'tocsin-json']),
    inputSha256: z.string().regex(/^[0-9a-f]{64}$/),
    epochText: z.string(),
    timeScale: z.enum(['UTC', 'TDB']),
  }),
});

export type NormalizedOrbit = z.infer<typeof normalizedOrbitSchema>;
