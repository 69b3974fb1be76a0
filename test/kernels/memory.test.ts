/**
 * Bookkeeping of the replacement wasm kernels: registration is idempotent and reversible, and
 * repeated gradient calls through every replacement leave tf.memory().numTensors and the wasm
 * backend's data-buffer count flat (the project rule: long loops keep numTensors flat).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import {
  BRINK_WASM_KERNELS,
  brinkWasmKernelsActive,
  registerBrinkWasmKernels,
  restoreStockWasmKernels,
} from '../../src/core/backend/kernels/registerKernels.ts';
import { buildConvBnModel, crossEntropyInputGradient, randomLabels } from './models.ts';

beforeAll(async () => {
  await useBackend('wasm');
});
afterAll(() => registerBrinkWasmKernels());

describe('kernel registration', () => {
  it('is idempotent and can be undone', () => {
    registerBrinkWasmKernels();
    registerBrinkWasmKernels();
    expect(brinkWasmKernelsActive()).toBe(true);
    for (const config of BRINK_WASM_KERNELS) expect(tf.getKernel(config.kernelName, 'wasm')?.kernelFunc).toBe(config.kernelFunc);
    restoreStockWasmKernels();
    restoreStockWasmKernels();
    expect(brinkWasmKernelsActive()).toBe(false);
    // Missing from stock tfjs 4.22 wasm: gone again; present there: the stock kernel is back.
    expect(tf.getKernel(tf.Conv2DBackpropFilter, 'wasm')).toBeUndefined();
    expect(tf.getKernel(tf.DepthwiseConv2dNativeBackpropInput, 'wasm')).toBeUndefined();
    expect(tf.getKernel(tf.MaxPoolGrad, 'wasm')).toBeDefined();
    expect(tf.getKernel(tf.Conv2DBackpropInput, 'wasm')).toBeDefined();
    registerBrinkWasmKernels();
    expect(brinkWasmKernelsActive()).toBe(true);
  });

  it('useBackend("wasm") registers them', async () => {
    restoreStockWasmKernels();
    await useBackend('wasm');
    expect(brinkWasmKernelsActive()).toBe(true);
  });
});

describe('memory', () => {
  it('keeps numTensors and the wasm data buffers flat across repeated gradient calls', async () => {
    await useBackend('wasm');
    const rng = createRng(601);
    const model = buildConvBnModel(rng);
    const labels = randomLabels(rng, 3, 5);
    const x = tf.tensor4d(rng.normalArray(3 * 12 * 12 * 2), [3, 12, 12, 2]);
    const filter = tf.tensor4d(rng.normalArray(3 * 3 * 2 * 2), [3, 3, 2, 2]);
    const fusedDepthwise = tf.grad((input: tf.Tensor) =>
      tf.sum(tf.fused.depthwiseConv2d({ x: input as tf.Tensor4D, filter, strides: 2, pad: 'same', activation: 'linear' })),
    );
    const counts: Array<[number, number]> = [];
    for (let i = 0; i < 4; i++) {
      const g1 = crossEntropyInputGradient(model, x, labels);
      const g2 = tf.tidy(() => fusedDepthwise(x));
      g1.dataSync();
      g2.dataSync();
      tf.dispose([g1, g2]);
      counts.push([tf.memory().numTensors, tf.engine().backend.numDataIds()]);
    }
    // Every call exercises Conv2DBackpropInput/Filter, MaxPoolGrad and both depthwise kernels.
    expect(counts.every(([n, d]) => n === counts[0]![0] && d === counts[0]![1])).toBe(true);
    tf.dispose([x, filter, labels]);
    model.dispose();
  });

  it('leaves nothing behind when a kernel runs outside any tidy scope', async () => {
    await useBackend('wasm');
    const rng = createRng(602);
    const x = tf.tensor4d(rng.normalArray(2 * 6 * 6 * 2), [2, 6, 6, 2]);
    const dy = tf.tensor4d(rng.normalArray(2 * 3 * 3 * 4), [2, 3, 3, 4]);
    const filter = tf.tensor4d(rng.normalArray(2 * 2 * 2 * 4), [2, 2, 2, 4]);
    const depthwiseFilter = tf.tensor4d(rng.normalArray(2 * 2 * 2 * 2), [2, 2, 2, 2]);
    const poolDy = tf.tensor4d(rng.normalArray(2 * 3 * 3 * 2), [2, 3, 3, 2]);
    const pooled = tf.maxPool(x, 2, 2, 'valid');
    const common = { strides: 2, pad: 'valid', dataFormat: 'NHWC' };
    const calls: Array<[string, tf.NamedTensorMap, object]> = [
      [tf.Conv2DBackpropInput, { dy, filter }, { ...common, inputShape: [2, 6, 6, 2] }],
      [tf.Conv2DBackpropFilter, { x, dy }, { ...common, filterShape: [2, 2, 2, 4] }],
      [tf.DepthwiseConv2dNativeBackpropInput, { dy, filter: depthwiseFilter }, { ...common, dilations: 1, inputShape: [2, 6, 6, 2] }],
      [tf.DepthwiseConv2dNativeBackpropFilter, { x, dy }, { ...common, dilations: 1, filterShape: [2, 2, 2, 2] }],
      [tf.MaxPoolGrad, { dy: poolDy, input: x, output: pooled }, { filterSize: 2, strides: 2, pad: 'valid' }],
    ];
    const before = [tf.memory().numTensors, tf.engine().backend.numDataIds()];
    for (let round = 0; round < 2; round++) {
      for (const [name, inputs, attrs] of calls) {
        const out = tf.engine().runKernel(name, inputs, attrs as tf.NamedAttrMap) as tf.Tensor;
        out.dataSync();
        out.dispose();
        expect([tf.memory().numTensors, tf.engine().backend.numDataIds()], name).toEqual(before);
      }
    }
    tf.dispose([x, dy, filter, depthwiseFilter, poolDy, pooled]);
  });
});
