/**
 * Small seeded tf.layers models and gradient functions for the end-to-end tests and the
 * memory test. The weights come from the seeded generator, so the model built on the wasm
 * backend and the one built on the cpu backend are the same function.
 */
import * as tf from '@tensorflow/tfjs';
import type { Rng } from '../../src/core/random/rng.ts';

/** Replace every weight with seeded values; batch-norm variances are kept positive. */
export function seedWeights(model: tf.LayersModel, rng: Rng): void {
  const values = model.weights.map((w) => {
    const size = w.shape.reduce((a: number, b) => a * (b ?? 1), 1);
    const shape = w.shape as number[];
    if (w.name.includes('moving_variance') || w.name.includes('gamma')) return tf.tensor(rng.uniformArray(size, 0.5, 1.5), shape);
    return tf.tensor(rng.normalArray(size).map((v) => v * 0.4), shape);
  });
  model.setWeights(values);
  tf.dispose(values);
}

/**
 * conv 3×3 (linear: the fused conv whose gradient needs Conv2DBackpropFilter) → batch-norm →
 * max-pool (windows of batch-normalised, often all-negative values) → relu → separable conv
 * (depthwise + pointwise) → flatten → dense logits.
 */
export function buildConvBnModel(rng: Rng): tf.LayersModel {
  const model = tf.sequential({
    layers: [
      tf.layers.conv2d({ inputShape: [12, 12, 2], filters: 4, kernelSize: 3, padding: 'same', activation: 'linear' }),
      tf.layers.batchNormalization(),
      tf.layers.maxPooling2d({ poolSize: 2, strides: 2 }),
      tf.layers.activation({ activation: 'relu' }),
      tf.layers.separableConv2d({ filters: 3, kernelSize: 3, depthMultiplier: 2, strides: 1, padding: 'valid' }),
      tf.layers.flatten(),
      tf.layers.dense({ units: 5 }),
    ],
  });
  seedWeights(model, rng);
  return model;
}

/** Gradient of the summed softmax cross-entropy of the logits with respect to the input. */
export function crossEntropyInputGradient(model: tf.LayersModel, x: tf.Tensor4D, labels: tf.Tensor2D): tf.Tensor4D {
  return tf.tidy(() => {
    const loss = (input: tf.Tensor): tf.Scalar =>
      tf.losses.softmaxCrossEntropy(labels, model.apply(input, { training: false }) as tf.Tensor2D, undefined, 0, tf.Reduction.SUM) as tf.Scalar;
    return tf.grad(loss)(x) as tf.Tensor4D;
  });
}

/** Seeded one-hot labels [n, classes]. */
export function randomLabels(rng: Rng, n: number, classes: number): tf.Tensor2D {
  const values = new Float32Array(n * classes);
  for (let i = 0; i < n; i++) values[i * classes + rng.int(classes)] = 1;
  return tf.tensor2d(values, [n, classes]);
}
