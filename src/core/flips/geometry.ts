/**
 * The threat model with one budget per row: {x' : ‖x' − x‖ ≤ ε_i, x' ∈ [0,1]} for L∞ and L2. The
 * bisection gives every sample its own budget, so these are the per-row versions of
 * attacks/projections.ts (same rules, ε as an [N,1,1,1] tensor instead of a number).
 */
import * as tf from '@tensorflow/tfjs';
import type { Norm } from '../types.ts';
import type { Rng } from '../random/rng.ts';
import { perSampleL2, perturbInBox, uniformL2Ball, uniformLinfBall } from '../attacks/projections.ts';

/** Guards divisions by a per-row norm that may be zero. */
const TINY = 1e-12;

/** Per-row budgets as an [N,1,1,1] tensor for broadcasting. */
export function budgetTensor(eps: Float32Array): tf.Tensor4D {
  return tf.tensor4d(eps, [eps.length, 1, 1, 1]);
}

/**
 * A point of the per-row threat model for `candidate` around `x`. L∞: δ clipped per pixel to
 * [−ε_i, ε_i], then x + δ to [0,1] (the exact projection). L2: δ scaled down to norm ≤ ε_i, then
 * clipped to the box; clipping only moves pixels towards x, so the point stays in the ball.
 */
export function projectRows(x: tf.Tensor4D, candidate: tf.Tensor4D, eps: tf.Tensor4D, norm: Norm): tf.Tensor4D {
  return tf.tidy(() => {
    const delta = tf.sub(candidate, x) as tf.Tensor4D;
    const inBall =
      norm === 'linf'
        ? tf.minimum(tf.maximum(delta, tf.neg(eps)), eps)
        : tf.mul(delta, tf.minimum(1, tf.div(eps, tf.maximum(perSampleL2(delta), TINY))));
    return tf.clipByValue(tf.add(x, inBall), 0, 1) as tf.Tensor4D;
  });
}

/** A random start per row: δ uniform in the row's ε-ball, clipped to the box (stays in the ball). */
export function randomStartRows(x: tf.Tensor4D, eps: Float32Array, norm: Norm, rng: Rng): tf.Tensor4D {
  const [count, h, w, c] = x.shape;
  const dim = h * w * c;
  const unit = norm === 'linf' ? uniformLinfBall(count, dim, 1, rng) : uniformL2Ball(count, dim, 1, rng);
  for (let row = 0; row < count; row++) {
    const scale = eps[row]!;
    for (let i = row * dim; i < (row + 1) * dim; i++) unit[i] = unit[i]! * scale;
  }
  return perturbInBox(x, unit);
}

/** ‖δ‖∞ or ‖δ‖₂ of each row of adv − x, in the norm's own sense (float32, as the sweep measures it). */
export async function perturbationSizes(x: tf.Tensor4D, adv: tf.Tensor4D, norm: Norm): Promise<Float32Array> {
  const sizes = tf.tidy(() => {
    const delta = tf.reshape(tf.sub(adv, x), [x.shape[0], -1]);
    return norm === 'linf' ? tf.max(tf.abs(delta), 1) : tf.sqrt(tf.sum(tf.square(delta), 1));
  });
  try {
    return new Float32Array(await sizes.data());
  } finally {
    sizes.dispose();
  }
}
