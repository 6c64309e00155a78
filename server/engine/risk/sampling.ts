/**
 * Drawing virtual asteroids from a Gaussian: x_k = mean + L z_k, z_k ~ N(0, I), with L the lower-triangular
 * factor of the (validated) covariance, Gamma = L L^T (METHODS.md 6.1).
 */
import type { RandomStream } from './random';

/**
 * Write mean + L z into `out`, drawing z (n standard normals) from `stream`. `z` is an optional scratch buffer
 * (length n) that receives the deviates used (callers may record them, e.g. for LOV or importance weights).
 */
export function drawGaussian(
  mean: ArrayLike<number>,
  lowerFactor: Float64Array,
  n: number,
  stream: RandomStream,
  out: Float64Array,
  z: Float64Array = new Float64Array(n),
): Float64Array {
  for (let i = 0; i < n; i++) z[i] = stream.normal();
  for (let i = 0; i < n; i++) {
    let s = mean[i];
    for (let k = 0; k <= i; k++) s += lowerFactor[i * n + k] * z[k];
    out[i] = s;
  }
  return out;
}
