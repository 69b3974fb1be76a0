/**
 * Input gradients of the whole pixel pipeline (range scaling, per-channel mean/std, layout, model,
 * log for probability outputs) for a tfjs LayersModel and a hand-written GraphModel, loaded back
 * through loadModelFromFiles, on the wasm and cpu backends.
 *
 * Reference: central finite differences of an independent float64 implementation of the same net
 * (reference64.ts). In float64, h = 1e-5 leaves truncation error ~h²·f''' ≈ 1e-10 and rounding error
 * ~1e-16/h ≈ 1e-11, far below the float32 rounding of tfjs's own gradient (relative ~1e-6 per op),
 * and with h that small a ReLU kink is crossed only if a pre-activation lies within ~1e-4 of zero.
 * A float32 finite difference on the tfjs pipeline itself (h = 1e-2, smooth tanh net only) is
 * checked too, along a few random directions.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { makeLogitsFn } from '../../src/core/models/pipeline.ts';
import { createRng } from '../../src/core/random/rng.ts';
import type { LoadedModel, LogitsFn, NamedBytes, Preprocessing } from '../../src/core/types.ts';
import { layersModelFiles, randomWeights, type SmallNetSpec, type SmallNetWeights } from './fixtures.ts';
import { graphModelFiles } from './graphFixture.ts';
import { centralDifferences, pipeline64, weightedSum } from './reference64.ts';

const N = 2;
const BASE = { height: 5, width: 6, channels: 3, filters: 4, hidden: 6, classes: 5 } as const;

/** ImageNet-style statistics in 0–255 units (from memory; any non-trivial values serve the check). */
const PRE_255: Preprocessing = { inputRange: '0,255', mean: [123.7, 116.3, 103.5], std: [58.4, 57.1, 57.4], layout: 'nhwc' };
const PRE_PM1: Preprocessing = { inputRange: '-1,1', mean: [0.1], std: [0.5], layout: 'nchw' };

interface Case {
  readonly label: string;
  readonly spec: SmallNetSpec;
  readonly pre: Preprocessing;
  readonly files: (spec: SmallNetSpec, w: SmallNetWeights) => Promise<NamedBytes[]>;
}

const CASES: readonly Case[] = [
  {
    label: 'layers, NHWC, softmax output, 0–255 + mean/std, two shards under model/',
    spec: { ...BASE, layout: 'nhwc', activation: 'tanh', softmax: true },
    pre: PRE_255,
    files: (s, w) => layersModelFiles(s, w, { shards: 2, prefix: 'model/' }),
  },
  {
    label: 'layers, NCHW (Permute), logits, −1–1 + scalar mean/std',
    spec: { ...BASE, layout: 'nchw', activation: 'tanh', softmax: false },
    pre: PRE_PM1,
    files: (s, w) => layersModelFiles(s, w),
  },
  {
    label: 'graph, NHWC, ReLU, logits, 0–255 + mean/std, three shards',
    spec: { ...BASE, layout: 'nhwc', activation: 'relu', softmax: false },
    pre: PRE_255,
    files: async (s, w) => graphModelFiles(s, w, { shards: 3 }),
  },
  {
    label: 'graph, NCHW (Transpose), ReLU, Softmax op, −1–1',
    spec: { ...BASE, layout: 'nchw', activation: 'relu', softmax: true },
    pre: PRE_PM1,
    files: async (s, w) => graphModelFiles(s, w, { identityOutput: true }),
  },
];

function tfGradient(fn: LogitsFn, pixels: Float32Array, c: Float32Array, spec: SmallNetSpec): { value: number; grad: Float32Array } {
  return tf.tidy(() => {
    const x = tf.tensor4d(pixels, [N, spec.height, spec.width, spec.channels]);
    const weights = tf.tensor2d(c, [N, spec.classes]);
    const loss = (v: tf.Tensor4D): tf.Scalar => tf.sum(tf.mul(fn(v), weights));
    const { value, grad } = tf.valueAndGrad(loss)(x);
    return { value: value.dataSync()[0]!, grad: grad.dataSync() as Float32Array };
  });
}

function tfLoss(fn: LogitsFn, pixels: Float32Array, c: Float32Array, spec: SmallNetSpec): number {
  return tf.tidy(() => {
    const y = fn(tf.tensor4d(pixels, [N, spec.height, spec.width, spec.channels]));
    return weightedSum(y.dataSync(), c);
  });
}

for (const backend of BACKENDS) {
  describe(`pipeline input gradients on ${backend}`, () => {
    beforeAll(async () => {
      await useBackend(backend);
    });

    for (const [index, testCase] of CASES.entries()) {
      describe(testCase.label, () => {
        const { spec, pre } = testCase;
        const weights = randomWeights(spec, 100 + index);
        const rng = createRng(7 + index);
        const size = N * spec.height * spec.width * spec.channels;
        const pixels = rng.uniformArray(size, 0.05, 0.95);
        const c = rng.normalArray(N * spec.classes);
        let model: LoadedModel;
        let fn: LogitsFn;

        beforeAll(async () => {
          model = await loadModelFromFiles(await testCase.files(spec, weights));
          fn = makeLogitsFn(model, pre);
        });
        afterAll(() => model.dispose());

        it('forward values equal the float64 reference', () => {
          const got = tf.tidy(() => fn(tf.tensor4d(pixels, [N, spec.height, spec.width, spec.channels])).dataSync());
          const want = pipeline64(spec, weights, pre, Float64Array.from(pixels), N);
          // Reference: float64 textbook net (reference64.ts); measured float32 deviation ≤ 3e-7.
          expectClose(got, want, 2e-6, 2e-6, 'pipeline output');
        });

        it('input gradient equals float64 central differences', () => {
          const { value, grad } = tfGradient(fn, pixels, c, spec);
          const x64 = Float64Array.from(pixels);
          const f = (x: Float64Array): number => weightedSum(pipeline64(spec, weights, pre, x, N), c);
          const fd = centralDifferences(f, x64, 1e-5);
          const scale = Math.max(...Array.from(fd, Math.abs));
          expect(scale).toBeGreaterThan(1e-2); // the check is not vacuous
          // Reference: central differences of the float64 net; measured deviation ≤ 3e-7 of the largest component.
          expect(Math.abs(value - f(x64))).toBeLessThan(1e-4 * Math.max(1, Math.abs(value)));
          expectClose(grad, fd, 1e-5 * scale, 1e-4, 'd loss / d pixels');
        });

        it('float32 finite differences on the tfjs pipeline agree along random directions', () => {
          const { grad } = tfGradient(fn, pixels, c, spec);
          const dirRng = createRng(99);
          // ReLU nets are piecewise linear: h = 1e-2 may cross a kink, so only the smooth nets use it.
          const h = spec.activation === 'tanh' ? 1e-2 : 1e-3;
          for (let t = 0; t < 3; t++) {
            const v = dirRng.normalArray(size);
            const up = pixels.map((p, i) => p + h * v[i]!);
            const down = pixels.map((p, i) => p - h * v[i]!);
            const fd = (tfLoss(fn, up, c, spec) - tfLoss(fn, down, c, spec)) / (2 * h);
            const directional = weightedSum(grad, v);
            // Reference: central difference of the tfjs forward itself; float32 rounding ~1e-6/h dominates.
            expect(Math.abs(fd - directional)).toBeLessThan(2e-2 * Math.max(1, Math.abs(directional)));
          }
        });

        it('keeps tf.memory().numTensors flat over repeated gradients', () => {
          tfGradient(fn, pixels, c, spec);
          const before = tf.memory().numTensors;
          for (let i = 0; i < 5; i++) tfGradient(fn, pixels, c, spec);
          // Common practice: every step in tf.tidy leaves the tensor count unchanged.
          expect(tf.memory().numTensors).toBe(before);
        });
      });
    }
  });
}
