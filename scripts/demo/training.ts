/**
 * Mini-batch training of the demo classifier, plainly or adversarially (PGD L∞ adversarial training,
 * Madry et al., "Towards Deep Learning Models Resistant to Adversarial Attacks", ICLR 2018: every
 * batch is replaced by the last iterate of a PGD search from a random start in the ε-ball).
 * The PGD steps reuse the core's loss gradient and threat-model projection.
 */
import * as tf from '@tensorflow/tfjs';
import type { Rng } from '../../src/core/random/rng.ts';
import type { LogitsFn } from '../../src/core/types.ts';
import { lossAndInputGradient } from '../../src/core/attacks/losses.ts';
import { normalisedStep, projectToThreatModel, randomStart } from '../../src/core/attacks/projections.ts';
import { MARKER_PIXELS, MARKER_SIZE, type MarkerSet } from './markers.ts';

/** The training-time adversary: ε and step α in pixel units, number of PGD steps. */
export interface Adversary {
  readonly eps: number;
  readonly steps: number;
  readonly stepSize: number;
}

export interface EpochOptions {
  readonly batchSize: number;
  readonly numClasses: number;
  /** Shuffles the order of the images. */
  readonly rng: Rng;
  /** null: plain training on the clean images. */
  readonly adversary: Adversary | null;
}

/** The model as a pixel → logits function (its input is pixels in [0,1] already). */
export function logitsOf(model: tf.LayersModel): LogitsFn {
  return (pixels) => model.apply(pixels) as tf.Tensor2D;
}

/** Fisher–Yates permutation of 0..n−1 drawn from `rng`. */
export function shuffledIndices(n: number, rng: Rng): Int32Array {
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  for (let i = n - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    const t = order[i]!;
    order[i] = order[j]!;
    order[j] = t;
  }
  return order;
}

/** Copy the images at `indices` into one batch. */
export function gatherBatch(set: MarkerSet, indices: ArrayLike<number>): { pixels: Float32Array; labels: Int32Array } {
  const pixels = new Float32Array(indices.length * MARKER_PIXELS);
  const labels = new Int32Array(indices.length);
  for (let i = 0; i < indices.length; i++) {
    const k = indices[i]!;
    pixels.set(set.pixels.subarray(k * MARKER_PIXELS, (k + 1) * MARKER_PIXELS), i * MARKER_PIXELS);
    labels[i] = set.labels[k]!;
  }
  return { pixels, labels };
}

/** The last iterate of L∞ PGD from a random start (the point Madry et al. train on). */
export function pgdTrainingPoint(logits: LogitsFn, x: tf.Tensor4D, labels: tf.Tensor1D, adversary: Adversary, rng: Rng): tf.Tensor4D {
  return tf.tidy(() => {
    let current = randomStart(x, adversary.eps, 'linf', rng);
    for (let step = 0; step < adversary.steps; step++) {
      const { grad } = lossAndInputGradient(logits, current, labels, 'ce', null);
      const moved = tf.add(current, tf.mul(adversary.stepSize, normalisedStep(grad, 'linf'))) as tf.Tensor4D;
      current = projectToThreatModel(x, moved, adversary.eps, 'linf');
    }
    return current;
  });
}

/** One pass over `set` in shuffled mini-batches; returns the mean training loss. */
export async function trainEpoch(model: tf.LayersModel, optimizer: tf.Optimizer, set: MarkerSet, options: EpochOptions): Promise<number> {
  const count = set.labels.length;
  const order = shuffledIndices(count, options.rng);
  const logits = logitsOf(model);
  let lossSum = 0;
  let batches = 0;
  for (let start = 0; start + options.batchSize <= count; start += options.batchSize) {
    const batch = gatherBatch(set, order.subarray(start, start + options.batchSize));
    const loss = tf.tidy((): tf.Scalar => {
      const x = tf.tensor4d(batch.pixels, [options.batchSize, MARKER_SIZE, MARKER_SIZE, 3]);
      const labels = tf.tensor1d(batch.labels, 'int32');
      const input = options.adversary === null ? x : pgdTrainingPoint(logits, x, labels, options.adversary, options.rng);
      const targets = tf.oneHot(labels, options.numClasses);
      const value = optimizer.minimize(() => tf.losses.softmaxCrossEntropy(targets, logits(input)) as tf.Scalar, true);
      if (value === null) throw new Error('optimizer returned no loss');
      return value;
    });
    lossSum += (await loss.data())[0]!;
    loss.dispose();
    batches++;
  }
  return lossSum / Math.max(1, batches);
}
