/**
 * Shared synthetic cases for the Monte Carlo tests and benchmark (invented orbits, not real objects).
 * neaCase: a ~ 1.1 AU, e ~ 0.2, i ~ 5 deg to the Earth's orbital plane, built to pass `missKm` from the Earth's
 * centre at encounterTdbDays (the same construction as tests/bench/engine.ts): the heliocentric velocity is that
 * of the chosen conic at the Earth's distance, the position is the Earth's plus missKm perpendicular to the
 * relative velocity; the state at startTdbDays is obtained by integrating back with the n-body model.
 */
import { AU_KM, GM_AU3_D2 } from '../../server/engine/constants';
import { propagate } from '../../server/engine/dynamics';
import type { PlanetEphemeris } from '../../server/engine/dynamics/types';
import type { Vec3 } from '../../server/engine/vec';

const MU = GM_AU3_D2.sun;
const nrm = (a: Vec3) => Math.hypot(a[0], a[1], a[2]);
const unit = (a: Vec3): Vec3 => {
  const n = nrm(a);
  return [a[0] / n, a[1] / n, a[2] / n];
};
const crs = (a: Vec3, b: Vec3): Vec3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];

export type NeaCase = {
  startTdbDays: number;
  positionAu: Vec3;
  velocityAuD: Vec3;
  /** State at the constructed encounter (geocentric offset missKm perpendicular to the relative velocity). */
  encounter: { tdbDays: number; positionAu: Vec3; velocityAuD: Vec3; relSpeedAuD: number };
};

export function neaCase(
  eph: PlanetEphemeris,
  opts: {
    startTdbDays: number;
    encounterTdbDays: number;
    missKm: number;
    a?: number;
    e?: number;
    incDeg?: number;
    offsetAngleRad?: number;
    /** Build the state this many days before the encounter on the straight relative path (default 0); use it for
     *  impacting cases, so that the backward integration starts outside the Earth. */
    leadDays?: number;
  },
): NeaCase {
  const s = new Float64Array(6);
  eph.stateInto(2, opts.encounterTdbDays, s);
  const rE: Vec3 = [s[0], s[1], s[2]], vE: Vec3 = [s[3], s[4], s[5]];
  const rHat = unit(rE), nHat = unit(crs(rE, vE)), tHat = crs(nHat, rHat);
  const r = nrm(rE), a = opts.a ?? 1.1, ecc = opts.e ?? 0.2, inc = ((opts.incDeg ?? 5) * Math.PI) / 180;
  const vMag = Math.sqrt(MU * (2 / r - 1 / a));
  const vt = Math.sqrt(MU * a * (1 - ecc * ecc)) / r;
  const vr = Math.sqrt(vMag * vMag - vt * vt);
  const vAst: Vec3 = [0, 1, 2].map((k) => vr * rHat[k] + vt * (Math.cos(inc) * tHat[k] + Math.sin(inc) * nHat[k])) as Vec3;
  const rel: Vec3 = [vAst[0] - vE[0], vAst[1] - vE[1], vAst[2] - vE[2]];
  const off1 = unit(crs(rel, nHat));
  const off2 = unit(crs(rel, off1));
  const th = opts.offsetAngleRad ?? 0;
  const off: Vec3 = [0, 1, 2].map((k) => Math.cos(th) * off1[k] + Math.sin(th) * off2[k]) as Vec3;
  const lead = opts.leadDays ?? 0;
  // With a lead time: the Earth's state at T - lead plus the straight relative path (off * miss - v_rel lead, v_rel);
  // gravitational focusing then bends it inwards, so the actual miss is a little smaller than missKm.
  const sE = new Float64Array(6);
  eph.stateInto(2, opts.encounterTdbDays - lead, sE);
  const rAst: Vec3 = [0, 1, 2].map((k) => sE[k] + (off[k] * opts.missKm) / AU_KM - rel[k] * lead) as Vec3;
  const vStart: Vec3 = lead === 0 ? vAst : ([0, 1, 2].map((k) => sE[3 + k] + rel[k]) as Vec3);
  const back = propagate({
    positionAu: rAst,
    velocityAuD: vStart,
    fromTdbDays: opts.encounterTdbDays - lead,
    toTdbDays: opts.startTdbDays,
    model: 'n-body',
    ephemeris: eph,
    tolerance: 1e-12,
    impactBodies: [],
  });
  return {
    startTdbDays: opts.startTdbDays,
    positionAu: back.positionAu,
    velocityAuD: back.velocityAuD,
    encounter: { tdbDays: opts.encounterTdbDays, positionAu: rAst, velocityAuD: vAst, relSpeedAuD: nrm(rel) },
  };
}
