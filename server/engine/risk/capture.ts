/**
 * Capture radius and impact speed (METHODS.md 7; issue 4 item 2).
 * Gravitational focusing: an asymptote with impact parameter b reaches the planet's surface when
 * b <= R sqrt(1 + v_esc^2 / v_inf^2) (Öpik 1976, Interplanetary Encounters; energy and angular momentum
 * conservation), v_esc = sqrt(2 GM / R). Impact speed v_imp = sqrt(v_inf^2 + v_esc^2) (atmosphere neglected).
 */
import { GM_KM3_S2, RADIUS_KM } from '../constants';

/** Escape speed at radius R, km/s. Default: Earth, GM from DE440 and R = 6378.137 km (WGS84), giving 11.180 km/s. */
export function escapeSpeedKmS(gmKm3S2: number = GM_KM3_S2.earth, radiusKm: number = RADIUS_KM.earth): number {
  return Math.sqrt((2 * gmKm3S2) / radiusKm);
}

/** Capture radius on the b-plane, km: b = R sqrt(1 + v_esc^2 / v_inf^2). */
export function captureRadiusFromVInfKm(
  vInfinityKmS: number,
  radiusKm: number = RADIUS_KM.earth,
  gmKm3S2: number = GM_KM3_S2.earth,
): number {
  if (!(vInfinityKmS > 0)) throw new RangeError(`v_inf must be > 0 km/s, got ${vInfinityKmS}`);
  const vEsc = escapeSpeedKmS(gmKm3S2, radiusKm);
  return radiusKm * Math.sqrt(1 + (vEsc * vEsc) / (vInfinityKmS * vInfinityKmS));
}

/** Impact speed at the surface, km/s: sqrt(v_inf^2 + v_esc^2). */
export function impactSpeedKmS(
  vInfinityKmS: number,
  radiusKm: number = RADIUS_KM.earth,
  gmKm3S2: number = GM_KM3_S2.earth,
): number {
  const vEsc = escapeSpeedKmS(gmKm3S2, radiusKm);
  return Math.hypot(vInfinityKmS, vEsc);
}
