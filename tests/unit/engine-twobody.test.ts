import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  eccentricFromTrue,
  elementsToState,
  keplerUniversal,
  meanFromEccentric,
  orbitalPeriod,
  propagateKepler,
  solveBarker,
  solveKeplerElliptic,
  solveKeplerHyperbolic,
  stateToElements,
  stumpffC,
  stumpffS,
  trueFromEccentric,
  type CometaryElements,
} from '../../server/engine/twobody';
import { GM_AU3_D2 } from '../../server/engine/constants';
import { cross, dot, norm, type Vec3 } from '../../server/engine/vec';
import { eclipticToEquatorial, equatorialToEcliptic } from '../../server/engine/frames';

const DEG = Math.PI / 180;
const MU_SUN = GM_AU3_D2.sun;

/** relative agreement helper: |a − b| ≤ tol·max(1, |b|) */
function close(a: number, b: number, tol: number): boolean {
  return Math.abs(a - b) <= tol * Math.max(1, Math.abs(b));
}
function angleDiff(a: number, b: number): number {
  const d = (((a - b) % (2 * Math.PI)) + 3 * Math.PI) % (2 * Math.PI) - Math.PI;
  return Math.abs(d);
}
function vecClose(a: Vec3, b: Vec3, tol: number) {
  const scale = Math.max(norm(b), 1e-300);
  expect(norm([a[0] - b[0], a[1] - b[1], a[2] - b[2]]) / scale).toBeLessThan(tol);
}

// ----------------------------------------------------------------------------------------------------------
// Handbook CHECKS.md §1 worked examples. All printed values are recalled from memory of the books (CHECKS.md says
// so), and each was reproduced there by an independent two-body computation.

describe('CHECKS.md §1: Kepler-equation solvers', () => {
  it('Vallado 2013, Example 2-1: M = 235.4°, e = 0.4 -> E = 220.512074767522° (recalled)', () => {
    expect(Math.abs(solveKeplerElliptic(235.4 * DEG, 0.4) / DEG - 220.512074767522)).toBeLessThan(1e-10);
  });
  it('Vallado 2013, Example 2-3 (hyperbolic): e = 2.4, M = 235.4° -> H = 1.6013761449 (recalled)', () => {
    // CHECKS.md lists M = 4.1085 rad; the book's M is 235.4° = 4.108505 rad, and only that value reproduces
    // the printed H to 1e-9 (with M = 4.1085 exactly, H = 1.60137517, which we also check satisfies the equation).
    expect(Math.abs(solveKeplerHyperbolic(235.4 * DEG, 2.4) - 1.6013761449)).toBeLessThan(1e-9);
    const H = solveKeplerHyperbolic(4.1085, 2.4);
    expect(Math.abs(2.4 * Math.sinh(H) - H - 4.1085)).toBeLessThan(1e-13);
  });
  it('Meeus 1998, Example 30.a: e = 0.100, M = 5° -> E = 5.554589° (recalled)', () => {
    expect(Math.abs(solveKeplerElliptic(5 * DEG, 0.1) / DEG - 5.554589)).toBeLessThan(1e-6);
  });
  it('Meeus 1998, chapter 30: e = 0.990, M = 2° -> E = 32.361007° (recalled)', () => {
    expect(Math.abs(solveKeplerElliptic(2 * DEG, 0.99) / DEG - 32.361007)).toBeLessThan(1e-6);
  });
});

describe('CHECKS.md §1: universal-variable propagation', () => {
  it('Vallado 2013, Example 2-4 (KEPLER): 40 min geocentric propagation (recalled)', () => {
    const mu = 398600.4418;
    const res = keplerUniversal([1131.34, -2282.343, 6672.423], [-5.64305, 4.30333, 2.42879], 40 * 60, mu);
    const rExp: Vec3 = [-4219.7527, 4363.0292, -3958.7666];
    const vExp: Vec3 = [3.689866, -1.916735, -6.112511];
    for (let k = 0; k < 3; k++) {
      expect(Math.abs(res.r[k] - rExp[k])).toBeLessThan(1e-4);
      expect(Math.abs(res.v[k] - vExp[k])).toBeLessThan(1e-6);
    }
    expect(Math.abs(res.f * res.gdot - res.fdot * res.g - 1)).toBeLessThan(1e-12);
  });
  it('Curtis, Example 3.6 (universal anomaly): r0 = 10000 km, v0 = 10 km/s, ν0 = 30°, 1 h -> χ = 128.5, ν = 100.04° (recalled)', () => {
    const mu = 398600;
    const r0 = 10000;
    const v0 = 10;
    const th = 30 * DEG;
    // As in the book: e and h from r0, v0, ν0 (energy and orbit equations), moving away from perigee.
    const eps = (v0 * v0) / 2 - mu / r0;
    const b = (2 * eps * r0 * Math.cos(th)) / mu;
    const c = -(1 + (2 * eps * r0) / mu);
    const e = (b + Math.sqrt(b * b - 4 * c)) / 2;
    const h = Math.sqrt(mu * r0 * (1 + e * Math.cos(th)));
    const s0 = elementsToState({ q: (h * h) / mu / (1 + e), e, i: 0, node: 0, argPeri: 0, trueAnomaly: th }, mu);
    expect(norm(s0.r)).toBeCloseTo(10000, 6);
    expect(norm(s0.v)).toBeCloseTo(10, 9);
    const res = keplerUniversal(s0.r, s0.v, 3600, mu);
    expect(Math.abs(res.chi - 128.5)).toBeLessThan(0.05);
    const el = stateToElements(res.r, res.v, mu);
    expect(Math.abs(el.trueAnomaly / DEG - 100.04)).toBeLessThan(0.005);
  });
  it('Curtis, Example 3.5 (hyperbola): vp = 15 km/s at 300 km altitude -> h = 100170, e = 2.7696; from ν = 100°, 3 h later ν = 107.78°, r = 163180 km, v = 10.51 km/s (recalled)', () => {
    const mu = 398600;
    const rp = 6378 + 300;
    const vp = 15;
    const e = (rp * vp * vp) / mu - 1;
    expect(rp * vp).toBeCloseTo(100170, 6);
    expect(Math.abs(e - 2.7696)).toBeLessThan(5e-5);
    // CHECKS.md abbreviates the start: the book's part (a) starts at ν = 100° (recalled), and 3 h are counted from there.
    const s0 = elementsToState({ q: rp, e, i: 0, node: 0, argPeri: 0, trueAnomaly: 100 * DEG }, mu);
    const s1 = propagateKepler(s0.r, s0.v, 3 * 3600, mu);
    const el = stateToElements(s1.r, s1.v, mu);
    expect(Math.abs(el.trueAnomaly / DEG - 107.78)).toBeLessThan(0.005);
    expect(Math.abs(norm(s1.r) - 163180) / 163180).toBeLessThan(5e-5);
    expect(Math.abs(norm(s1.v) - 10.51)).toBeLessThan(0.005);
  });
});

describe('CHECKS.md §1: elements <-> state', () => {
  it('Vallado 2013, Example 2-5 (RV2COE): e = 0.832853, RAAN = 227.898°, argp = 53.38°, ν = 92.335° (recalled; printed digits)', () => {
    const el = stateToElements([6524.834, 6862.875, 6448.296], [4.901327, 5.533756, -1.976341], 398600.4418);
    expect(Math.abs(el.e - 0.832853)).toBeLessThan(5e-7);
    expect(Math.abs(el.node / DEG - 227.898)).toBeLessThan(5e-4);
    expect(Math.abs(el.argPeri / DEG - 53.38)).toBeLessThan(5e-3);
    expect(Math.abs(el.trueAnomaly / DEG - 92.335)).toBeLessThan(5e-4);
  });
  it('Curtis, Example 4.3: h = 58310, i = 153.2°, RAAN = 255.3°, e = 0.1712, argp = 20.07°, ν = 28.45°, a = 8788 km (recalled; printed digits)', () => {
    const mu = 398600;
    const el = stateToElements([-6045, -3490, 2500], [-3.457, 6.618, 2.533], mu);
    const h = Math.sqrt(mu * el.q * (1 + el.e));
    // the book rounds intermediate values; h printed 58310 vs 58311.7 computed: 5e-5 relative
    expect(Math.abs(h - 58310) / 58310).toBeLessThan(5e-5);
    expect(Math.abs(el.i / DEG - 153.2)).toBeLessThan(0.05);
    expect(Math.abs(el.node / DEG - 255.3)).toBeLessThan(0.05);
    expect(Math.abs(el.e - 0.1712)).toBeLessThan(5e-5);
    expect(Math.abs(el.argPeri / DEG - 20.07)).toBeLessThan(0.005);
    expect(Math.abs(el.trueAnomaly / DEG - 28.45)).toBeLessThan(0.005);
    expect(Math.abs(el.q / (1 - el.e) - 8788)).toBeLessThan(0.5);
  });
  it('Curtis, Example 3.1: rp = 9600, ra = 21000, ν = 120° -> e = 0.37255, h = 72472, T = 18834 s, E = 1.7281, M = 1.3601, t = 4077 s (recalled)', () => {
    const mu = 398600;
    const rp = 9600;
    const ra = 21000;
    const e = (ra - rp) / (ra + rp);
    expect(Math.abs(e - 0.37255)).toBeLessThan(5e-6);
    const s = elementsToState({ q: rp, e, i: 0.4, node: 1.1, argPeri: 2.3, trueAnomaly: 120 * DEG }, mu);
    const h = norm(cross(s.r, s.v));
    expect(Math.abs(h - 72472)).toBeLessThan(0.5);
    const el = stateToElements(s.r, s.v, mu, 0);
    expect(Math.abs(orbitalPeriod(el, mu)! - 18834)).toBeLessThan(0.5);
    expect(Math.abs(eccentricFromTrue(120 * DEG, e) - 1.7281)).toBeLessThan(5e-5);
    expect(Math.abs(el.meanAnomaly! - 1.3601)).toBeLessThan(5e-5);
    // tp is the nearest passage: t − tp = 4077 s
    expect(Math.abs(-el.tp - 4077)).toBeLessThan(0.5);
  });
  it('Curtis, Example 3.2: same orbit, t = 3 h -> M = 3.6029, E = 3.4794, ν = 193.2° (recalled)', () => {
    const mu = 398600;
    const rp = 9600;
    const ra = 21000;
    const e = (ra - rp) / (ra + rp);
    const period = 2 * Math.PI * Math.sqrt(((rp + ra) / 2) ** 3 / mu);
    const M = (2 * Math.PI * 10800) / period;
    expect(Math.abs(M - 3.6029)).toBeLessThan(5e-5);
    const E = solveKeplerElliptic(M, e);
    expect(Math.abs(E - 3.4794)).toBeLessThan(5e-5);
    expect(Math.abs((((trueFromEccentric(E, e) / DEG) % 360) + 360) % 360 - 193.2)).toBeLessThan(0.05);
    // the same through the time-of-perihelion path (universal variables from perihelion)
    const s = elementsToState({ q: rp, e, i: 0.4, node: 1.1, argPeri: 2.3, tp: 0, epoch: 10800 }, mu);
    const el = stateToElements(s.r, s.v, mu, 10800);
    expect(Math.abs(el.trueAnomaly / DEG - 193.2)).toBeLessThan(0.05);
    expect(Math.abs(el.meanAnomaly! - 3.6029)).toBeLessThan(5e-5);
  });
});

describe('parabolic orbits (Barker, METHODS §3.3)', () => {
  it('solveBarker solves D + D³/3 = Mp across scales, including tiny and huge Mp', () => {
    for (const mp of [1e-12, 1e-6, 0.01, 0.5, 1, 10, 1e4, 1e8, -3]) {
      const d = solveBarker(mp);
      expect(Math.abs(d + d ** 3 / 3 - mp) / Math.abs(mp)).toBeLessThan(1e-14);
    }
  });
  it('the tp path at e = 1 agrees with Barker: tan(ν/2) = D', () => {
    const q = 0.7;
    const dt = 123.4;
    const s = elementsToState({ q, e: 1, i: 0.5, node: 0.3, argPeri: 1.2, tp: 0, epoch: dt }, MU_SUN);
    const el = stateToElements(s.r, s.v, MU_SUN, dt);
    const D = solveBarker(Math.sqrt(MU_SUN / (2 * q ** 3)) * dt);
    expect(Math.abs(Math.tan(el.trueAnomaly / 2) - D) / D).toBeLessThan(1e-11);
    expect(Math.abs(norm(s.r) - q * (1 + D * D)) / norm(s.r)).toBeLessThan(1e-12);
  });
});

describe('Stumpff functions (METHODS §3.4)', () => {
  it('are continuous across the series/closed-form switch and match the closed forms', () => {
    for (const z of [-4.0000001, -3.9999999, 3.9999999, 4.0000001]) {
      expect(close(stumpffC(z), stumpffC(Math.sign(z) * 4), 1e-7)).toBe(true);
      expect(close(stumpffS(z), stumpffS(Math.sign(z) * 4), 1e-7)).toBe(true);
    }
    expect(stumpffC(0)).toBe(0.5);
    expect(stumpffS(0)).toBe(1 / 6);
    const z = 2.5;
    expect(stumpffC(z)).toBeCloseTo((1 - Math.cos(Math.sqrt(z))) / z, 14);
    expect(stumpffS(z)).toBeCloseTo((Math.sqrt(z) - Math.sin(Math.sqrt(z))) / z ** 1.5, 14);
    expect(stumpffC(-z)).toBeCloseTo((Math.cosh(Math.sqrt(z)) - 1) / z, 14);
    expect(stumpffS(-z)).toBeCloseTo((Math.sinh(Math.sqrt(z)) - Math.sqrt(z)) / z ** 1.5, 14);
  });
});

// ----------------------------------------------------------------------------------------------------------
// Property tests (issue 3 item 9): heliocentric, AU and days.

const angle = fc.double({ min: 0, max: 2 * Math.PI - 1e-9, noNaN: true });
const incl = fc.double({ min: 0.01, max: Math.PI - 0.01, noNaN: true });
const qAu = fc.double({ min: 0.05, max: 40, noNaN: true });

/** Eccentricity families: elliptic, near-parabolic (both sides, incl. exactly 1), hyperbolic. */
const eccentricity = fc.oneof(
  fc.double({ min: 0.001, max: 0.97, noNaN: true }),
  fc.double({ min: 0.999, max: 1.001, noNaN: true }),
  fc.constant(1),
  fc.double({ min: 1.01, max: 6, noNaN: true }),
);

function trueAnomalyFor(e: number, frac: number): number {
  // frac in (−1, 1) maps to the allowed range of ν: all of (−π, π) for ellipses, inside the asymptotes otherwise.
  // Near-parabolic ellipses (e > 0.97) are kept to |ν| < 0.95π like parabolas: at ν → π an e = 0.99998 orbit is
  // thousands of AU out, where 1e-11 in e is below what a double state can carry (a fast-check counterexample).
  const limit = e < 0.97 ? Math.PI : e <= 1 ? 0.95 * Math.PI : 0.95 * Math.acos(-1 / e);
  return frac * limit;
}

function checkElementsMatch(a: CometaryElements, b: { q: number; e: number; i: number; node: number; argPeri: number }) {
  expect(Math.abs(a.q - b.q) / b.q).toBeLessThan(1e-11);
  expect(Math.abs(a.e - b.e)).toBeLessThan(1e-11);
  expect(Math.abs(a.i - b.i)).toBeLessThan(1e-10);
  expect(angleDiff(a.node, b.node)).toBeLessThan(1e-9);
  expect(angleDiff(a.argPeri, b.argPeri)).toBeLessThan(1e-8);
}

describe('properties: elements -> state -> elements for all conic types', () => {
  it('with the true anomaly', () => {
    fc.assert(
      fc.property(qAu, eccentricity, incl, angle, angle, fc.double({ min: -0.999, max: 0.999, noNaN: true }), (q, e, i, node, argPeri, frac) => {
        const nu = trueAnomalyFor(e, frac);
        const s = elementsToState({ q, e, i, node, argPeri, trueAnomaly: nu }, MU_SUN);
        const el = stateToElements(s.r, s.v, MU_SUN, 0);
        checkElementsMatch(el, { q, e, i, node, argPeri });
        expect(angleDiff(el.trueAnomaly, nu)).toBeLessThan(1e-8);
        // and back to the same state through the time of perihelion (the universal-variable path)
        const s2 = elementsToState({ ...el, trueAnomaly: undefined, meanAnomaly: undefined, tp: el.tp, epoch: 0 }, MU_SUN);
        vecClose(s2.r, s.r, 1e-9);
        vecClose(s2.v, s.v, 1e-9);
      }),
      { numRuns: 400 },
    );
  });
  it('with the time of perihelion (epoch and tp in TDB days)', () => {
    fc.assert(
      fc.property(qAu, eccentricity, incl, angle, angle, fc.double({ min: -2000, max: 2000, noNaN: true }), (q, e, i, node, argPeri, dt) => {
        const epoch = 9000;
        const s = elementsToState({ q, e, i, node, argPeri, tp: epoch - dt, epoch }, MU_SUN);
        const el = stateToElements(s.r, s.v, MU_SUN, epoch);
        checkElementsMatch(el, { q, e, i, node, argPeri });
        const period = orbitalPeriod(el, MU_SUN);
        // tp is the nearest passage, so for ellipses compare modulo the period
        let dTp = el.tp - (epoch - dt);
        if (period !== null) dTp -= period * Math.round(dTp / period);
        expect(Math.abs(dTp)).toBeLessThan(1e-8 * Math.max(1, Math.abs(dt)));
      }),
      { numRuns: 400 },
    );
  });
  it('with the mean anomaly (ellipses and hyperbolas)', () => {
    fc.assert(
      fc.property(qAu, eccentricity.filter((e) => e !== 1 && Math.abs(e - 1) > 1e-4), incl, angle, angle, fc.double({ min: -5, max: 5, noNaN: true }), (q, e, i, node, argPeri, M) => {
        const s = elementsToState({ q, e, i, node, argPeri, meanAnomaly: M }, MU_SUN);
        const el = stateToElements(s.r, s.v, MU_SUN, 0);
        checkElementsMatch(el, { q, e, i, node, argPeri });
        if (e < 1) expect(angleDiff(el.meanAnomaly!, M)).toBeLessThan(1e-9);
        else expect(Math.abs(el.meanAnomaly! - M)).toBeLessThan(1e-9 * Math.max(1, Math.abs(M)));
      }),
      { numRuns: 300 },
    );
  });
  it('degenerate angles: circular and equatorial orbits reproduce the same state', () => {
    for (const [e, i] of [
      [0, 0.3],
      [0.2, 0],
      [0, 0],
      [1.5, Math.PI],
    ]) {
      const s = elementsToState({ q: 1.3, e, i, node: 0.7, argPeri: 0.4, trueAnomaly: 0.9 }, MU_SUN);
      const el = stateToElements(s.r, s.v, MU_SUN);
      const s2 = elementsToState(el, MU_SUN);
      vecClose(s2.r, s.r, 1e-12);
      vecClose(s2.v, s.v, 1e-12);
    }
  });
  it('rejects impossible element sets', () => {
    expect(() => elementsToState({ q: -1, e: 0.5, i: 0, node: 0, argPeri: 0, trueAnomaly: 0 }, MU_SUN)).toThrow(/q/);
    expect(() => elementsToState({ q: 1, e: 2, i: 0, node: 0, argPeri: 0, trueAnomaly: 2.2 }, MU_SUN)).toThrow(/asymptote/);
    expect(() => elementsToState({ q: 1, e: 1, i: 0, node: 0, argPeri: 0, meanAnomaly: 1 }, MU_SUN)).toThrow(/parabola/);
    expect(() => stateToElements([1, 0, 0], [2, 0, 0], MU_SUN)).toThrow(/rectilinear/);
  });
});

function randomState(q: number, e: number, i: number, node: number, argPeri: number, frac: number) {
  return elementsToState({ q, e, i, node, argPeri, trueAnomaly: trueAnomalyFor(e, frac) }, MU_SUN);
}

describe('properties: universal-variable propagation', () => {
  const dtArb = fc.double({ min: -3000, max: 3000, noNaN: true });
  const fracArb = fc.double({ min: -0.9, max: 0.9, noNaN: true });
  it('forward then backward returns to the start', () => {
    fc.assert(
      fc.property(qAu, eccentricity, incl, angle, angle, fracArb, dtArb, (q, e, i, node, argPeri, frac, dt) => {
        const s0 = randomState(q, e, i, node, argPeri, frac);
        const s1 = propagateKepler(s0.r, s0.v, dt, MU_SUN);
        const s2 = propagateKepler(s1.r, s1.v, -dt, MU_SUN);
        // 1e-8 relative (≈ 1.5 km at 1 AU): long arcs on fast near-Sun hyperbolas lose ~7 digits to cancellation
        // in the universal equation on the way back (conditioning, not a solver failure); for hyperbolas 1e-7
        // (fast-check found q = 0.05 AU, e = 5.9, 3,000 days at 1.004e-8)
        const tol = e > 1 ? 1e-7 : 1e-8;
        vecClose(s2.r, s0.r, tol);
        vecClose(s2.v, s0.v, tol);
      }),
      { numRuns: 400 },
    );
  });
  it('f ġ − ḟ g = 1, energy and angular momentum are conserved', () => {
    fc.assert(
      fc.property(qAu, eccentricity, incl, angle, angle, fracArb, dtArb, (q, e, i, node, argPeri, frac, dt) => {
        const s0 = randomState(q, e, i, node, argPeri, frac);
        const res = keplerUniversal(s0.r, s0.v, dt, MU_SUN);
        expect(Math.abs(res.f * res.gdot - res.fdot * res.g - 1)).toBeLessThan(1e-9);
        const energy = (r: Vec3, v: Vec3) => dot(v, v) / 2 - MU_SUN / norm(r);
        const e0 = energy(s0.r, s0.v);
        const e1 = energy(res.r, res.v);
        // scale: μ/q (energy is ~0 for near-parabolic orbits, so compare with the potential scale)
        expect(Math.abs(e1 - e0) / (MU_SUN / q)).toBeLessThan(1e-11);
        const h0 = cross(s0.r, s0.v);
        const h1 = cross(res.r, res.v);
        vecClose(h1, h0, 1e-9);
      }),
      { numRuns: 400 },
    );
  });
  it('agrees with the elements path: propagating a state by dt equals elementsToState at tp + dt', () => {
    fc.assert(
      fc.property(qAu, eccentricity, incl, angle, angle, dtArb, (q, e, i, node, argPeri, dt) => {
        const peri = elementsToState({ q, e, i, node, argPeri, trueAnomaly: 0 }, MU_SUN);
        const viaUniversal = propagateKepler(peri.r, peri.v, dt, MU_SUN);
        const viaElements = elementsToState({ q, e, i, node, argPeri, tp: 0, epoch: dt }, MU_SUN);
        vecClose(viaUniversal.r, viaElements.r, 1e-8);
        vecClose(viaUniversal.v, viaElements.v, 1e-8);
      }),
      { numRuns: 300 },
    );
  });
  it('survives a long hyperbolic arc (cosh/sinh overflow guard) and whole periods of an ellipse', () => {
    const s = elementsToState({ q: 1, e: 3, i: 0.2, node: 0, argPeri: 0, trueAnomaly: 0 }, MU_SUN);
    // 100,000 years outbound: finite, and equal to the (well-conditioned) time-of-perihelion path
    const far = propagateKepler(s.r, s.v, 3.65e7, MU_SUN);
    const farEl = elementsToState({ q: 1, e: 3, i: 0.2, node: 0, argPeri: 0, tp: 0, epoch: 3.65e7 }, MU_SUN);
    vecClose(far.r, farEl.r, 1e-12);
    // 100 years out and back: the universal equation loses digits to cancellation when started far out on a
    // hyperbola (terms ~ r₀χ² cancel), so the tolerance is looser than for the short arcs above.
    const out = propagateKepler(s.r, s.v, 36525, MU_SUN);
    const back = propagateKepler(out.r, out.v, -36525, MU_SUN);
    vecClose(back.r, s.r, 1e-8);
    const ell = elementsToState({ q: 1, e: 0.5, i: 0.2, node: 0, argPeri: 0, trueAnomaly: 1 }, MU_SUN);
    const period = orbitalPeriod({ q: 1, e: 0.5 }, MU_SUN)!;
    const after = propagateKepler(ell.r, ell.v, 1000 * period, MU_SUN);
    vecClose(after.r, ell.r, 1e-9);
  });
});

describe('frames (METHODS §2)', () => {
  it('ecliptic <-> equatorial is a rotation about x by the IAU 1976 obliquity and inverts exactly', () => {
    const v: Vec3 = [0.3, -1.2, 0.7];
    const back = eclipticToEquatorial(equatorialToEcliptic(v));
    vecClose(back, v, 1e-15);
    // the ecliptic pole (0,0,1)_ecl points to (0, −sin ε, cos ε) in equatorial axes, ε = 23.4392911° (METHODS §10)
    const pole = eclipticToEquatorial([0, 0, 1]);
    expect(pole[1]).toBeCloseTo(-Math.sin(23.4392911 * DEG), 9);
    expect(pole[2]).toBeCloseTo(Math.cos(23.4392911 * DEG), 9);
  });
});

describe('anomaly helpers', () => {
  it('M = E − e sin E is evaluated without cancellation near e = 1 and small E', () => {
    const e = 1 - 1e-9;
    const E = 1e-5;
    // series reference: (1−e)E + e(E³/6 − E⁵/120)
    const ref = (1 - e) * E + e * (E ** 3 / 6 - E ** 5 / 120);
    expect(Math.abs(meanFromEccentric(E, e) - ref) / ref).toBeLessThan(1e-12);
  });
});
