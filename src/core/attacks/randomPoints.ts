/**
 * Random perturbations drawn from the caller's Rng as plain arrays (never tf.random*): corners of the
 * L∞ ball, points on the L2 sphere, and APGD's random start. Sphere norms are computed in double
 * precision. See projections.ts for the uniform draws inside the balls and for perturbInBox.
 */
import * as tf from '@tensorflow/tfjs';
import type { Norm } from '../types.ts';
import type { Rng } from '../random/rng.ts';
import { perturbInBox, scaleRowsToLength, uniformLinfBall } from './projections.ts';

/** Random corners of the L∞ ball: every pixel of δ is +ε or −ε with probability ½ each. */
export function linfCorners(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  const u = rng.uniformArray(count * dim, 0, 1);
  return u.map((v) => (v < 0.5 ? -eps : eps));
}

/** Uniform points on the L2 sphere of radius ε: Gaussian vectors scaled to length ε. */
export function l2Sphere(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  // Scaling by a float64 factor and rounding each entry to float32 can leave the norm a few ulps
  // above ε; the callers clip to the box and the threat-model checks allow float32 rounding.
  return scaleRowsToLength(rng.normalArray(count * dim), dim, () => eps);
}

/**
 * APGD's random start: x + δ with δ uniform in the L∞ ball, or uniform on the L2 sphere of radius ε,
 * clipped to [0, 1] (clipping keeps the point in the ball, see projections.ts).
 */
export function apgdStart(x: tf.Tensor4D, eps: number, norm: Norm, rng: Rng): tf.Tensor4D {
  const [count, h, w, c] = x.shape;
  const dim = h * w * c;
  return perturbInBox(x, norm === 'linf' ? uniformLinfBall(count, dim, eps, rng) : l2Sphere(count, dim, eps, rng));
}
