/**
 * Brink's wasm MaxPoolGrad against the tfjs cpu backend's kernel (the reference): random shapes,
 * window sizes, strides and paddings, values with many ties (the cpu backend gives the gradient to
 * the first maximum in row-major window order), and all-negative windows, where the stock
 * tfjs 4.22 wasm kernel (running maximum starting at +1.2e-38) loses the gradient.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { createRng, type Rng } from '../../src/core/random/rng.ts';
import { registerBrinkWasmKernels, restoreStockWasmKernels } from '../../src/core/backend/kernels/registerKernels.ts';
import { padAttrs, randomWindowCase, type WindowCase } from './cases.ts';
import { maxAbsDifference, randomTensor, runKernelOn, runOnBoth, type HostTensor } from './harness.ts';

const ATOL = 1e-6; // sums of at most a few dy values: float32 rounding only

beforeAll(async () => {
  await useBackend('wasm');
});
afterAll(() => registerBrinkWasmKernels());

/** MaxPoolGrad's inputs for a case: x, dy and the forward output (tfjs cpu MaxPool). */
async function poolInputs(c: WindowCase, x: HostTensor, rng: Rng): Promise<{ inputs: Record<string, HostTensor>; attrs: Record<string, unknown> }> {
  const attrs = { filterSize: [c.filterShape[0], c.filterShape[1]], strides: c.strides, ...padAttrs(c) };
  const output = await runKernelOn('cpu', tf.MaxPool, { x }, attrs);
  return { inputs: { dy: randomTensor(rng, output.shape), input: x, output }, attrs };
}

/** Integers in [lo, hi]: many ties inside windows. */
function integerTensor(rng: Rng, shape: number[], lo: number, hi: number): HostTensor {
  const values = new Float32Array(shape.reduce((a, b) => a * b, 1));
  for (let i = 0; i < values.length; i++) values[i] = lo + rng.int(hi - lo + 1);
  return { shape, values };
}

describe('MaxPoolGrad (wasm, Brink)', () => {
  it('matches the tfjs cpu kernel over random shapes, windows, strides and paddings', async () => {
    const rng = createRng(401);
    for (let i = 0; i < 30; i++) {
      const c = randomWindowCase(rng, { kind: 'pool', dilate: false });
      const { inputs, attrs } = await poolInputs(c, randomTensor(rng, c.inShape), rng);
      const { wasm, cpu } = await runOnBoth(tf.MaxPoolGrad, inputs, attrs);
      expect(wasm.shape, c.label).toEqual(c.inShape);
      // Reference: tfjs cpu backend MaxPoolGrad.
      expectClose(wasm.values, cpu.values, ATOL, 0, c.label);
    }
  });

  it('breaks ties like the tfjs cpu kernel (first maximum in row-major window order)', async () => {
    const rng = createRng(402);
    for (let i = 0; i < 20; i++) {
      const c = randomWindowCase(rng, { kind: 'pool', dilate: false });
      const { inputs, attrs } = await poolInputs(c, integerTensor(rng, c.inShape, -1, 1), rng);
      const { wasm, cpu } = await runOnBoth(tf.MaxPoolGrad, inputs, attrs);
      // Reference: tfjs cpu backend MaxPoolGrad (maxPoolPositions keeps the first strict maximum).
      expectClose(wasm.values, cpu.values, ATOL, 0, c.label);
    }
  });

  it('treats −∞ and NaN like the tfjs cpu kernel (skipped; a window of −∞ passes nothing)', async () => {
    const rng = createRng(404);
    const x = randomTensor(rng, [2, 7, 7, 3]);
    for (let i = 0; i < x.values.length; i++) {
      const u = rng.next();
      if (u < 0.15) x.values[i] = -Infinity;
      else if (u < 0.25) x.values[i] = NaN;
    }
    x.values.fill(-Infinity, 0, 3 * 7 * 3); // rows 0–2 of the first image: whole windows of −∞
    const c = { filterShape: [3, 3, 3, 1], strides: [2, 2], pad: 'same' } as unknown as WindowCase;
    const { inputs, attrs } = await poolInputs(c, x, rng);
    const { wasm, cpu } = await runOnBoth(tf.MaxPoolGrad, inputs, attrs);
    // Reference: tfjs cpu backend MaxPoolGrad (running maximum from −∞, strict >).
    expectClose(wasm.values, cpu.values, ATOL, 0, 'non-finite inputs');
  });

  it('keeps the gradient of all-negative windows, which the stock wasm kernel loses', async () => {
    const rng = createRng(403);
    const shape = [2, 8, 8, 3];
    const negative = randomTensor(rng, shape);
    negative.values.forEach((v, i) => (negative.values[i] = -Math.abs(v) - 0.01));
    const c = { filterShape: [2, 2, 3, 1], strides: [2, 2], pad: 'valid' } as unknown as WindowCase;
    const { inputs, attrs } = await poolInputs(c, negative, rng);
    const cpu = await runKernelOn('cpu', tf.MaxPoolGrad, inputs, attrs);
    const ours = await runKernelOn('wasm', tf.MaxPoolGrad, inputs, attrs);
    restoreStockWasmKernels();
    const stock = await runKernelOn('wasm', tf.MaxPoolGrad, inputs, attrs);
    registerBrinkWasmKernels();
    // Reference: tfjs cpu backend MaxPoolGrad; non-overlapping windows, so every dy reaches dx.
    const dySum = inputs.dy!.values.reduce((a, b) => a + b, 0);
    expect(cpu.values.reduce((a, b) => a + b, 0)).toBeCloseTo(dySum, 4);
    expectClose(ours.values, cpu.values, ATOL, 0, 'Brink MaxPoolGrad vs cpu');
    // The stock tfjs 4.22 wasm kernel loses the gradient of (nearly) every window here: all values
    // lie below its starting maximum of +1.2e-38 (measured: one element of 384 nonzero).
    const mass = (t: HostTensor): number => t.values.reduce((a, b) => a + Math.abs(b), 0);
    expect(mass(stock)).toBeLessThan(0.05 * mass(cpu));
    expect(maxAbsDifference(stock.values, cpu.values)).toBeGreaterThan(0.1);
  });
});
