/**
 * Forward pass of every ONNX fixture against two outside references:
 *  1. onnxruntime-web 1.30 (WASM execution provider, one thread) on the same file and input;
 *  2. PyTorch's own outputs stored by scripts/fixtures/onnx/export_fixtures.py (torch 1.13).
 * "Relative difference" is ‖brink − reference‖∞ / ‖reference‖∞ over the [4, 10] output.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { makeLogitsFn, preprocessingFor } from '../../src/core/models/pipeline.ts';
import {
  DifferenceLog, exportedFixtures, fixtureIndex, readFixture, referenceArray, relativeDifference, runOnnxRuntime, seededInputs, toNchw,
} from './fixtures.ts';

const TOLERANCE = 1e-4;
const index = fixtureIndex();
const images = referenceArray(index.images);
const imageShape = index.images.shape as [number, number, number, number];

/** onnxruntime-web's output, one image at a time for a graph exported with a fixed batch of 1. */
async function ortOutput(file: string, input: Float32Array, dims: number[], fixedBatch: boolean): Promise<Float32Array> {
  if (!fixedBatch) return runOnnxRuntime(file, input, dims);
  const per = input.length / dims[0]!;
  const parts: Float32Array[] = [];
  for (let n = 0; n < dims[0]!; n++) parts.push(await runOnnxRuntime(file, input.slice(n * per, (n + 1) * per), [1, ...dims.slice(1)]));
  return Float32Array.from(parts.flatMap((p) => Array.from(p)));
}

for (const backend of BACKENDS) {
  describe(`ONNX forward against onnxruntime-web (${backend})`, () => {
    const log = new DifferenceLog();
    beforeAll(async () => {
      await useBackend(backend);
    });
    afterAll(() => log.print(`ONNX forward vs onnxruntime-web (${backend})`));

    for (const fixture of index.files) {
      it(`${fixture.file} (opset ${fixture.opset})`, async () => {
        const beforeLoad = tf.memory().numTensors;
        const model = await loadOnnxModel(readFixture(fixture.file));
        try {
          const d = model.description;
          expect(d.layout).toBe(fixture.layout);
          const dims = d.layout === 'nchw' ? [4, d.channels, d.height, d.width] : [4, d.height, d.width, d.channels];
          // PyTorch fixtures: the stored images; hand-built graphs: seeded values in [0, 1).
          const input = fixture.model !== null ? toNchw(images, imageShape) : seededInputs(dims.reduce((a, b) => a * b, 1), 11);
          const before = tf.memory().numTensors;
          const ours = tf.tidy(() => model.forward(tf.tensor4d(input, dims as [number, number, number, number])).dataSync());
          expect(tf.memory().numTensors).toBe(before);
          const reference = await ortOutput(fixture.file, input, dims, !fixture.dynamicBatch);
          const diff = relativeDifference(ours, reference);
          log.add(fixture.file, diff);
          expect(diff.rel).toBeLessThanOrEqual(TOLERANCE); // source: onnxruntime-web on the same file
        } finally {
          model.dispose();
        }
        expect(tf.memory().numTensors).toBe(beforeLoad); // dispose releases every weight tensor
      });
    }
  });

  describe(`ONNX forward against PyTorch's stored outputs (${backend})`, () => {
    const log = new DifferenceLog();
    beforeAll(async () => {
      await useBackend(backend);
    });
    afterAll(() => log.print(`ONNX forward vs PyTorch (${backend})`));

    for (const fixture of exportedFixtures()) {
      it(`${fixture.file}`, async () => {
        const reference = index.models[fixture.model!]!;
        const model = await loadOnnxModel(readFixture(fixture.file));
        try {
          expect(model.description.outputKind).toBe(reference.probabilities ? 'probabilities' : 'logits');
          const logitsFn = makeLogitsFn(model, preprocessingFor(model.description));
          const [raw, logits] = tf.tidy(() => {
            const pixels = tf.tensor4d(images, imageShape);
            return [model.forward(tf.transpose(pixels, [0, 3, 1, 2])).dataSync(), logitsFn(pixels).dataSync()];
          });
          const rawDiff = relativeDifference(raw!, referenceArray(reference.output));
          const logitsDiff = relativeDifference(logits!, referenceArray(reference.logits));
          log.add(`${fixture.file} output`, rawDiff);
          log.add(`${fixture.file} logits via makeLogitsFn`, logitsDiff);
          expect(rawDiff.rel).toBeLessThanOrEqual(TOLERANCE); // source: PyTorch model(x)
          expect(logitsDiff.rel).toBeLessThanOrEqual(TOLERANCE); // source: PyTorch logits (log p for the softmax model)
        } finally {
          model.dispose();
        }
      });
    }
  });
}
