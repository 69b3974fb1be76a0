/**
 * Clean and robust accuracy of a demo model on a set of marker images. Robust accuracy uses the
 * core PGD (src/core/attacks/pgd.ts): a sample counts as robust when the model is right on the
 * clean image and PGD finds no misclassified point in the L∞ ball.
 */
import * as tf from '@tensorflow/tfjs';
import { createRng } from '../../src/core/random/rng.ts';
import { pgd } from '../../src/core/attacks/pgd.ts';
import { MARKER_PIXELS, MARKER_SIZE, type MarkerSet } from './markers.ts';
import { logitsOf } from './training.ts';

/** A count out of a total. */
export interface Tally {
  readonly correct: number;
  readonly total: number;
  readonly accuracy: number;
}

function tally(correct: number, total: number): Tally {
  return { correct, total, accuracy: total === 0 ? 0 : correct / total };
}

/** Arg-max class of every image, in batches. */
export async function predictClasses(model: tf.LayersModel, set: MarkerSet, batchSize = 256): Promise<Int32Array> {
  const count = set.labels.length;
  const out = new Int32Array(count);
  for (let start = 0; start < count; start += batchSize) {
    const n = Math.min(batchSize, count - start);
    const predicted = tf.tidy(() => {
      const x = tf.tensor4d(set.pixels.subarray(start * MARKER_PIXELS, (start + n) * MARKER_PIXELS), [n, MARKER_SIZE, MARKER_SIZE, 3]);
      return tf.argMax(model.predict(x) as tf.Tensor2D, 1);
    });
    out.set(await predicted.data(), start);
    predicted.dispose();
  }
  return out;
}

/** Fraction of images whose predicted class is their label. */
export async function cleanAccuracy(model: tf.LayersModel, set: MarkerSet): Promise<Tally> {
  const predicted = await predictClasses(model, set);
  let correct = 0;
  predicted.forEach((p, i) => {
    if (p === set.labels[i]) correct++;
  });
  return tally(correct, predicted.length);
}

/** Robust accuracy under untargeted PGD L∞ (cross-entropy, random start, step 2.5·ε/steps). */
export async function robustAccuracy(model: tf.LayersModel, set: MarkerSet, eps: number, steps: number, seed: number): Promise<Tally> {
  const count = set.labels.length;
  const predicted = await predictClasses(model, set);
  const x = tf.tensor4d(set.pixels, [count, MARKER_SIZE, MARKER_SIZE, 3]);
  const labels = tf.tensor1d(set.labels, 'int32');
  try {
    const options = pgd.meta.validate({ steps });
    const outcome = await pgd.run({ logits: logitsOf(model), x, labels, eps, norm: 'linf' }, options, { rng: createRng(seed) });
    outcome.adv.dispose();
    let correct = 0;
    for (let i = 0; i < count; i++) if (predicted[i] === set.labels[i] && outcome.flipped[i] === 0) correct++;
    return tally(correct, count);
  } finally {
    x.dispose();
    labels.dispose();
  }
}
