/**
 * The threat model {x' : ‖x' − x‖ ≤ ε, x' ∈ [0,1]} for the L∞ and L2 norms: projection onto it,
 * normalised ascent directions and random starting points. Random numbers come from the caller's
 * Rng as plain arrays (never tf.random*), so one seed gives the same bytes on every backend.
 */
import * as tf from '@tensorflow/tfjs';
import type { Norm } from '../types.ts';
import type { Rng } from '../random/rng.ts';

/** Guards divisions by a per-sample norm that may be zero (a flat gradient or no perturbation). */
const TINY = 1e-12;

/** Per-sample Euclidean norm of a batch, shaped [N, 1, 1, 1] for broadcasting. */
export function perSampleL2(t: tf.Tensor4D): tf.Tensor4D {
  return tf.tidy(() => tf.sqrt(tf.sum(tf.square(t), [1, 2, 3], true)));
}

/**
 * A point of the threat model for `candidate` around the clean `x`.
 *
 * L∞: δ is clipped to [−ε, ε] and x + δ to [0, 1]; the two constraints act per pixel, so this is
 * the exact Euclidean projection onto the intersection.
 *
 * L2: δ is scaled down to norm ≤ ε, then x + δ is clipped to [0, 1]. Because x itself lies in the
 * box, clipping only moves a pixel towards x, so it can never increase any |δ_i| and the result stays
 * inside the ball. It is a feasible point, not always the exact projection onto ball ∩ box.
 */
export function projectToThreatModel(x: tf.Tensor4D, candidate: tf.Tensor4D, eps: number, norm: Norm): tf.Tensor4D {
  return tf.tidy(() => {
    const delta = tf.sub(candidate, x);
    const inBall =
      norm === 'linf'
        ? tf.clipByValue(delta, -eps, eps)
        : tf.mul(delta, tf.minimum(1, tf.div(eps, tf.maximum(perSampleL2(delta as tf.Tensor4D), TINY))));
    return tf.clipByValue(tf.add(x, inBall), 0, 1);
  });
}

/**
 * Steepest-ascent direction of unit size in the norm's own sense: sign(g) for L∞ (unit L∞ length,
 * the maximiser of ⟨g, d⟩ over ‖d‖∞ ≤ 1) and g/‖g‖₂ per sample for L2 (zero where g is zero).
 */
export function normalisedStep(grad: tf.Tensor4D, norm: Norm): tf.Tensor4D {
  return tf.tidy(() => (norm === 'linf' ? tf.sign(grad) : tf.div(grad, tf.maximum(perSampleL2(grad), TINY))));
}

/** Uniform draws in the L∞ ball of radius ε: every pixel of δ uniform in [−ε, ε). */
export function uniformLinfBall(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  return rng.uniformArray(count * dim, -eps, eps);
}

/**
 * Uniform draws in the L2 ball of radius ε in `dim` dimensions: a Gaussian vector normalised to
 * a uniform direction, times ε·u^(1/dim) with u uniform in [0, 1) (the radius of a uniform point has
 * density ∝ r^(dim−1)). Norms are computed in double precision.
 */
export function uniformL2Ball(count: number, dim: number, eps: number, rng: Rng): Float32Array {
  const out = rng.normalArray(count * dim);
  const radii = rng.uniformArray(count, 0, 1);
  return scaleRowsToLength(out, dim, (row) => eps * Math.pow(radii[row]!, 1 / dim));
}

/**
 * Scales every row of `vectors` (rows of `dim` entries) in place to the Euclidean length
 * `lengthOf(row)`; row norms are computed in double precision, a zero row stays zero. Returns `vectors`.
 */
export function scaleRowsToLength(vectors: Float32Array, dim: number, lengthOf: (row: number) => number): Float32Array {
  const count = dim === 0 ? 0 : vectors.length / dim;
  for (let row = 0; row < count; row++) {
    let squared = 0;
    for (let i = row * dim; i < (row + 1) * dim; i++) squared += vectors[i]! * vectors[i]!;
    const scale = lengthOf(row) / Math.max(Math.sqrt(squared), TINY);
    for (let i = row * dim; i < (row + 1) * dim; i++) vectors[i] = vectors[i]! * scale;
  }
  return vectors;
}

/** A random starting point: x + δ with δ uniform in the ε-ball, then clipped to [0, 1]. */
export function randomStart(x: tf.Tensor4D, eps: number, norm: Norm, rng: Rng): tf.Tensor4D {
  const [count, h, w, c] = x.shape;
  const dim = h * w * c;
  return perturbInBox(x, norm === 'linf' ? uniformLinfBall(count, dim, eps, rng) : uniformL2Ball(count, dim, eps, rng));
}

/**
 * x + δ clipped to [0, 1], for a perturbation δ (x's shape, flattened) drawn from the Rng. For δ inside
 * the ε-ball the point stays inside it: clipping only moves pixels towards x (see projectToThreatModel).
 */
export function perturbInBox(x: tf.Tensor4D, delta: Float32Array): tf.Tensor4D {
  return tf.tidy(() => tf.clipByValue(tf.add(x, tf.tensor4d(delta, x.shape)), 0, 1));
}
