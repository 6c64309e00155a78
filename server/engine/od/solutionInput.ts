/**
 * A fit result as a Tocsin JSON orbit solution (shared/schemas/orbit.ts): Cartesian heliocentric ICRF state in AU
 * and AU/d at the fit epoch written as "JD:<TDB Julian date>", the fit covariance with its parameter names
 * (x..vz then the fitted A_k), and the non-grav parameters of a non-gravitational fit. The server stores it as a new
 * solution version through the existing objects service (issue 8 item 5).
 */
import type { FitResult } from '../../../shared/schemas/od';
import { orbitSolutionInputSchema, type OrbitSolutionInput } from '../../../shared/schemas/orbit';
import { tdbJdParts } from '../time';

export interface FitSolutionMeta {
  designation: string;
  name?: string | null;
  hMagnitude?: number | null;
  albedo?: number | null;
  kind?: OrbitSolutionInput['kind'];
  notes?: string;
}

/** "JD:2461000.5": the integer day and the fraction printed separately (12 decimals, ~1e-7 s), no rounding of the JD sum. */
export function jdText(tdbDays: number): string {
  const [jd0, days] = tdbJdParts(tdbDays);
  const whole = Math.floor(days);
  let frac = days - whole;
  let day = jd0 + whole;
  let text = frac.toFixed(12);
  if (text.startsWith('1')) {
    day += 1;
    frac = 0;
    text = (0).toFixed(12);
  }
  return `JD:${day}${text.slice(1)}`;
}

export function fitToSolutionInput(result: FitResult, meta: FitSolutionMeta): OrbitSolutionInput {
  if (result.status === 'failed') throw new RangeError('a failed fit cannot become an orbit solution');
  const doc: OrbitSolutionInput = {
    format: 'tocsin-orbit/1',
    designation: meta.designation,
    epoch: jdText(result.epochTdbDays),
    cartesian: { positionAu: [...result.positionAu], velocityAuD: [...result.velocityAuD] },
  };
  if (meta.name) doc.name = meta.name;
  if (result.covariance) doc.covariance = { parameters: [...result.parameters], matrix: result.covariance.map((r) => [...r]) };
  if (result.nonGrav) doc.nonGrav = { ...result.nonGrav };
  if (meta.hMagnitude !== undefined && meta.hMagnitude !== null) doc.hMagnitude = meta.hMagnitude;
  if (meta.albedo !== undefined && meta.albedo !== null) doc.albedo = meta.albedo;
  if (meta.kind) doc.kind = meta.kind;
  const notes = [
    `${result.label} fit of ${result.observationsUsed} of ${result.observationsTotal} observations, ` +
      `RMS ${result.rmsArcsec.toFixed(3)}" (normalised ${result.rmsNormalized.toFixed(3)}), chi-square ${result.chiSquare.toFixed(2)} ` +
      `for ${result.degreesOfFreedom} degrees of freedom, status ${result.status}`,
  ];
  if (meta.notes) notes.unshift(meta.notes);
  doc.notes = notes.join('\n');
  // validate against the shared schema (throws a ZodError naming the field if something is off)
  return orbitSolutionInputSchema.parse(doc);
}
