/**
 * Brink's wasm DepthwiseConv2dNativeBackpropInput and DepthwiseConv2dNativeBackpropFilter (both
 * missing from the stock tfjs 4.22 wasm backend) against the tfjs cpu backend's kernels (the
 * reference) over seeded random shapes, strides, paddings and depth multipliers. With dilations the
 * cpu kernels' loops are wrong (they ignore the dilation; tfjs gradients require 1), so dilated
 * cases are checked against the adjoint of the tfjs cpu backend's forward depthwiseConv2d.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { padAttrs, randomWindowCase } from './cases.ts';
import { randomTensor, runKernelOn, runOnBoth } from './harness.ts';
import { filterGradientByAdjoint, inputGradientByAdjoint } from './adjoint.ts';
import type { WindowCase } from './cases.ts';

// float32 sums of at most a few hundred N(0,1) products: 1e-4 absolute is far above rounding.
const ATOL = 1e-4;
const RTOL = 1e-4;

beforeAll(async () => {
  await useBackend('wasm');
});

/** Seeded cases: `count` undilated ones, then `dilatedCount` with dilation > 1 (stride 1). */
function drawCases(seed: number, count: number, dilatedCount: number): { plain: WindowCase[]; dilated: WindowCase[] } {
  const rng = createRng(seed);
  const plain: WindowCase[] = [];
  const dilated: WindowCase[] = [];
  while (plain.length < count || dilated.length < dilatedCount) {
    const c = randomWindowCase(rng, { kind: 'depthwise', dilate: true });
    const isDilated = c.dilations[0] * c.dilations[1] > 1;
    if (isDilated && dilated.length < dilatedCount) dilated.push(c);
    if (!isDilated && plain.length < count) plain.push(c);
  }
  return { plain, dilated };
}

describe('DepthwiseConv2dNativeBackpropInput (wasm, Brink)', () => {
  const { plain, dilated } = drawCases(301, 30, 8);

  it('matches the tfjs cpu kernel over random shapes, strides, paddings and multipliers', async () => {
    const rng = createRng(3011);
    for (const c of plain) {
      const dy = randomTensor(rng, c.outShape);
      const filter = randomTensor(rng, c.filterShape);
      const attrs = { inputShape: c.inShape, strides: c.strides, dilations: c.dilations, ...padAttrs(c) };
      const { wasm, cpu } = await runOnBoth(tf.DepthwiseConv2dNativeBackpropInput, { dy, filter }, attrs);
      expect(wasm.shape, c.label).toEqual(c.inShape);
      // Reference: tfjs cpu backend DepthwiseConv2dNativeBackpropInput.
      expectClose(wasm.values, cpu.values, ATOL, RTOL, c.label);
    }
    // The seeded draw must exercise multipliers and strides (guards against a degenerate generator).
    expect(plain.filter((c) => c.filterShape[3] > 1).length).toBeGreaterThan(5);
    expect(plain.filter((c) => c.strides[0] * c.strides[1] > 1).length).toBeGreaterThan(5);
  });

  it('handles dilations (adjoint of the tfjs cpu forward depthwiseConv2d)', async () => {
    const rng = createRng(3012);
    for (const c of dilated) {
      const dy = randomTensor(rng, c.outShape);
      const filter = randomTensor(rng, c.filterShape);
      const attrs = { inputShape: c.inShape, strides: c.strides, dilations: c.dilations, ...padAttrs(c) };
      const ours = await runKernelOn('wasm', tf.DepthwiseConv2dNativeBackpropInput, { dy, filter }, attrs);
      // Reference: adjoint of tfjs cpu depthwiseConv2d with the same dilations, every element.
      const expected = await inputGradientByAdjoint('depthwise', c, dy, filter);
      expectClose(ours.values, expected.values, ATOL, RTOL, c.label);
    }
  });
});

describe('DepthwiseConv2dNativeBackpropFilter (wasm, Brink)', () => {
  const { plain, dilated } = drawCases(302, 30, 6);

  it('matches the tfjs cpu kernel over random shapes, strides, paddings and multipliers', async () => {
    const rng = createRng(3021);
    for (const c of plain) {
      const x = randomTensor(rng, c.inShape);
      const dy = randomTensor(rng, c.outShape);
      const attrs = { filterShape: c.filterShape, strides: c.strides, dilations: c.dilations, ...padAttrs(c) };
      const { wasm, cpu } = await runOnBoth(tf.DepthwiseConv2dNativeBackpropFilter, { x, dy }, attrs);
      expect(wasm.shape, c.label).toEqual(c.filterShape);
      // Reference: tfjs cpu backend DepthwiseConv2dNativeBackpropFilter.
      expectClose(wasm.values, cpu.values, ATOL, RTOL, c.label);
    }
  });

  it('handles dilations (adjoint of the tfjs cpu forward depthwiseConv2d)', async () => {
    const rng = createRng(3022);
    for (const c of dilated) {
      const x = randomTensor(rng, c.inShape);
      const dy = randomTensor(rng, c.outShape);
      const attrs = { filterShape: c.filterShape, strides: c.strides, dilations: c.dilations, ...padAttrs(c) };
      const ours = await runKernelOn('wasm', tf.DepthwiseConv2dNativeBackpropFilter, { x, dy }, attrs);
      // Reference: adjoint of tfjs cpu depthwiseConv2d with the same dilations, every element.
      const expected = await filterGradientByAdjoint('depthwise', c, x, dy);
      expectClose(ours.values, expected.values, ATOL, RTOL, c.label);
    }
  });
});
