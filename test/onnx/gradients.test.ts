/**
 * Input gradients through loaded ONNX models (loadOnnxModel + makeLogitsFn), of the summed
 * cross-entropy over the 4 fixture images, checked against
 *  - PyTorch's own input gradient stored by scripts/fixtures/onnx/export_fixtures.py, and
 *  - central finite differences of the same loss (the definition of the derivative), along random
 *    ±1 directions and along the pixels of largest gradient.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { makeLogitsFn, preprocessingFor } from '../../src/core/models/pipeline.ts';
import type { LogitsFn } from '../../src/core/types.ts';
import { DifferenceLog, exportedFixtures, fixtureIndex, readFixture, referenceArray, relativeDifference, seededInputs } from './fixtures.ts';

const index = fixtureIndex();
const imageShape = index.images.shape as [number, number, number, number];
const images = referenceArray(index.images);
const labels = Int32Array.from(index.labels);

function summedCrossEntropy(logitsFn: LogitsFn, x: tf.Tensor4D): tf.Scalar {
  const z = logitsFn(x);
  const oneHot = tf.oneHot(tf.tensor1d(labels, 'int32'), z.shape[1]);
  return tf.neg(tf.sum(tf.mul(oneHot, tf.logSoftmax(z))));
}

function lossAt(logitsFn: LogitsFn, pixels: Float32Array): number {
  return tf.tidy(() => summedCrossEntropy(logitsFn, tf.tensor4d(pixels, imageShape)).dataSync()[0]!);
}

/** (L(x + h·v) − L(x − h·v)) / 2h. */
function centralDifference(logitsFn: LogitsFn, v: Float32Array, h: number): number {
  const plus = images.map((p, i) => p + h * v[i]!);
  const minus = images.map((p, i) => p - h * v[i]!);
  return (lossAt(logitsFn, plus) - lossAt(logitsFn, minus)) / (2 * h);
}

function firstOfModel(file: string): boolean {
  const all = exportedFixtures();
  const mine = all.find((f) => f.file === file)!;
  return all.find((f) => f.model === mine.model)!.file === file;
}

for (const backend of BACKENDS) {
  describe(`ONNX input gradients (${backend})`, () => {
    const log = new DifferenceLog();
    beforeAll(async () => {
      await useBackend(backend);
    });
    afterAll(() => log.print(`ONNX input gradients (${backend})`));

    for (const fixture of exportedFixtures()) {
      it(fixture.file, async () => {
        const model = await loadOnnxModel(readFixture(fixture.file));
        try {
          const logitsFn = makeLogitsFn(model, preprocessingFor(model.description));
          const before = tf.memory().numTensors;
          const grad = Float32Array.from(tf.tidy(() => tf.grad((x) => summedCrossEntropy(logitsFn, x as tf.Tensor4D))(tf.tensor4d(images, imageShape)).dataSync()));
          expect(tf.memory().numTensors).toBe(before);

          const torch = relativeDifference(grad, referenceArray(index.models[fixture.model!]!.gradient));
          log.add(`${fixture.file} vs PyTorch`, torch);
          expect(torch.rel).toBeLessThanOrEqual(1e-4); // source: PyTorch autograd, x.grad of the summed cross-entropy

          // Finite differences once per model (the PyTorch check above covers every exported opset).
          if (!firstOfModel(fixture.file)) return;
          // Directional derivatives along unit (L2) directions, h = 1e-2: the gradient's own direction
          // (there ⟨∇L, v⟩ = ‖∇L‖₂) and a random ±1 pattern; errors are measured against ‖∇L‖₂.
          const norm = Math.sqrt(grad.reduce((s, g) => s + g * g, 0));
          const random = seededInputs(images.length, 5).map((u) => (u < 0.5 ? -1 : 1) / Math.sqrt(images.length));
          for (const [name, v] of [['gradient direction', grad.map((g) => g / norm)], ['random direction', random]] as const) {
            const analytic = grad.reduce((s, g, i) => s + g * v[i]!, 0);
            const numeric = centralDifference(logitsFn, v, 1e-2);
            const d = { rel: Math.abs(analytic - numeric) / norm, abs: Math.abs(analytic - numeric) };
            log.add(`${fixture.file} ${name} vs central difference`, d);
            expect(d.rel).toBeLessThanOrEqual(2e-2); // source: definition of the derivative (float32 rounding and ReLU kinks set the tolerance)
          }
          // The three pixels of largest |∂L/∂x_i|, one at a time.
          const top = Array.from(grad.keys()).sort((a, b) => Math.abs(grad[b]!) - Math.abs(grad[a]!)).slice(0, 3);
          for (const i of top) {
            const e = new Float32Array(images.length);
            e[i] = 1;
            const numeric = centralDifference(logitsFn, e, 1e-2);
            const d = { rel: Math.abs(grad[i]! - numeric) / Math.abs(numeric), abs: Math.abs(grad[i]! - numeric) };
            log.add(`${fixture.file} pixel ${i} vs central difference`, d);
            expect(d.rel).toBeLessThanOrEqual(5e-2); // source: definition of the derivative
          }
        } finally {
          model.dispose();
        }
      });
    }
  });
}
