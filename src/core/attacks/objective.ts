/**
 * Value and input gradient of any per-sample objective of the logits (the DLR loss, a class margin,
 * a logit difference), from one forward/backward pass. losses.ts does the same for its fixed
 * LossKind losses; this is the general form the newer searches use.
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn } from '../types.ts';
import type { LossAndGradient, LossAndLogits } from './losses.ts';

/** Maps logits [N, K] to one value per sample [N]; must be differentiable and act row by row. */
export type LogitObjective = (z: tf.Tensor2D) => tf.Tensor1D;

/**
 * Per-sample objective, d(Σ objective)/dx and the logits of the same pass. Returns ordinary
 * tensors (nothing kept), so it can be called inside tf.tidy.
 */
export function objectiveAndInputGradient(logits: LogitsFn, x: tf.Tensor4D, objective: LogitObjective): LossAndGradient {
  return tf.tidy(() => {
    // As in losses.ts: the logits of the forward pass are kept out of the gradient scope with
    // tf.keep, cloned into the surrounding tidy, and the kept handle disposed.
    let kept: tf.Tensor2D | null = null;
    const valueOf = (input: tf.Tensor4D): tf.Tensor1D => {
      const z = logits(input);
      kept = tf.keep(z);
      return objective(z);
    };
    try {
      const { value, grad } = tf.valueAndGrad(valueOf)(x, tf.ones([x.shape[0]]));
      if (kept === null) throw new Error('objectiveAndInputGradient: the logits function was not called');
      return { loss: value, grad, logits: tf.clone(kept) };
    } finally {
      (kept as tf.Tensor2D | null)?.dispose();
    }
  });
}

/** Objective and logits from a forward pass only. */
export function objectiveAndLogits(logits: LogitsFn, x: tf.Tensor4D, objective: LogitObjective): LossAndLogits {
  return tf.tidy(() => {
    const z = logits(x);
    return { logits: z, loss: objective(z) };
  });
}
