/**
 * Observer geometry for orbit determination (server/engine/od/observatory.ts, earthOrientation.ts, observer.ts)
 * against outside values: IERS Conventions 2010 eq. 5.15, Meeus (1998) worked examples, and Debian's swetest
 * (Swiss Ephemeris, DE431-derived files; tests/reference/swetest.ts) topocentric versus geocentric Moon.
 */
import { describe, expect, it } from 'vitest';
import type { Observatory } from '../../shared/schemas/od';
import { AU_KM, DAY_S } from '../../server/engine/constants';
import { moonGeocentricStateInto } from '../../server/engine/ephemeris';
import { ChebyshevEphemeris } from '../../server/engine/ephemeris';
import { EARTH_INDEX } from '../../server/engine/ephemeris/bodies';
import { tdbDaysFromUtc, ttDaysFromTdbDays } from '../../server/engine/time';
import {
  EARTH_ROTATION_RATE_RAD_PER_DAY,
  earthOrientationAt,
  earthRotationAngleRad,
  equationOfEquinoxesRad,
  gastRad,
  gmstRad,
  nutationMatrix,
  siteGcrsKm,
  trueOfDateToCelestialMatrix,
  ut1DaysFromTdbDays,
} from '../../server/engine/od/earthOrientation';
import { WGS84_A_KM, parallaxFromGeodetic, siteVectorItrsKm } from '../../server/engine/od/observatory';
import { UnknownObservatoryError, observerStatesAu, siteGeocentricAu } from '../../server/engine/od/observer';
import { jdTtFromTdbDays, swetestSpherical, vectorKmFromSpherical } from '../reference/swetest';

const DEG = Math.PI / 180;
const ARCSEC = DEG / 3600;

/** Seconds of time of an angle in radians. */
const toTimeSeconds = (rad: number) => (rad / (2 * Math.PI)) * 86400;

function obs(code: string, longitudeDeg: number, latDeg: number, heightM: number): Observatory {
  return { code, name: `Site ${code}`, longitudeDeg, rhoCosPhi: null, rhoSinPhi: null, geodeticLatitudeDeg: latDeg, heightM };
}

describe('Earth rotation angle and sidereal time', () => {
  it('ERA at J2000.0 (UT1) is 2π·0.7790572732640 (IERS Conventions 2010 eq. 5.15)', () => {
    expect(earthRotationAngleRad(0)).toBeCloseTo(2 * Math.PI * 0.779057273264, 14);
    // One UT1 day later the Earth has turned 1.00273781191135448 turns (same equation).
    const d = earthRotationAngleRad(1) - earthRotationAngleRad(0);
    expect(d).toBeCloseTo(2 * Math.PI * 0.00273781191135448, 12);
    // Far from J2000 the split form keeps precision: 36525 days later (same equation, computed).
    const turns = 0.779057273264 + 1.00273781191135448 * 36525;
    expect(earthRotationAngleRad(36525)).toBeCloseTo(2 * Math.PI * (turns - Math.floor(turns)), 9);
    expect(EARTH_ROTATION_RATE_RAD_PER_DAY).toBeCloseTo(2 * Math.PI * 1.00273781191135448, 15);
  });

  it('GMST at 1987 April 10 0h UT is 13h10m46.3668s (Meeus 1998 Example 12.a, recalled from memory)', () => {
    // JD 2446895.5 UT. TT − UT in 1987 ≈ 55.2 s (32.184 + 23 leap seconds; UT1 − UTC neglected): enters only the
    // IAU 2006 polynomial in t, at the 1e-6 s level. Meeus used the IAU 1982 GMST; our IAU 2006 GMST (IERS 2010
    // eq. 5.32) is 3.3 ms later there (measured). That is the IAU 2000 precession-rate correction (−0.3"/century in
    // longitude, recalled from memory) accumulated over 0.13 century plus the 14.5 mas offset: tolerance 4 ms.
    const ut1Days = 2446895.5 - 2451545.0;
    const ttDays = ut1Days + 55.184 / 86400;
    const s = toTimeSeconds(gmstRad(ut1Days, ttDays));
    const meeus = 13 * 3600 + 10 * 60 + 46.3668;
    expect(Math.abs(s - meeus)).toBeLessThan(0.004);
  });

  it('ERA and IAU 2006 GMST equal the SOFA test-program values (t_sofa_c.c, recalled from memory)', () => {
    // eraEra00(2400000.5, 54388.0) = 0.4022837240028158102 rad; eraGmst06(2400000.5, 53736.0, 2400000.5, 53736.0)
    // = 1.754174972210740592 rad.
    expect(earthRotationAngleRad(2400000.5 + 54388.0 - 2451545.0)).toBeCloseTo(0.4022837240028158102, 12);
    const d = 2400000.5 + 53736.0 - 2451545.0;
    expect(Math.abs(gmstRad(d, d) - 1.754174972210740592)).toBeLessThan(1e-9); // 0.2 mas
  });

  it('apparent sidereal time there is 13h10m46.1351s (Meeus 1998 Example 12.a, recalled from memory)', () => {
    // Meeus: Δψ = −3.788", ε = 23°26'36.85" -> equation of the equinoxes −0.2317 s. Our nutation keeps the five
    // largest IAU 2000B terms (astronomy-engine), so Δψ can differ by ~0.1" = 0.007 s: tolerance 0.01 s.
    const ut1Days = 2446895.5 - 2451545.0;
    const ttDays = ut1Days + 55.184 / 86400;
    const s = toTimeSeconds(gastRad(ut1Days, ttDays));
    expect(Math.abs(s - (13 * 3600 + 10 * 60 + 46.1351))).toBeLessThan(0.01);
    const ee = s - toTimeSeconds(gmstRad(ut1Days, ttDays));
    expect(Math.abs(ee - -0.2317)).toBeLessThan(0.01);
  });

  it('UT1 = UTC from a TDB instant (time.ts), documented approximation', () => {
    const tdb = tdbDaysFromUtc(2026, 3, 1, 3, 12, 45);
    const expected = 9556 - 0.5 + (3 * 3600 + 12 * 60 + 45) / 86400; // 2026-03-01 is day 9556 after 2000-01-01 (computed)
    expect(Math.abs(ut1DaysFromTdbDays(tdb) - expected) * 86400).toBeLessThan(1e-4);
  });
});

describe('observatory parallax constants', () => {
  it('from geodetic latitude and height: Meeus (1998) Example 11.a, φ = +33°21′22″, H = 1706 m', () => {
    // Meeus gives ρ sin φ′ = +0.546861 and ρ cos φ′ = +0.836339 (recalled from memory). He used the IAU 1976 ellipsoid
    // (a = 6378.14 km, f = 1/298.257); WGS84 changes the 6th decimal by at most 1 (computed: h/a shifts by 4e-7).
    const p = parallaxFromGeodetic(33 + 21 / 60 + 22 / 3600, 1706);
    expect(Math.abs(p.rhoSinPhi - 0.546861)).toBeLessThan(1.5e-6);
    expect(Math.abs(p.rhoCosPhi - 0.836339)).toBeLessThan(1.5e-6);
  });

  it('poles and equator of the WGS84 ellipsoid (a = 6378.137 km, b = a(1 − f) = 6356.752 km)', () => {
    const eq = parallaxFromGeodetic(0, 0);
    expect(eq.rhoCosPhi).toBeCloseTo(1, 15);
    expect(eq.rhoSinPhi).toBeCloseTo(0, 15);
    const pole = parallaxFromGeodetic(90, 0);
    expect(pole.rhoSinPhi * WGS84_A_KM).toBeCloseTo(6356.752314, 5); // WGS84 semi-minor axis (recalled from memory)
    const withParallax: Observatory = { code: 'X1', name: 'X', longitudeDeg: 90, rhoCosPhi: 0.5, rhoSinPhi: 0.8, geodeticLatitudeDeg: null, heightM: null };
    const v = siteVectorItrsKm(withParallax);
    expect(v[0]).toBeCloseTo(0, 9);
    expect(v[1]).toBeCloseTo(0.5 * WGS84_A_KM, 9);
    expect(v[2]).toBeCloseTo(0.8 * WGS84_A_KM, 9);
  });
});

describe('site vector in the GCRS versus swetest topocentric minus geocentric Moon', () => {
  // Sites (invented, land-like coordinates; swetest -topo takes east longitude, latitude, elevation above the
  // ellipsoid in metres) and epochs 2005–2030 (TDB days from J2000).
  const sites = [obs('T1', 10.25, 50.1, 300), obs('T2', 289.27, -30.17, 2200), obs('T3', 204.53, 19.82, 4100), obs('T4', 0, 0, 0), obs('T5', 90, 0, 0)];
  const epochs = [2100.3125, 5456.8, 7742.15625, 9921.6, 11000.4];
  const topoOf = (site: Observatory) => ({ eastLongitudeDeg: site.longitudeDeg, latitudeDeg: site.geodeticLatitudeDeg!, elevationM: site.heightM! });
  const mv = (m: number[][], v: number[]): [number, number, number] => [0, 1, 2].map((i) => m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2]) as [number, number, number];
  const sph = (v: number[]) => ({ ra: Math.atan2(v[1], v[0]), dec: Math.asin(v[2] / Math.hypot(v[0], v[1], v[2])) });

  /**
   * swetest with -j2000 computes the observer WITHOUT nutation: its header prints "Nutation 0° 0' 0.0000" and its
   * site vector equals R3(−GMST) r on the mean equator of date, precessed to J2000, to 1 m (measured below). Our
   * model keeps the nutation (METHODS.md §9.4), so the like-for-like check uses our GMST and our precession
   * (Pᵀ = (PᵀNᵀ)·N from earthOrientation.ts), and the full model is compared with the known size of the difference.
   */
  it('our GMST + IAU 2006 precession reproduce swetest\'s (nutation-free) site vector to metres, and the Moon parallax to 0.01″', () => {
    let worstKm = 0;
    let worstArcsec = 0;
    let worstFullArcsec = 0;
    let worstFullKm = 0;
    const moon = new Float64Array(6);
    for (const tdb of epochs) {
      const jdTt = jdTtFromTdbDays(tdb);
      const geo = swetestSpherical({ body: 'moon', jdTt, place: 'geometric' });
      const geoKm = vectorKmFromSpherical(geo);
      moonGeocentricStateInto(tdb, moon, false);
      const ourGeoKm: [number, number, number] = [moon[0] * AU_KM, moon[1] * AU_KM, moon[2] * AU_KM];
      // Our Moon and swetest's agree to a few km (tests/unit/engine-ephemeris.test.ts); this also confirms how the
      // wrapper reads swetest's RA column.
      expect(Math.hypot(ourGeoKm[0] - geoKm[0], ourGeoKm[1] - geoKm[1], ourGeoKm[2] - geoKm[2])).toBeLessThan(10);
      const ttDays = ttDaysFromTdbDays(tdb);
      for (const site of sites) {
        const topo = swetestSpherical({ body: 'moon', jdTt, place: 'geometric', topo: topoOf(site) });
        const topoKm = vectorKmFromSpherical(topo);
        // Same UT1 as swetest: UT1 = TT − ΔT(swetest).
        const ut1Days = ttDays - topo.deltaTSeconds / DAY_S;
        const eo = earthOrientationAt(tdb, ut1Days);
        const g = gmstRad(ut1Days, ttDays);
        const [x, y, z] = siteVectorItrsKm(site);
        const meanOfDate = [Math.cos(g) * x - Math.sin(g) * y, Math.sin(g) * x + Math.cos(g) * y, z];
        const noNutation = mv(eo.precessionNutation, mv(nutationMatrix(ttDays), meanOfDate));
        const full = siteGcrsKm(siteVectorItrsKm(site), eo).positionKm;
        // swetest: topo − geo = −site.
        const sweSite = [geoKm[0] - topoKm[0], geoKm[1] - topoKm[1], geoKm[2] - topoKm[2]];
        worstKm = Math.max(worstKm, Math.hypot(sweSite[0] - noNutation[0], sweSite[1] - noNutation[1], sweSite[2] - noNutation[2]));
        worstFullKm = Math.max(worstFullKm, Math.hypot(sweSite[0] - full[0], sweSite[1] - full[1], sweSite[2] - full[2]));
        // Angular form with our own Moon: displacement (RA·cos dec, dec) topo − geo, ours versus swetest's.
        const sweDisp = [wrap((topo.raDeg - geo.raDeg) * DEG) * Math.cos(topo.decDeg * DEG), (topo.decDeg - geo.decDeg) * DEG];
        expect(Math.hypot(sweDisp[0], sweDisp[1])).toBeGreaterThan(0.1 * DEG); // meaningful: a Moon parallax of up to ~1°
        const disp = (s: number[]) => {
          const a = sph([ourGeoKm[0] - s[0], ourGeoKm[1] - s[1], ourGeoKm[2] - s[2]]), b = sph(ourGeoKm);
          return [wrap(a.ra - b.ra) * Math.cos(a.dec), a.dec - b.dec];
        };
        const dn = disp(noNutation), df = disp(full);
        worstArcsec = Math.max(worstArcsec, Math.hypot(dn[0] - sweDisp[0], dn[1] - sweDisp[1]) / ARCSEC);
        worstFullArcsec = Math.max(worstFullArcsec, Math.hypot(df[0] - sweDisp[0], df[1] - sweDisp[1]) / ARCSEC);
      }
    }
    console.log(
      `site vs swetest (nutation-free like swetest): worst ${(worstKm * 1000).toFixed(1)} m, parallax ${worstArcsec.toFixed(4)}″; ` +
        `our full model (with nutation): worst ${worstFullKm.toFixed(3)} km, parallax ${worstFullArcsec.toFixed(3)}″`,
    );
    // Measured ≤ 1 m and ≤ 0.002″ like for like; tolerances 0.01 km and 0.01″.
    expect(worstKm).toBeLessThan(0.01);
    expect(worstArcsec).toBeLessThan(0.01);
    // With nutation the site tilts by the nutation angles (|Δε| ≤ 9.3″, |Δψ| sin ε ≤ 7″, and the equation of the
    // equinoxes ≤ 1.2 s): ≤ 0.45 km at 6378 km (computed). Measured 0.3 km and 0.14″ at the Moon, far under 1″.
    expect(worstFullKm).toBeLessThan(0.45);
    expect(worstFullKm).toBeGreaterThan(0.05); // nutation is really in our model
    expect(worstFullArcsec).toBeLessThan(0.25);
  }, 60_000);

  it('our precession-nutation matrix equals swetest\'s J2000 <-> true-of-date rotation of the Moon to < 0.1″', () => {
    // swetest without -j2000 prints true equator/equinox of date (nutation applied, header "Nutation" non-zero);
    // with -j2000 and without -icrs, the mean J2000 equator (frame bias applied, as ours has none: both "mean J2000").
    // The residual is the five-term nutation of astronomy-engine (omitted terms ≲ 0.1″, see earthOrientation.ts).
    let worst = 0;
    for (const tdb of epochs) {
      const jdTt = jdTtFromTdbDays(tdb);
      const ofDate = vectorKmFromSpherical(swetestSpherical({ body: 'moon', jdTt, place: 'geometric', frame: 'true-of-date' }));
      const j2000 = vectorKmFromSpherical(swetestSpherical({ body: 'moon', jdTt, place: 'geometric', frame: 'mean-j2000' }));
      const ours = mv(trueOfDateToCelestialMatrix(ttDaysFromTdbDays(tdb)), ofDate);
      worst = Math.max(worst, Math.hypot(ours[0] - j2000[0], ours[1] - j2000[1], ours[2] - j2000[2]) / Math.hypot(...j2000) / ARCSEC);
    }
    console.log(`precession-nutation vs swetest: worst ${worst.toFixed(3)}″`);
    expect(worst).toBeLessThan(0.1);
  }, 60_000);

  it('with UT1 = UTC the site moves by at most ω·|UT1 − UTC|·ρcosφ′ (≤ 0.47 km), as documented', () => {
    const site = sites[1];
    for (const tdb of epochs) {
      const jdTt = jdTtFromTdbDays(tdb);
      const topo = swetestSpherical({ body: 'moon', jdTt, place: 'geometric', topo: topoOf(site) });
      const ttDays = ttDaysFromTdbDays(tdb);
      const ut1Swe = ttDays - topo.deltaTSeconds / DAY_S;
      const ut1Utc = ut1DaysFromTdbDays(tdb);
      const ours = siteGeocentricAu(site, tdb).positionAu.map((x) => x * AU_KM);
      const exact = siteGcrsKm(siteVectorItrsKm(site), earthOrientationAt(tdb, ut1Swe)).positionKm;
      const dKm = Math.hypot(ours[0] - exact[0], ours[1] - exact[1], ours[2] - exact[2]);
      const dUt1S = Math.abs(ut1Utc - ut1Swe) * DAY_S;
      const rhoKm = Math.hypot(siteVectorItrsKm(site)[0], siteVectorItrsKm(site)[1]);
      expect(dUt1S).toBeLessThan(1.5); // swetest's ΔT model versus TT − UTC (within a second while leap seconds continue)
      expect(dKm).toBeLessThan((EARTH_ROTATION_RATE_RAD_PER_DAY / DAY_S) * dUt1S * rhoKm * 1.001 + 0.001);
    }
  }, 60_000);
});

describe('UT1 − UTC option (observer.ts ut1MinusUtcSeconds)', () => {
  const sites = [obs('U1', 10.25, 50.1, 300), obs('U2', 289.27, -30.17, 2200), obs('U3', 0, 0, 0)];
  const epochs = [2100.3125, 7742.15625, 9556.2];
  // IERS Conventions 2010 eq. 5.15: dERA/dUT1 = 2π · 1.00273781191135448 per day (written out here, not imported).
  const omegaRadPerS = (2 * Math.PI * 1.00273781191135448) / 86400;
  const km = (p: readonly number[]) => p.map((x) => x * AU_KM);
  const transposeTimes = (m: number[][], v: number[]) => [0, 1, 2].map((j) => m[0][j] * v[0] + m[1][j] * v[1] + m[2][j] * v[2]);

  it('0 (and no option) gives bit-identical observer states to the UT1 = UTC building blocks', () => {
    const t0 = tdbDaysFromUtc(2026, 3, 1, 3, 0, 0);
    const eph = ChebyshevEphemeris.build(t0 - 2, t0 + 2);
    const items = sites.map((site, k) => ({ stn: site.code, obsTimeTdbDays: t0 + 0.13 * k }));
    const none = observerStatesAu(items, sites, eph);
    const zero = observerStatesAu(items, sites, eph, { ut1MinusUtcSeconds: 0 });
    expect(zero).toEqual(none);
    // The same arithmetic as before the option existed: geocentre + siteGcrsKm(r_ITRS, earthOrientationAt(t)) / AU.
    const e = new Float64Array(6);
    items.forEach((it, k) => {
      eph.stateInto(EARTH_INDEX, it.obsTimeTdbDays, e);
      const { positionKm, velocityKmS } = siteGcrsKm(siteVectorItrsKm(sites[k]), earthOrientationAt(it.obsTimeTdbDays));
      for (let c = 0; c < 3; c++) {
        expect(Object.is(none[k].positionAu[c], e[c] + positionKm[c] / AU_KM)).toBe(true);
        expect(Object.is(none[k].velocityAuD[c], e[3 + c] + (velocityKmS[c] * DAY_S) / AU_KM)).toBe(true);
      }
    });
    // A non-zero value really changes the result (so the equalities above are not vacuous).
    const moved = observerStatesAu(items, sites, eph, { ut1MinusUtcSeconds: 0.35 });
    expect(Math.hypot(...km(moved[0].positionAu.map((x, c) => x - none[0].positionAu[c])))).toBeGreaterThan(0.05);
  });

  it('d seconds rotate the site about the pole of date by 2π·1.00273781191135448·d/86400 (IERS 2010 eq. 5.15): |Δr| = ω·d·ρcosφ′·a to 1 cm', () => {
    for (const tdb of epochs) {
      const pn = earthOrientationAt(tdb).precessionNutation;
      for (const site of sites) {
        const rhoCosPhiKm = Math.hypot(siteVectorItrsKm(site)[0], siteVectorItrsKm(site)[1]); // ρcosφ′·a
        const base = km(siteGeocentricAu(site, tdb).positionAu);
        for (const d of [0.35, -0.6, 0.9]) {
          const p = km(siteGeocentricAu(site, tdb, { ut1MinusUtcSeconds: d }).positionAu);
          // Size: the chord 2·ρcosφ′a·sin(ωd/2) equals the arc ω·d·ρcosφ′·a to 1e-9 relative (computed), so 1 cm is the
          // test's tolerance, not the approximation's.
          expect(Math.abs(Math.hypot(p[0] - base[0], p[1] - base[1], p[2] - base[2]) - omegaRadPerS * Math.abs(d) * rhoCosPhiKm)).toBeLessThan(1e-5);
          // Direction: in the true equator of date (PNᵀ r) the height above the equator is unchanged and the hour angle
          // advances by ω·d (east for d > 0).
          const a = transposeTimes(pn, base), b = transposeTimes(pn, p);
          expect(Math.abs(b[2] - a[2])).toBeLessThan(1e-6);
          expect(Math.abs(wrap(Math.atan2(b[1], b[0]) - Math.atan2(a[1], a[0])) - omegaRadPerS * d)).toBeLessThan(1e-11);
        }
      }
    }
    // refused outside ±0.9 s or not finite
    expect(() => siteGeocentricAu(sites[0], epochs[0], { ut1MinusUtcSeconds: 1.2 })).toThrow(/ut1MinusUtcSeconds/);
    expect(() => observerStatesAu([{ stn: 'U1', obsTimeTdbDays: epochs[0] }], sites, undefined, { ut1MinusUtcSeconds: Number.NaN })).toThrow(/ut1MinusUtcSeconds/);
  });

  it('with d = swetest\'s own UT1 − UTC (from its ΔT) the site matches swetest\'s site vector better than with d = 0', () => {
    // swetest's site (topocentric minus geocentric Moon, -j2000, nutation-free: see above) against ours with the
    // nutation taken out again: r_noNut = PᵀNᵀ · N · R3(EE) · (PᵀNᵀ)ᵀ · r_ours, since r_ours = PᵀNᵀ R3(−GMST − EE) r_ITRS.
    const site = obs('U4', 289.27, -30.17, 2200);
    const topo = { eastLongitudeDeg: site.longitudeDeg, latitudeDeg: site.geodeticLatitudeDeg!, elevationM: site.heightM! };
    const mv = (m: number[][], v: number[]) => [0, 1, 2].map((i) => m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2]);
    let used = 0;
    const rows: string[] = [];
    for (const tdb of [2100.3125, 3300.7, 5456.8, 7742.15625, 8800.4]) {
      const jdTt = jdTtFromTdbDays(tdb);
      const geoKm = vectorKmFromSpherical(swetestSpherical({ body: 'moon', jdTt, place: 'geometric' }));
      const t = swetestSpherical({ body: 'moon', jdTt, place: 'geometric', topo });
      const topoKm = vectorKmFromSpherical(t);
      const sweSite = [geoKm[0] - topoKm[0], geoKm[1] - topoKm[1], geoKm[2] - topoKm[2]];
      const ttDays = ttDaysFromTdbDays(tdb);
      const dSwe = (ttDays - t.deltaTSeconds / DAY_S - ut1DaysFromTdbDays(tdb)) * DAY_S; // swetest's UT1 − our UTC, s
      if (Math.abs(dSwe) > 0.9 || Math.abs(dSwe) < 0.05) continue; // outside the setting's range, or too small to tell
      used++;
      const eo = earthOrientationAt(tdb);
      const ee = equationOfEquinoxesRad(ttDays);
      const r3 = [[Math.cos(ee), Math.sin(ee), 0], [-Math.sin(ee), Math.cos(ee), 0], [0, 0, 1]];
      const noNut = (r: number[]) => mv(eo.precessionNutation, mv(nutationMatrix(ttDays), mv(r3, transposeTimes(eo.precessionNutation, r))));
      const miss = (d: number) => {
        const p = noNut(km(siteGeocentricAu(site, tdb, { ut1MinusUtcSeconds: d }).positionAu));
        return Math.hypot(p[0] - sweSite[0], p[1] - sweSite[1], p[2] - sweSite[2]);
      };
      const withD = miss(dSwe), withZero = miss(0);
      const expectedZeroKm = omegaRadPerS * Math.abs(dSwe) * Math.hypot(siteVectorItrsKm(site)[0], siteVectorItrsKm(site)[1]);
      rows.push(`${tdb}: UT1−UTC(swetest) ${dSwe.toFixed(3)} s, miss ${(withD * 1000).toFixed(1)} m vs ${(withZero * 1000).toFixed(1)} m with 0`);
      // Like for like swetest agrees to ~1 m (measured in the test above); tolerance 10 m.
      expect(withD).toBeLessThan(0.01);
      expect(withZero).toBeGreaterThan(withD);
      // with 0 the miss is the rotation of the site by ω·dSwe (10 m slack as above)
      expect(Math.abs(withZero - expectedZeroKm)).toBeLessThan(0.01);
    }
    console.log(`UT1 − UTC option vs swetest: ${rows.join('; ')}`);
    expect(used).toBeGreaterThanOrEqual(2);
  }, 60_000);
});

describe('observerStatesAu', () => {
  const table = [obs('HSA', 10.25, 50.1, 300), obs('HSB', 289.27, -30.17, 2200)];

  it('is the ephemeris geocentre plus the rotated site, with the site velocity ω × r', () => {
    const t0 = tdbDaysFromUtc(2026, 3, 1, 3, 0, 0);
    const eph = ChebyshevEphemeris.build(t0 - 2, t0 + 2);
    const items = [{ stn: 'HSA', obsTimeTdbDays: t0 }, { stn: 'HSB', obsTimeTdbDays: t0 + 0.25 }];
    const states = observerStatesAu(items, table, eph);
    expect(states).toHaveLength(2);
    const e = new Float64Array(6);
    items.forEach((it, k) => {
      eph.stateInto(EARTH_INDEX, it.obsTimeTdbDays, e);
      const site = siteGeocentricAu(table.find((o) => o.code === it.stn)!, it.obsTimeTdbDays);
      for (let c = 0; c < 3; c++) {
        expect(states[k].positionAu[c]).toBeCloseTo(e[c] + site.positionAu[c], 15);
        expect(states[k].velocityAuD[c]).toBeCloseTo(e[3 + c] + site.velocityAuD[c], 15);
      }
      // |site| = a·ρ (km); the geocentric distance of the site, not a fixed number: ~6366 km at 50° and 30°.
      const rKm = Math.hypot(...site.positionAu) * AU_KM;
      expect(rKm).toBeGreaterThan(6356);
      expect(rKm).toBeLessThan(6383);
    });
    // Site velocity against a central difference of the site position (10 s steps).
    const h = 10 / DAY_S;
    const p = (t: number) => siteGeocentricAu(table[0], t).positionAu;
    const v = siteGeocentricAu(table[0], t0).velocityAuD;
    const pp = p(t0 + h), pm = p(t0 - h);
    for (let c = 0; c < 3; c++) expect(Math.abs((pp[c] - pm[c]) / (2 * h) - v[c]) * (AU_KM / DAY_S)).toBeLessThan(1e-5); // km/s
    // ~0.30 km/s at latitude 50° (ω a cos φ′, computed)
    expect(Math.hypot(...v) * (AU_KM / DAY_S)).toBeCloseTo(7.292115e-5 * Math.hypot(...siteVectorItrsKm(table[0]).slice(0, 2)), 4);
  });

  it('builds its own ephemeris when none is given', () => {
    const t0 = tdbDaysFromUtc(2026, 3, 1, 3, 0, 0);
    const a = observerStatesAu([{ stn: 'HSA', obsTimeTdbDays: t0 }], table);
    const b = observerStatesAu([{ stn: 'HSA', obsTimeTdbDays: t0 }], table, ChebyshevEphemeris.build(t0 - 1, t0 + 1));
    for (let c = 0; c < 3; c++) expect(a[0].positionAu[c]).toBeCloseTo(b[0].positionAu[c], 14);
  });

  it('throws UnknownObservatoryError listing every unknown code', () => {
    const t0 = tdbDaysFromUtc(2026, 3, 1, 3, 0, 0);
    let err: unknown;
    try {
      observerStatesAu([{ stn: 'ZZ9', obsTimeTdbDays: t0 }, { stn: 'HSA', obsTimeTdbDays: t0 }, { stn: 'QQ1', obsTimeTdbDays: t0 }, { stn: 'ZZ9', obsTimeTdbDays: t0 }], table);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(UnknownObservatoryError);
    expect((err as UnknownObservatoryError).codes).toEqual(['QQ1', 'ZZ9']);
    expect((err as Error).message).toMatch(/QQ1, ZZ9/);
    expect(() => observerStatesAu([{ stn: 'HSA', obsTimeTdbDays: t0 }, { stn: 'HSB', obsTimeTdbDays: Number.NaN }], table)).toThrow(/item 1 \(HSB\): obsTimeTdbDays must be finite/);
  });
});

function wrap(a: number): number {
  return Math.atan2(Math.sin(a), Math.cos(a));
}
