/**
 * Seeded small classifiers for the attack tests, written as LogitsFns with plain tf ops. Weights
 * are drawn from the project's seeded Rng and rounded to float32 once, so the float64 closed forms
 * in the tests use exactly the numbers the model computes with.
 */
import * as tf from '@tensorflow/tfjs';
import type { LogitsFn } from '../../src/core/types.ts';
import { createRng, type Rng } from '../../src/core/random/rng.ts';
import { logits64 } from '../flips/closedForm.ts';

/** The float64 weight vector of one class (closedForm.ts, which takes any AffineWeights such as an AffineModel). */
export { classWeights } from '../flips/closedForm.ts';

export interface AffineModel {
  /** W as [D, K], row-major (w[i·K + k] is the weight of pixel i for class k). */
  readonly w: Float32Array;
  readonly b: Float32Array;
  readonly d: number;
  readonly k: number;
  readonly logits: LogitsFn;
  /** Logits of one image in float64: z_k = Σ_i w_ik·x_i + b_k. */
  logits64(x: ArrayLike<number>): number[];
  dispose(): void;
}

/** logits = x·W + b on flattened pixels; W and b standard normal times `scale`. */
export function affineModel(seed: number, d: number, k: number, scale: number): AffineModel {
  const rng = createRng(seed);
  const w = Float32Array.from(rng.normalArray(d * k), (v) => v * scale);
  const b = Float32Array.from(rng.normalArray(k), (v) => v * scale);
  const wT = tf.tensor2d(w, [d, k]);
  const bT = tf.tensor1d(b);
  const logits: LogitsFn = (x) => tf.add(tf.matMul(tf.reshape(x, [x.shape[0], d]), wT), bT);
  return { w, b, d, k, logits, logits64: (x) => logits64({ w, b, d, k }, x), dispose: () => tf.dispose([wT, bT]) };
}

export interface TinyNet {
  readonly logits: LogitsFn;
  readonly shape: readonly [number, number, number];
  readonly classes: number;
  dispose(): void;
}

function weights(rng: Rng, shape: number[], fanIn: number): tf.Tensor {
  const size = shape.reduce((a, b) => a * b, 1);
  return tf.tensor(Float32Array.from(rng.normalArray(size), (v) => v * Math.sqrt(2 / fanIn)), shape);
}

/** 8×8×3 → conv 3×3×4 (same) → ReLU → dense 10. */
export function tinyConvNet(seed: number): TinyNet {
  const rng = createRng(seed);
  const kernel = weights(rng, [3, 3, 3, 4], 27) as tf.Tensor4D;
  const dense = weights(rng, [8 * 8 * 4, 10], 256) as tf.Tensor2D;
  const bias = weights(rng, [10], 10);
  const logits: LogitsFn = (x) => {
    const h = tf.relu(tf.conv2d(x, kernel, 1, 'same'));
    return tf.add(tf.matMul(tf.reshape(h, [x.shape[0], 256]), dense), bias) as tf.Tensor2D;
  };
  return { logits, shape: [8, 8, 3], classes: 10, dispose: () => tf.dispose([kernel, dense, bias]) };
}

/** 6×6×1 → dense 16 → ReLU → dense 5. */
export function tinyDenseNet(seed: number): TinyNet {
  const rng = createRng(seed);
  const w1 = weights(rng, [36, 16], 36) as tf.Tensor2D;
  const b1 = weights(rng, [16], 16);
  const w2 = weights(rng, [16, 5], 16) as tf.Tensor2D;
  const logits: LogitsFn = (x) => tf.matMul(tf.relu(tf.add(tf.matMul(tf.reshape(x, [x.shape[0], 36]), w1), b1)), w2);
  return { logits, shape: [6, 6, 1], classes: 5, dispose: () => tf.dispose([w1, b1, w2]) };
}

/** Argmax per row of a [N, K] tensor, read back as an Int32Array. */
export function argmaxRows(logits: tf.Tensor2D): Int32Array {
  return tf.tidy(() => Int32Array.from(tf.argMax(logits, 1).dataSync()));
}
