/**
 * Per-sample losses the gradient searches maximise, always computed from logits z [N, K]
 * (never from clipped probabilities, whose gradients vanish once a class saturates).
 *
 * Untargeted (move away from the true class y):
 *   ce      logsumexp(z) − z_y                      (cross-entropy of the true class)
 *   margin  max_{j≠y} z_j − z_y                     (> 0 exactly when the sample is misclassified)
 * Targeted (move towards class t):
 *   ce      z_t − logsumexp(z)                      (−cross-entropy of the target)
 *   margin  z_t − max_{j≠t} z_j                     (> 0 exactly when t wins)
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn } from '../types.ts';
import type { LossKind } from './types.ts';

/** Loss, input gradient and logits from one forward/backward pass. */
export interface LossAndGradient {
  /** Per-sample loss [N] (the quantity the search maximises). */
  readonly loss: tf.Tensor1D;
  /** d(Σ loss)/dx, same shape as x; row i is the gradient of sample i's own loss. */
  readonly grad: tf.Tensor4D;
  /** Logits at x [N, K], so the same pass tells which samples are misclassified. */
  readonly logits: tf.Tensor2D;
}

/** Loss and logits from a forward pass only. */
export interface LossAndLogits {
  readonly loss: tf.Tensor1D;
  readonly logits: tf.Tensor2D;
}

/** z_c per row for the class index c given per row (int32 [N]). */
function pickClass(z: tf.Tensor2D, classes: tf.Tensor1D): tf.Tensor1D {
  const mask = tf.oneHot(tf.cast(classes, 'int32'), z.shape[1]);
  return tf.sum(tf.mul(z, mask), 1);
}

/** max_{j≠c} z_j per row. */
function bestOtherClass(z: tf.Tensor2D, classes: tf.Tensor1D): tf.Tensor1D {
  const isClass = tf.cast(tf.oneHot(tf.cast(classes, 'int32'), z.shape[1]), 'bool');
  // −Infinity (not a large negative constant) so that no logit scale can make the class itself win.
  const excluded = tf.where(isClass, tf.fill(z.shape, -Infinity), z);
  return tf.max(excluded, 1);
}

/**
 * Per-sample loss to maximise. `targets` null → untargeted (away from `labels`); otherwise
 * targeted towards `targets` (int32 [N]) and `labels` is not used.
 */
export function perSampleLoss(z: tf.Tensor2D, labels: tf.Tensor1D, loss: LossKind, targets: tf.Tensor1D | null): tf.Tensor1D {
  return tf.tidy(() => {
    if (targets === null) {
      const zy = pickClass(z, labels);
      return loss === 'ce' ? tf.sub(tf.logSumExp(z, 1), zy) : tf.sub(bestOtherClass(z, labels), zy);
    }
    const zt = pickClass(z, targets);
    return loss === 'ce' ? tf.sub(zt, tf.logSumExp(z, 1)) : tf.sub(zt, bestOtherClass(z, targets));
  });
}

/** Least-likely target per sample: argmin of the clean logits (int32 [N]). */
export function leastLikelyTargets(cleanLogits: tf.Tensor2D): tf.Tensor1D {
  return tf.tidy(() => tf.cast(tf.argMin(cleanLogits, 1), 'int32'));
}

/** 1 where argmax of the logits differs from the label (bool [N]). Ties go to the lower index (tf.argMax). */
export function misclassified(logits: tf.Tensor2D, labels: tf.Tensor1D): tf.Tensor1D {
  return tf.tidy(() => tf.notEqual(tf.cast(tf.argMax(logits, 1), 'int32'), tf.cast(labels, 'int32')));
}

/**
 * Per-sample loss, its gradient with respect to the pixels and the logits, from a single
 * forward/backward pass. Returns ordinary tensors (nothing kept), so it can be called inside tf.tidy.
 */
export function lossAndInputGradient(
  logits: LogitsFn,
  x: tf.Tensor4D,
  labels: tf.Tensor1D,
  loss: LossKind,
  targets: tf.Tensor1D | null,
): LossAndGradient {
  return tf.tidy(() => {
    // valueAndGrad hands back only the function's value (the per-sample loss; its upstream gradient
    // of ones makes the gradient that of Σ loss). The logits of the same forward pass are kept out of
    // the forward scope with tf.keep and turned into an ordinary tracked tensor right after.
    let kept: tf.Tensor2D | null = null;
    const lossOf = (input: tf.Tensor4D): tf.Tensor1D => {
      const z = logits(input);
      kept = tf.keep(z);
      return perSampleLoss(z, labels, loss, targets);
    };
    try {
      const { value, grad } = tf.valueAndGrad(lossOf)(x, tf.ones([x.shape[0]]));
      return { loss: value, grad, logits: tf.clone(keptOrThrow(kept)) };
    } finally {
      (kept as tf.Tensor2D | null)?.dispose();
    }
  });
}

function keptOrThrow(z: tf.Tensor2D | null): tf.Tensor2D {
  if (z === null) throw new Error('lossAndInputGradient: the logits function was not called');
  return z;
}

/** Loss and logits without the backward pass (for the final iterate and the FGSM check). */
export function lossAndLogits(
  logits: LogitsFn,
  x: tf.Tensor4D,
  labels: tf.Tensor1D,
  loss: LossKind,
  targets: tf.Tensor1D | null,
): LossAndLogits {
  return tf.tidy(() => {
    const z = logits(x);
    return { logits: z, loss: perSampleLoss(z, labels, loss, targets) };
  });
}
