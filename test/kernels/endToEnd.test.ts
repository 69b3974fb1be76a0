/**
 * End-to-end input gradients on wasm (Brink's kernels) against the tfjs cpu backend (the
 * reference): depthwiseConv2d (plain and fused with a linear activation), a tf.layers model with
 * conv (linear) → batch-norm → max-pool → relu → separable conv → dense, and maxPool on
 * all-negative input. With the stock tfjs 4.22 wasm kernels the first two fail and the last is wrong.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { registerBrinkWasmKernels, restoreStockWasmKernels } from '../../src/core/backend/kernels/registerKernels.ts';
import { maxAbsDifference, randomTensor, switchBackend, type HostTensor } from './harness.ts';
import { buildConvBnModel, crossEntropyInputGradient, randomLabels } from './models.ts';

const ATOL = 1e-4;
const RTOL = 1e-3; // float32, different summation orders across a few layers

beforeAll(async () => {
  await useBackend('wasm');
});
afterAll(() => registerBrinkWasmKernels());

/** Input gradient of sum(w ⊙ f(x)) on one backend, read back. */
async function gradientOn(backend: 'wasm' | 'cpu', f: (x: tf.Tensor4D) => tf.Tensor, x: HostTensor, w: HostTensor): Promise<Float32Array> {
  await switchBackend(backend);
  return tf.tidy(() => {
    const weights = tf.tensor(w.values, w.shape);
    const g = tf.grad((input: tf.Tensor) => tf.sum(tf.mul(f(input as tf.Tensor4D), weights)))(tf.tensor4d(x.values, x.shape as [number, number, number, number]));
    return g.dataSync() as Float32Array;
  });
}

describe('input gradients end to end, wasm vs the tfjs cpu backend', () => {
  const rng = createRng(501);
  const x = randomTensor(rng, [2, 9, 9, 3]);
  const filter = randomTensor(rng, [3, 3, 3, 2]);
  const bias = randomTensor(rng, [6]);
  const w = randomTensor(rng, [2, 5, 5, 6]);

  const depthwise = (input: tf.Tensor4D): tf.Tensor => tf.depthwiseConv2d(input, tf.tensor4d(filter.values, [3, 3, 3, 2]), 2, 'same');
  const fusedLinear = (input: tf.Tensor4D): tf.Tensor =>
    tf.fused.depthwiseConv2d({ x: input, filter: tf.tensor4d(filter.values, [3, 3, 3, 2]), strides: 2, pad: 'same', bias: tf.tensor1d(bias.values), activation: 'linear' });

  it('depthwiseConv2d (stride 2, same, multiplier 2)', async () => {
    const ours = await gradientOn('wasm', depthwise, x, w);
    // Reference: tf.grad on the tfjs cpu backend.
    expectClose(ours, await gradientOn('cpu', depthwise, x, w), ATOL, RTOL, 'depthwise');
    restoreStockWasmKernels();
    await expect(gradientOn('wasm', depthwise, x, w)).rejects.toThrow(/DepthwiseConv2dNativeBackpropInput/);
    registerBrinkWasmKernels();
  });

  it('fused depthwiseConv2d with a linear activation (its gradient also takes the filter gradient)', async () => {
    const ours = await gradientOn('wasm', fusedLinear, x, w);
    // Reference: tf.grad on the tfjs cpu backend.
    expectClose(ours, await gradientOn('cpu', fusedLinear, x, w), ATOL, RTOL, 'fused depthwise');
  });

  it('fused conv2d with a linear activation (its gradient also takes Conv2DBackpropFilter)', async () => {
    const convFilter = randomTensor(rng, [3, 3, 3, 6]);
    const fusedConv = (input: tf.Tensor4D): tf.Tensor =>
      tf.fused.conv2d({ x: input, filter: tf.tensor4d(convFilter.values, [3, 3, 3, 6]), strides: 2, pad: 'same', bias: tf.tensor1d(bias.values), activation: 'linear' });
    const ours = await gradientOn('wasm', fusedConv, x, w);
    // Reference: tf.grad on the tfjs cpu backend.
    expectClose(ours, await gradientOn('cpu', fusedConv, x, w), ATOL, RTOL, 'fused conv2d');
    restoreStockWasmKernels();
    await expect(gradientOn('wasm', fusedConv, x, w)).rejects.toThrow(/Kernel 'Conv2DBackpropFilter'/);
    registerBrinkWasmKernels();
  });

  it('maxPool on all-negative input (3×3 windows, stride 2, same)', async () => {
    const negative: HostTensor = { shape: x.shape, values: x.values.map((v) => -Math.abs(v) - 0.01) };
    const pool = (input: tf.Tensor4D): tf.Tensor => tf.maxPool(input, 3, 2, 'same');
    const cpu = await gradientOn('cpu', pool, negative, { shape: [2, 5, 5, 3], values: w.values.slice(0, 150) });
    const ours = await gradientOn('wasm', pool, negative, { shape: [2, 5, 5, 3], values: w.values.slice(0, 150) });
    // Reference: tf.grad on the tfjs cpu backend.
    expectClose(ours, cpu, ATOL, RTOL, 'maxPool');
    restoreStockWasmKernels();
    const stock = await gradientOn('wasm', pool, negative, { shape: [2, 5, 5, 3], values: w.values.slice(0, 150) });
    registerBrinkWasmKernels();
    // The stock tfjs 4.22 wasm MaxPoolGrad loses these windows (running maximum starts at +1.2e-38).
    expect(maxAbsDifference(stock, cpu)).toBeGreaterThan(0.1);
  });

  it('tf.layers conv (linear) → batch-norm → max-pool → relu → separable conv → dense', async () => {
    const input = randomTensor(createRng(502), [4, 12, 12, 2]);
    const run = async (backend: 'wasm' | 'cpu'): Promise<Float32Array> => {
      await switchBackend(backend);
      const model = buildConvBnModel(createRng(503));
      const labels = randomLabels(createRng(504), 4, 5);
      const xs = tf.tensor4d(input.values, [4, 12, 12, 2]);
      try {
        const g = crossEntropyInputGradient(model, xs, labels);
        const values = g.dataSync() as Float32Array;
        g.dispose();
        return values;
      } finally {
        tf.dispose([xs, labels]);
        model.dispose();
      }
    };
    const ours = await run('wasm');
    const cpu = await run('cpu');
    // Reference: the same seeded model's tf.grad on the tfjs cpu backend.
    expectClose(ours, cpu, ATOL, RTOL, 'layers model');
    expect(maxAbsDifference(cpu, new Float32Array(cpu.length))).toBeGreaterThan(1e-3); // not a vacuous all-zero gradient
    restoreStockWasmKernels();
    // Backprop meets the separable conv's missing kernel first.
    await expect(run('wasm')).rejects.toThrow(/Kernel 'DepthwiseConv2dNativeBackpropInput'/);
    registerBrinkWasmKernels();
  });
});
