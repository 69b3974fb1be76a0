/**
 * Brink's wasm Conv2DBackpropInput and Conv2DBackpropFilter against the tfjs cpu backend's kernels
 * (the reference) over seeded random shapes, strides and paddings; dilated cases, which the cpu
 * kernels do not take, against the adjoint of the tfjs cpu backend's forward conv2d.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { brinkWasmKernelsActive } from '../../src/core/backend/kernels/registerKernels.ts';
import { padAttrs, randomWindowCase } from './cases.ts';
import { randomTensor, runKernelOn, runOnBoth } from './harness.ts';
import { filterGradientByAdjoint, inputGradientByAdjoint } from './adjoint.ts';

// float32 sums of at most a few hundred N(0,1) products: 1e-4 absolute is far above rounding.
const ATOL = 1e-4;
const RTOL = 1e-4;

beforeAll(async () => {
  await useBackend('wasm');
});

describe('Conv2DBackpropInput (wasm, Brink)', () => {
  it('is registered for wasm once the backend starts', () => {
    expect(brinkWasmKernelsActive()).toBe(true);
  });

  it('matches the tfjs cpu kernel over random shapes, strides and paddings', async () => {
    const rng = createRng(101);
    for (let i = 0; i < 30; i++) {
      const c = randomWindowCase(rng, { kind: 'conv', dilate: false });
      const dy = randomTensor(rng, c.outShape);
      const filter = randomTensor(rng, c.filterShape);
      const attrs = { inputShape: c.inShape, strides: c.strides, dataFormat: 'NHWC', ...padAttrs(c) };
      const { wasm, cpu } = await runOnBoth(tf.Conv2DBackpropInput, { dy, filter }, attrs);
      expect(wasm.shape, c.label).toEqual(cpu.shape);
      // Reference: tfjs cpu backend Conv2DBackpropInput.
      expectClose(wasm.values, cpu.values, ATOL, RTOL, c.label);
    }
  });

  it('matches the tfjs cpu kernel in NCHW layout', async () => {
    const rng = createRng(102);
    const dyNhwc = randomTensor(rng, [2, 4, 4, 5]);
    const dy = { shape: [2, 5, 4, 4], values: transposeNhwcToNchw(dyNhwc) };
    const filter = randomTensor(rng, [3, 2, 3, 5]);
    const attrs = { inputShape: [2, 3, 8, 7], strides: [2, 2], pad: 'same', dataFormat: 'NCHW' };
    const { wasm, cpu } = await runOnBoth(tf.Conv2DBackpropInput, { dy, filter }, attrs);
    expect(wasm.shape).toEqual([2, 3, 8, 7]);
    // Reference: tfjs cpu backend Conv2DBackpropInput (channelsFirst branch).
    expectClose(wasm.values, cpu.values, ATOL, RTOL, 'NCHW');
  });

  it('handles dilations (adjoint of the tfjs cpu forward conv2d)', async () => {
    const rng = createRng(103);
    let dilatedCases = 0;
    while (dilatedCases < 8) {
      const c = randomWindowCase(rng, { kind: 'conv', dilate: true });
      if (c.dilations[0] === 1 && c.dilations[1] === 1) continue;
      dilatedCases++;
      const dy = randomTensor(rng, c.outShape);
      const filter = randomTensor(rng, c.filterShape);
      const attrs = { inputShape: c.inShape, strides: c.strides, dilations: c.dilations, dataFormat: 'NHWC', ...padAttrs(c) };
      const ours = await runKernelOn('wasm', tf.Conv2DBackpropInput, { dy, filter }, attrs);
      // Reference: adjoint of tfjs cpu conv2d with the same dilations, every element.
      const expected = await inputGradientByAdjoint('conv', c, dy, filter);
      expectClose(ours.values, expected.values, ATOL, RTOL, c.label);
    }
  });
});

describe('Conv2DBackpropFilter (wasm, Brink; missing from stock tfjs 4.22 wasm)', () => {
  it('matches the tfjs cpu kernel over random shapes, strides and paddings', async () => {
    const rng = createRng(201);
    for (let i = 0; i < 30; i++) {
      const c = randomWindowCase(rng, { kind: 'conv', dilate: false });
      const x = randomTensor(rng, c.inShape);
      const dy = randomTensor(rng, c.outShape);
      const attrs = { filterShape: c.filterShape, strides: c.strides, dataFormat: 'NHWC', ...padAttrs(c) };
      const { wasm, cpu } = await runOnBoth(tf.Conv2DBackpropFilter, { x, dy }, attrs);
      expect(wasm.shape, c.label).toEqual(c.filterShape);
      // Reference: tfjs cpu backend Conv2DBackpropFilter.
      expectClose(wasm.values, cpu.values, ATOL, RTOL, c.label);
    }
  });

  it('matches the tfjs cpu kernel in NCHW layout', async () => {
    const rng = createRng(202);
    const x = { shape: [2, 3, 7, 6], values: transposeNhwcToNchw(randomTensor(rng, [2, 7, 6, 3])) };
    const dy = { shape: [2, 4, 3, 3], values: transposeNhwcToNchw(randomTensor(rng, [2, 3, 3, 4])) };
    const attrs = { filterShape: [3, 2, 3, 4], strides: [2, 2], pad: 'valid', dataFormat: 'NCHW' };
    const { wasm, cpu } = await runOnBoth(tf.Conv2DBackpropFilter, { x, dy }, attrs);
    // Reference: tfjs cpu backend Conv2DBackpropFilter (channelsFirst branch).
    expectClose(wasm.values, cpu.values, ATOL, RTOL, 'NCHW');
  });

  it('handles dilations (adjoint of the tfjs cpu forward conv2d)', async () => {
    const rng = createRng(203);
    let dilatedCases = 0;
    while (dilatedCases < 8) {
      const c = randomWindowCase(rng, { kind: 'conv', dilate: true });
      if (c.dilations[0] === 1 && c.dilations[1] === 1) continue;
      dilatedCases++;
      const x = randomTensor(rng, c.inShape);
      const dy = randomTensor(rng, c.outShape);
      const attrs = { filterShape: c.filterShape, strides: c.strides, dilations: c.dilations, dataFormat: 'NHWC', ...padAttrs(c) };
      const ours = await runKernelOn('wasm', tf.Conv2DBackpropFilter, { x, dy }, attrs);
      // Reference: adjoint of tfjs cpu conv2d with the same dilations, every element.
      const expected = await filterGradientByAdjoint('conv', c, x, dy);
      expectClose(ours.values, expected.values, ATOL, RTOL, c.label);
    }
  });
});

function transposeNhwcToNchw(t: { shape: number[]; values: Float32Array }): Float32Array {
  const [b, h, w, c] = t.shape as [number, number, number, number];
  const out = new Float32Array(t.values.length);
  for (let n = 0; n < b; n++)
    for (let y = 0; y < h; y++)
      for (let x = 0; x < w; x++)
        for (let k = 0; k < c; k++) out[((n * c + k) * h + y) * w + x] = t.values[((n * h + y) * w + x) * c + k]!;
  return out;
}
