/**
 * Normalise orbit input (CCSDS OPM 2.0 KVN or Tocsin's JSON, shared/schemas/orbit.ts) into one NormalizedOrbit:
 * designation, epoch (TDB days since J2000), heliocentric ICRF state in AU and AU/d, covariance in those units
 * (rows x, y, z, vx, vy, vz [, a1, a2, a3]), non-gravitational parameters, H, albedo, and the SHA-256 of the raw text.
 *
 * Conversions:
 * - OPM km, km/s -> AU, AU/d with AU = 149 597 870.700 km (exact) and 1 d = 86400 s; covariance C' = S C S with
 *   S = diag(1/AU ×3, 86400/AU ×3). "EME2000" is taken as the ICRF axes (frames.ts).
 * - JSON elements (J2000 ecliptic, IAU 1976 obliquity, degrees) -> ecliptic state -> ICRF equatorial.
 *   An element-space covariance is mapped with the Jacobian ∂(state)/∂(elements) computed by CENTRAL FINITE
 *   DIFFERENCES of the full conversion (one-sided at the domain edges): C_state = J C_el Jᵀ (linear mapping).
 * Every error is an OrbitInputError whose issues name the line (OPM, JSON syntax) or the field (JSON) and the reason.
 */
import { createHash } from 'node:crypto';
import {
  normalizedOrbitSchema,
  orbitSolutionInputSchema,
  type NormalizedOrbit,
  type OrbitSolutionInput,
} from '../../../shared/schemas/orbit';
import { AU_KM, GM_AU3_D2, KMS_TO_AUD } from '../constants';
import { eclipticToEquatorial } from '../frames';
import { jacobiEigenSymmetric } from '../linalg/eigen';
import { parseEpoch, tdbJdFromDays, EpochFormatError, TimeScaleError } from '../time';
import { elementsToState } from '../twobody/elements';
import type { Vec3 } from '../vec';
import { OrbitInputError, type InputIssue } from './errors';
import { parseOpm } from './opm';

export { OrbitInputError } from './errors';
export type { InputIssue } from './errors';

const DEG = Math.PI / 180;
const STATE_NAMES = ['x', 'y', 'z', 'vx', 'vy', 'vz'] as const;
const NG_NAMES = ['a1', 'a2', 'a3'] as const;

export type InputFormat = 'ccsds-opm-kvn' | 'tocsin-json';

export function sha256Hex(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** Detect the input format from its content. */
export function detectFormat(text: string): InputFormat {
  const s = text.replace(/^\uFEFF/, '').trimStart();
  if (s.startsWith('{')) return 'tocsin-json';
  if (/^(COMMENT[^\n]*\n\s*)*CCSDS_OPM_VERS\s*=/.test(s) || /^\s*CCSDS_OPM_VERS\s*=/m.test(s)) return 'ccsds-opm-kvn';
  throw new OrbitInputError('unrecognised orbit input', [
    {
      where: 'line 1',
      message: 'expected a CCSDS OPM in KVN form (starting with CCSDS_OPM_VERS = 2.0) or a Tocsin JSON orbit solution (starting with "{")',
    },
  ]);
}

/**
 * Options of the loaders. deferCovarianceCheck: skip the positive-semi-definiteness check here, for callers that
 * validate the covariance themselves with linalg.validateCovariance (the assess command, which names the offending
 * eigenvalue and direction and can repair on request).
 */
export type LoadOptions = { deferCovarianceCheck?: boolean };

/** Read either format (auto-detected) into a NormalizedOrbit. */
export function loadOrbitSolution(text: string, options: LoadOptions = {}): NormalizedOrbit {
  return detectFormat(text) === 'tocsin-json' ? solutionFromTocsinJson(text, options) : solutionFromOpm(text, options);
}

/** Smallest eigenvalue of the correlation matrix (scale-free PSD test); zero-variance rows are skipped. */
function minCorrelationEigenvalue(matrix: number[][]): number {
  const idx = matrix.map((_, i) => i).filter((i) => matrix[i][i] > 0);
  const n = idx.length;
  if (n === 0) return 0;
  const a = new Float64Array(n * n);
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      const i = idx[r];
      const j = idx[c];
      a[r * n + c] = matrix[i][j] / Math.sqrt(matrix[i][i] * matrix[j][j]);
    }
  }
  return jacobiEigenSymmetric(a, n).values[0];
}

const PSD_TOLERANCE = 1e-9;

function checkPsd(matrix: number[][], where: string): InputIssue | null {
  // zero variance with a non-zero covariance is impossible
  for (let i = 0; i < matrix.length; i++) {
    if (matrix[i][i] === 0 && matrix[i].some((v, j) => j !== i && v !== 0)) {
      return { where, message: `row ${i} has zero variance but non-zero covariances` };
    }
  }
  const minEig = minCorrelationEigenvalue(matrix);
  if (minEig < -PSD_TOLERANCE) {
    return {
      where,
      message: `covariance is not positive semi-definite (smallest eigenvalue of the correlation matrix ${minEig.toExponential(3)})`,
    };
  }
  return null;
}

function congruence(j: number[][], c: number[][]): number[][] {
  // J C Jᵀ
  const n = j.length;
  const m = c.length;
  const jc = Array.from({ length: n }, (_, r) => Array.from({ length: m }, (_, k) => j[r].reduce((s, v, t) => s + v * c[t][k], 0)));
  const out = Array.from({ length: n }, (_, r) => Array.from({ length: n }, (_, k) => jc[r].reduce((s, v, t) => s + v * j[k][t], 0)));
  for (let r = 0; r < n; r++) for (let k = 0; k < r; k++) out[r][k] = out[k][r] = 0.5 * (out[r][k] + out[k][r]);
  return out;
}

function epochOrIssue(text: string, where: string, issues: InputIssue[]): { tdbDays: number; scale: 'UTC' | 'TDB'; notes: string[] } | null {
  try {
    return parseEpoch(text);
  } catch (err) {
    if (err instanceof EpochFormatError || err instanceof TimeScaleError || err instanceof RangeError) {
      issues.push({ where, message: err.message });
      return null;
    }
    throw err;
  }
}

// ---------------------------------------------------------------------------------------------------------
// OPM

export function solutionFromOpm(text: string, options: LoadOptions = {}): NormalizedOrbit {
  const opm = parseOpm(text);
  const notes: string[] = [];
  if (opm.refFrame === 'EME2000') notes.push('REF_FRAME EME2000 taken as the ICRF axes (frame bias ~20 mas not applied)');
  notes.push(...opm.warnings.map((w) => `${w.where}: ${w.message}`));
  if (opm.timeSystem === 'UTC') notes.push(...parseEpoch(opm.epoch).notes);
  const k = 1 / AU_KM;
  const positionAu: Vec3 = [opm.positionKm[0] * k, opm.positionKm[1] * k, opm.positionKm[2] * k];
  const velocityAuD: Vec3 = [opm.velocityKmS[0] * KMS_TO_AUD, opm.velocityKmS[1] * KMS_TO_AUD, opm.velocityKmS[2] * KMS_TO_AUD];
  let covariance: NormalizedOrbit['covariance'] = null;
  if (opm.covarianceKm) {
    const cxLine = text.split(/\r\n|\r|\n/).findIndex((l) => /^\s*CX_X\s*=/.test(l)) + 1;
    const issue = options.deferCovarianceCheck ? null : checkPsd(opm.covarianceKm, `line ${cxLine}`);
    if (issue) throw new OrbitInputError('invalid CCSDS OPM', [issue]);
    const s = [k, k, k, KMS_TO_AUD, KMS_TO_AUD, KMS_TO_AUD];
    covariance = {
      parameters: [...STATE_NAMES],
      matrix: opm.covarianceKm.map((row, i) => row.map((v, j) => v * s[i] * s[j])),
    };
  }
  return finish({
    designation: opm.objectId,
    name: opm.objectName !== opm.objectId ? opm.objectName : null,
    epochTdbDays: opm.epochTdbDays,
    epochTdbJd: tdbJdFromDays(opm.epochTdbDays),
    positionAu,
    velocityAuD,
    covariance,
    nonGrav: opm.nonGrav,
    hMagnitude: opm.hMagnitude,
    albedo: opm.albedo,
    kind: 'unknown',
    notes,
    source: { format: 'ccsds-opm-kvn', inputSha256: sha256Hex(text), epochText: opm.epoch, timeScale: opm.timeSystem },
  });
}

// ---------------------------------------------------------------------------------------------------------
// Tocsin JSON

function fieldPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) {
    if (typeof p === 'number') out += `[${p}]`;
    else out += out ? `.${String(p)}` : String(p);
  }
  return out ? `field ${out}` : 'document';
}

function lineOfJsonError(text: string, message: string): string {
  const pos = /position (\d+)/.exec(message);
  if (pos) {
    const line = text.slice(0, Number(pos[1])).split('\n').length;
    return `line ${line}`;
  }
  const lc = /line (\d+)/.exec(message);
  return lc ? `line ${lc[1]}` : 'input';
}

/** Element-set conversion (ecliptic elements in degrees -> ICRF state in AU, AU/d). */
function elementsStateEq(
  el: { q: number; e: number; iDeg: number; nodeDeg: number; argPeriDeg: number; tpDays?: number; meanAnomalyDeg?: number },
  epochTdbDays: number,
): { r: Vec3; v: Vec3 } {
  const s = elementsToState(
    {
      q: el.q,
      e: el.e,
      i: el.iDeg * DEG,
      node: el.nodeDeg * DEG,
      argPeri: el.argPeriDeg * DEG,
      ...(el.meanAnomalyDeg !== undefined ? { meanAnomaly: el.meanAnomalyDeg * DEG } : { tp: el.tpDays, epoch: epochTdbDays }),
    },
    GM_AU3_D2.sun,
  );
  return { r: eclipticToEquatorial(s.r), v: eclipticToEquatorial(s.v) };
}

export function solutionFromTocsinJson(text: string, options: LoadOptions = {}): NormalizedOrbit {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    const msg = (err as Error).message;
    throw new OrbitInputError('invalid Tocsin JSON orbit', [{ where: lineOfJsonError(text, msg), message: `not valid JSON: ${msg}` }]);
  }
  const parsed = orbitSolutionInputSchema.safeParse(raw);
  if (!parsed.success) {
    throw new OrbitInputError(
      'invalid Tocsin JSON orbit',
      parsed.error.issues.map((i) => ({ where: fieldPath(i.path), message: i.message })),
    );
  }
  return solutionFromTocsinObject(parsed.data, text, options);
}

/** Normalise an already-validated JSON object (rawText is hashed; pass the uploaded text). */
export function solutionFromTocsinObject(input: OrbitSolutionInput, rawText: string, options: LoadOptions = {}): NormalizedOrbit {
  const issues: InputIssue[] = [];
  const ep = epochOrIssue(input.epoch, 'field epoch', issues);
  let tpDays: number | undefined;
  if (input.elements?.perihelionTime !== undefined) {
    tpDays = epochOrIssue(input.elements.perihelionTime, 'field elements.perihelionTime', issues)?.tdbDays;
  }
  if (!ep || issues.length) throw new OrbitInputError('invalid Tocsin JSON orbit', issues);
  const notes = [...ep.notes];
  const epochTdbDays = ep.tdbDays;

  let positionAu: Vec3;
  let velocityAuD: Vec3;
  let covariance: NormalizedOrbit['covariance'] = null;
  const cov = input.covariance;
  if (cov && !options.deferCovarianceCheck) {
    const issue = checkPsd(cov.matrix, 'field covariance.matrix');
    if (issue) throw new OrbitInputError('invalid Tocsin JSON orbit', [issue]);
  }
  const ngNames = cov ? NG_NAMES.filter((n) => cov.parameters.includes(n)) : [];
  const outNames = [...STATE_NAMES, ...ngNames];
  const pick = (matrix: number[][], names: readonly string[], order: readonly string[]) => {
    const ix = order.map((n) => names.indexOf(n));
    return ix.map((i) => ix.map((j) => matrix[i][j]));
  };

  if (input.cartesian) {
    positionAu = [...input.cartesian.positionAu];
    velocityAuD = [...input.cartesian.velocityAuD];
    if (cov) covariance = { parameters: outNames, matrix: pick(cov.matrix, cov.parameters, outNames) };
  } else {
    const el = input.elements!;
    const base = {
      q: el.perihelionDistanceAu,
      e: el.eccentricity,
      iDeg: el.inclinationDeg,
      nodeDeg: el.ascendingNodeDeg,
      argPeriDeg: el.argPerihelionDeg,
      tpDays,
      meanAnomalyDeg: el.meanAnomalyDeg,
    };
    try {
      ({ r: positionAu, v: velocityAuD } = elementsStateEq(base, epochTdbDays));
    } catch (err) {
      throw new OrbitInputError('invalid Tocsin JSON orbit', [{ where: 'field elements', message: (err as Error).message }]);
    }
    notes.push('elements read as heliocentric J2000 ecliptic (IAU 1976 obliquity) and converted to ICRF equatorial');
    if (cov) {
      const timing = el.meanAnomalyDeg !== undefined ? 'meanAnomaly' : 'tp';
      const elNames = ['q', 'e', 'i', 'node', 'argPeri', timing] as const;
      const keyOf: Record<(typeof elNames)[number], keyof typeof base> = {
        q: 'q', e: 'e', i: 'iDeg', node: 'nodeDeg', argPeri: 'argPeriDeg', tp: 'tpDays', meanAnomaly: 'meanAnomalyDeg',
      };
      const steps: Record<string, number> = {
        q: 1e-6 * base.q, e: 1e-7, i: 1e-5, node: 1e-5, argPeri: 1e-5, tp: 1e-4, meanAnomaly: 1e-5,
      };
      const stateOf = (b: typeof base) => {
        const s = elementsStateEq(b, epochTdbDays);
        return [...s.r, ...s.v];
      };
      // J[row state k][col element c]
      const jac: number[][] = STATE_NAMES.map(() => new Array<number>(6).fill(0));
      elNames.forEach((name, c) => {
        const key = keyOf[name];
        const h = steps[name];
        const at = (delta: number) => {
          try {
            return stateOf({ ...base, [key]: (base[key] as number) + delta });
          } catch {
            return null;
          }
        };
        const plus = at(h);
        const minus = at(-h);
        const mid = stateOf(base);
        let col: number[];
        if (plus && minus) col = plus.map((p, k) => (p - minus[k]) / (2 * h));
        else if (plus) col = plus.map((p, k) => (p - mid[k]) / h);
        else if (minus) col = mid.map((m, k) => (m - minus[k]) / h);
        else throw new OrbitInputError('invalid Tocsin JSON orbit', [{ where: 'field covariance', message: `cannot differentiate the state with respect to ${name}` }]);
        col.forEach((v, k) => (jac[k][c] = v));
      });
      // Full Jacobian: state rows from element columns, non-grav rows pass through.
      const inNames = [...elNames, ...ngNames];
      const cIn = pick(cov.matrix, cov.parameters, inNames);
      const J = outNames.map((rowName, r) =>
        inNames.map((colName, c) => (r < 6 ? (c < 6 ? jac[r][c] : 0) : rowName === colName ? 1 : 0)),
      );
      covariance = { parameters: outNames, matrix: congruence(J, cIn) };
      notes.push('element covariance mapped to Cartesian with a central-difference Jacobian (linear)');
    }
  }

  return finish({
    designation: input.designation,
    name: input.name ?? null,
    epochTdbDays,
    epochTdbJd: tdbJdFromDays(epochTdbDays),
    positionAu,
    velocityAuD,
    covariance,
    nonGrav: input.nonGrav ? { a1: input.nonGrav.a1, a2: input.nonGrav.a2, a3: input.nonGrav.a3, law: input.nonGrav.law } : null,
    hMagnitude: input.hMagnitude ?? null,
    albedo: input.albedo ?? null,
    kind: input.kind ?? 'unknown',
    notes: input.notes ? [...notes, input.notes] : notes,
    source: { format: 'tocsin-json', inputSha256: sha256Hex(rawText), epochText: input.epoch, timeScale: ep.scale },
  });
}

function finish(o: NormalizedOrbit): NormalizedOrbit {
  const r = Math.hypot(...o.positionAu);
  if (!(r > 0)) throw new OrbitInputError('invalid orbit', [{ where: 'state', message: 'heliocentric distance must be > 0' }]);
  // The output contract is the shared schema; parse to guarantee it (cheap).
  return normalizedOrbitSchema.parse(o);
}
