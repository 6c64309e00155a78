/**
 * Gauss-Legendre quadrature: nodes and weights on [-1, 1] by Newton's method on the Legendre recurrence
 * (the classic routine in Press et al. 2007, Numerical Recipes 3rd ed., §4.6 "gauleg"; Golub & Welsch 1969 give the
 * eigenvalue alternative). An n-point rule integrates polynomials of degree <= 2n - 1 exactly.
 */

const cache = new Map<number, { x: Float64Array; w: Float64Array }>();

export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const hit = cache.get(n);
  if (hit) return hit;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 0; j < n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j + 1) * z * p2 - j * p3) / (j + 1);
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) <= 1e-15) break;
    }
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = 2 / ((1 - z * z) * pp * pp);
    w[n - 1 - i] = w[i];
  }
  const rule = { x, w };
  cache.set(n, rule);
  return rule;
}

/** n-point Gauss-Legendre estimate of the integral of f over [a, b]. */
export function integrateGL(f: (t: number) => number, a: number, b: number, n = 20): number {
  const { x, w } = gaussLegendre(n);
  const half = 0.5 * (b - a);
  const mid = 0.5 * (a + b);
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i] * f(mid + half * x[i]);
  return s * half;
}
