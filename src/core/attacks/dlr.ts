/**
 * The Difference of Logits Ratio losses of Croce & Hein (ICML 2020, Sec. 4), maximised by APGD.
 * With the logits of a sample sorted in decreasing order, z_π1 ≥ z_π2 ≥ …:
 *
 *   untargeted  DLR(z, y)    = −(z_y − max_{j≠y} z_j) / (z_π1 − z_π3 + 1e-12)
 *   targeted    DLR_t(z, y, t) = −(z_y − z_t) / (z_π1 − (z_π3 + z_π4)/2 + 1e-12)
 *
 * Both are invariant to shifting and to positively scaling the logits, so a model cannot hide
 * behind a logit scale. The untargeted form needs 3 classes, the targeted one 4.
 */
import * as tf from '@tensorflow/tfjs';

/** Keeps the denominators away from zero when the top logits tie (the paper's constant). */
const DLR_GUARD = 1e-12;

/** z_c per row for per-row classes c (int32 [N]). */
function logitOf(z: tf.Tensor2D, classes: tf.Tensor1D): tf.Tensor1D {
  return tf.sum(tf.mul(z, tf.oneHot(tf.cast(classes, 'int32'), z.shape[1])), 1);
}

/**
 * The `count` largest logits per row, largest first, each [N]. The ranking comes from argMax with
 * the earlier winners masked out (tf.topk has no gradient in tfjs; argMax, oneHot and where pass a
 * zero gradient to the ranking), and the values are picked from z so the gradient flows to them.
 */
export function largestLogits(z: tf.Tensor2D, count: number): tf.Tensor1D[] {
  const classes = z.shape[1];
  const out: tf.Tensor1D[] = [];
  let remaining: tf.Tensor2D = z;
  for (let r = 0; r < count; r++) {
    const winner = tf.oneHot(tf.argMax(remaining, 1), classes);
    out.push(tf.sum(tf.mul(z, winner), 1));
    remaining = tf.where(tf.cast(winner, 'bool'), tf.fill(z.shape, -Infinity), remaining);
  }
  return out;
}

function requireClasses(z: tf.Tensor2D, needed: number, what: string): void {
  if (z.shape[1] < needed) {
    throw new Error(`The ${what} DLR loss needs at least ${needed} classes; this model has ${z.shape[1]}.`);
  }
}

/** Untargeted DLR per sample [N]; positive exactly when some class beats the true class y. */
export function dlrLoss(z: tf.Tensor2D, labels: tf.Tensor1D): tf.Tensor1D {
  requireClasses(z, 3, 'untargeted');
  return tf.tidy(() => {
    const zy = logitOf(z, labels);
    const isLabel = tf.cast(tf.oneHot(tf.cast(labels, 'int32'), z.shape[1]), 'bool');
    const bestOther = tf.max(tf.where(isLabel, tf.fill(z.shape, -Infinity), z), 1);
    const [first, , third] = largestLogits(z, 3);
    return tf.neg(tf.div(tf.sub(zy, bestOther), tf.add(tf.sub(first!, third!), DLR_GUARD)));
  });
}

/** Targeted DLR per sample [N] towards classes t (int32 [N]); positive exactly when z_t > z_y. */
export function targetedDlrLoss(z: tf.Tensor2D, labels: tf.Tensor1D, targets: tf.Tensor1D): tf.Tensor1D {
  requireClasses(z, 4, 'targeted');
  return tf.tidy(() => {
    const [first, , third, fourth] = largestLogits(z, 4);
    const scale = tf.add(tf.sub(first!, tf.div(tf.add(third!, fourth!), 2)), DLR_GUARD);
    return tf.neg(tf.div(tf.sub(logitOf(z, labels), logitOf(z, targets)), scale));
  });
}
