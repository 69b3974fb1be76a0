/**
 * Random perturbations drawn from the caller's Rng as plain arrays (never tf.random*): corners of the
 * L∞ ball, points on the L2 sphere, and APGD's random start. Sphere norms are computed in double
 * precision. See projections.ts for the uniform draws inside the balls.
 */
import * as tf from '@tensorflow/tfjs';
import type { Norm } from '../types.ts';
import type { Rng } from '../random/rng.ts';
import { uniformLinfBall } from './projections.ts';

const TINY = 1e-12;

/** Random corners of the L∞ ball: every pixel of δ is +ε or −ε with probability ½ each. */
export function linfCorners(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  const u = rng.uniformArray(count * dim, 0, 1);
  return u.map((v) => (v < 0.5 ? -eps : eps));
}

/** Uniform points on the L2 sphere of radius ε: Gaussian vectors scaled to length ε. */
export function l2Sphere(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  const out = rng.normalArray(count * dim);
  for (let s = 0; s < count; s++) {
    let squared = 0;
    for (let i = s * dim; i < (s + 1) * dim; i++) squared += out[i]! * out[i]!;
    // Scaling by a float64 factor and rounding each entry to float32 can leave the norm a few ulps
    // above ε; the callers clip to the box and the threat-model checks allow float32 rounding.
    const scale = eps / Math.max(Math.sqrt(squared), TINY);
    for (let i = s * dim; i < (s + 1) * dim; i++) out[i] = out[i]! * scale;
  }
  return out;
}

/**
 * APGD's random start: x + δ with δ uniform in the L∞ ball, or uniform on the L2 sphere of radius ε,
 * clipped to [0, 1] (clipping keeps the point in the ball, see projections.ts).
 */
export function apgdStart(x: tf.Tensor4D, eps: number, norm: Norm, rng: Rng): tf.Tensor4D {
  const [count, h, w, c] = x.shape;
  const dim = h * w * c;
  const delta = norm === 'linf' ? uniformLinfBall(count, dim, eps, rng) : l2Sphere(count, dim, eps, rng);
  return tf.tidy(() => tf.clipByValue(tf.add(x, tf.tensor4d(delta, x.shape)), 0, 1));
}

/** x + δ clipped to [0, 1], for δ drawn by one of the functions above. */
export function perturbInBox(x: tf.Tensor4D, delta: Float32Array): tf.Tensor4D {
  return tf.tidy(() => tf.clipByValue(tf.add(x, tf.tensor4d(delta, x.shape)), 0, 1));
}
