/**
 * Tensor steps of the sweep: building a batch from the sample set, predicting on it, and measuring
 * an attack's kept points. Every step runs in tf.tidy and reads its results back as typed arrays.
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn, Norm, SampleSet } from '../types.ts';

/** Prediction, its softmax confidence and (for adversarial points) the size of δ, per batch row. */
export interface BatchReadout {
  readonly pred: Int32Array;
  readonly conf: Float32Array;
  readonly linf: Float32Array;
  readonly l2: Float32Array;
}

/** The chosen samples as an NHWC tensor and their labels (the caller disposes both). */
export function gatherBatch(samples: SampleSet, indices: readonly number[]): { x: tf.Tensor4D; labels: tf.Tensor1D } {
  const size = samples.height * samples.width * samples.channels;
  const pixels = new Float32Array(indices.length * size);
  const labels = new Int32Array(indices.length);
  indices.forEach((sample, row) => {
    pixels.set(samples.pixels.subarray(sample * size, (sample + 1) * size), row * size);
    labels[row] = samples.labels[sample]!;
  });
  const shape: [number, number, number, number] = [indices.length, samples.height, samples.width, samples.channels];
  return { x: tf.tensor4d(pixels, shape), labels: tf.tensor1d(labels, 'int32') };
}

/** Arg-max class and its softmax probability for each row of `x`. */
export async function predict(logits: LogitsFn, x: tf.Tensor4D): Promise<{ pred: Int32Array; conf: Float32Array }> {
  const [pred, conf] = tf.tidy(() => {
    const z = logits(x);
    return [tf.argMax(z, 1), tf.max(tf.softmax(z), 1)];
  });
  try {
    return { pred: new Int32Array(await pred.data()), conf: new Float32Array(await conf.data()) };
  } finally {
    pred.dispose();
    conf.dispose();
  }
}

/** Prediction and confidence at `adv`, and the achieved ‖adv − x‖∞ and ‖adv − x‖₂ per row. */
export async function readAdversarial(logits: LogitsFn, x: tf.Tensor4D, adv: tf.Tensor4D): Promise<BatchReadout> {
  const { pred, conf } = await predict(logits, adv);
  const [linf, l2] = tf.tidy(() => {
    const delta = tf.reshape(tf.sub(adv, x), [x.shape[0], -1]);
    return [tf.max(tf.abs(delta), 1), tf.sqrt(tf.sum(tf.square(delta), 1))];
  });
  try {
    return { pred, conf, linf: new Float32Array(await linf.data()), l2: new Float32Array(await l2.data()) };
  } finally {
    linf.dispose();
    l2.dispose();
  }
}

/**
 * Throw if an attack handed back a point outside its budget: a point outside the threat model would
 * make the curve report flips that the budget does not allow. The slack covers float32 rounding of
 * the projection (a few ulps of values in [0,1]).
 */
export function assertInsideBudget(readout: BatchReadout, norm: Norm, eps: number, attackLabel: string): void {
  const sizes = norm === 'linf' ? readout.linf : readout.l2;
  const limit = eps * (1 + 1e-4) + 1e-5;
  for (let i = 0; i < sizes.length; i++) {
    if (!(sizes[i]! <= limit)) {
      throw new Error(`${attackLabel} returned a point with ‖δ‖ = ${sizes[i]} above the budget ${eps} (${norm}).`);
    }
  }
}
