/**
 * Writes server/db/demo/hso-26-n4.opm, the demo near-Earth asteroid, by construction (run once:
 * `npx tsx server/db/demo/make-nea.ts`; the seed reads the file, it never runs this).
 *
 * How the orbit was designed so that it passes close to Earth in a future decade:
 *  1. Choose the encounter time T = 2034-09-17T06:00:00 TDB and take Earth's heliocentric ICRF state there from
 *     the engine ephemeris (ChebyshevEphemeris, the one every run uses).
 *  2. Place the asteroid at Earth + d, |d| = 26 000 km (about 4 Earth radii), with d perpendicular to the chosen
 *     geocentric velocity u (|u| = 9.2 km/s, mostly along Earth's orbit-normal and outward radial directions), so
 *     T is the moment of closest approach (before Earth's pull bends the path; the run finds the exact one).
 *  3. Propagate that state BACKWARD with the engine's n-body propagate() (Sun, planets, Moon, 1PN GR;
 *     IAS15 ε = 1e-9; impact stop off) to the solution epoch 2026-11-20T00:00:00 TDB.
 *  4. Write the epoch state as a CCSDS OPM 2.0 KVN with a diagonal-dominant covariance of a few-tens-of-km
 *     position and cm/s velocity uncertainty (a multi-opposition NEA fit), with a position-velocity correlation.
 * The 2034 encounter's 1-sigma region is then about 6,500 km in distance, so the capture disk lies in its tail:
 * a small but non-zero impact probability for the demo runs (about 1e-3).
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { AU_KM, KMS_TO_AUD } from '../../engine/constants';
import { propagate } from '../../engine/dynamics';
import { defaultEphemeris } from '../../engine/dynamics/ephemeris-source';
import { bodyIndex } from '../../engine/ephemeris';
import { tdbDaysFromTdbCalendar } from '../../engine/time';
import { cross, norm } from '../../engine/vec';
import type { Vec3 } from '../../engine/vec';

const here = path.dirname(fileURLToPath(import.meta.url));
const encounterTdbDays = tdbDaysFromTdbCalendar(2034, 9, 17, 6, 0, 0);
const epochTdbDays = tdbDaysFromTdbCalendar(2026, 11, 20, 0, 0, 0);

const eph = defaultEphemeris(epochTdbDays, encounterTdbDays);
const earth = new Float64Array(6);
eph.stateInto(bodyIndex('earth'), encounterTdbDays, earth);
const rE: Vec3 = [earth[0], earth[1], earth[2]];
const vE: Vec3 = [earth[3], earth[4], earth[5]];
const unit = (a: Vec3): Vec3 => {
  const n = norm(a);
  return [a[0] / n, a[1] / n, a[2] / n];
};
const radial = unit(rE);
const normal = unit(cross(rE, vE));
const along = unit(cross(normal, radial));
// geocentric velocity: 9.2 km/s, direction 0.55 radial + 0.75 normal - 0.37 along-track (normalised)
const dir = unit([0, 1, 2].map((k) => 0.55 * radial[k] + 0.75 * normal[k] - 0.37 * along[k]) as Vec3);
const uAuD = dir.map((c) => c * 9.2 * KMS_TO_AUD) as Vec3;
// miss vector: perpendicular to u, in the plane of u and `along`
const t = along.map((c, k) => c - (along[0] * dir[0] + along[1] * dir[1] + along[2] * dir[2]) * dir[k]) as Vec3;
const missAu = unit(t).map((c) => (c * 26_000) / AU_KM) as Vec3;
const r0: Vec3 = [rE[0] + missAu[0], rE[1] + missAu[1], rE[2] + missAu[2]];
const v0: Vec3 = [vE[0] + uAuD[0], vE[1] + uAuD[1], vE[2] + uAuD[2]];

const back = propagate({
  positionAu: r0,
  velocityAuD: v0,
  fromTdbDays: encounterTdbDays,
  toTdbDays: epochTdbDays,
  model: 'n-body',
  ephemeris: eph,
  impactBodies: [],
});

const km = back.positionAu.map((x) => x * AU_KM);
const kms = back.velocityAuD.map((v) => v / KMS_TO_AUD);
const f = (x: number) => x.toExponential(15);
// covariance (km², km²/s, km²/s²): σ_pos = 23, 17, 14.2 km, σ_vel = 8.8e-6, 6.6e-6, 5.5e-6 km/s, ρ(x, vx) = 0.6
// (a multi-opposition fit). Chosen so the 2034 impact probability is small but not zero: about 8e-4 by the
// linear method; a 20,000-clone Monte Carlo run (seed 7) gave 10 hits, 5e-4 (95% Wilson 2.7e-4 to 9.2e-4).
const sp = [23, 17, 14.2];
const sv = [8.8e-6, 6.6e-6, 5.5e-6];
const C = Array.from({ length: 6 }, () => new Array<number>(6).fill(0));
for (let k = 0; k < 3; k++) {
  C[k][k] = sp[k] ** 2;
  C[k + 3][k + 3] = sv[k] ** 2;
  C[k + 3][k] = C[k][k + 3] = 0.6 * sp[k] * sv[k];
}
const names = ['X', 'Y', 'Z', 'X_DOT', 'Y_DOT', 'Z_DOT'];
const covLines: string[] = [];
for (let i = 0; i < 6; i++) {
  for (let j = 0; j <= i; j++) {
    const unitText = i < 3 ? 'km**2' : j < 3 ? 'km**2/s' : 'km**2/s**2';
    covLines.push(`C${names[i]}_${names[j]} = ${C[i][j].toExponential(6)} [${unitText}]`);
  }
}
const text = `CCSDS_OPM_VERS = 2.0
COMMENT Demo near-Earth asteroid of the Halden Sound office (invented). Built by server/db/demo/make-nea.ts:
COMMENT closest approach to Earth about 26 000 km on 2034-09-17 (before focusing), propagated back with the engine.
CREATION_DATE = 2026-11-21T09:00:00
ORIGINATOR = HSPDO
OBJECT_NAME = HSO-26-N4
OBJECT_ID = HSO-26-N4
CENTER_NAME = SUN
REF_FRAME = ICRF
TIME_SYSTEM = TDB
EPOCH = 2026-11-20T00:00:00
X = ${f(km[0])} [km]
Y = ${f(km[1])} [km]
Z = ${f(km[2])} [km]
X_DOT = ${f(kms[0])} [km/s]
Y_DOT = ${f(kms[1])} [km/s]
Z_DOT = ${f(kms[2])} [km/s]
COV_REF_FRAME = ICRF
${covLines.join('\n')}
USER_DEFINED_H = 22.4 [mag]
USER_DEFINED_ALBEDO = 0.14
`;
fs.writeFileSync(path.join(here, 'hso-26-n4.opm'), text);
console.log(`wrote hso-26-n4.opm; ${back.steps} steps; epoch r = ${(norm(back.positionAu) ).toFixed(4)} AU`);
