/**
 * Brink's FGSM and PGD (no random start) through loadOnnxModel + makeLogitsFn reproduce the
 * adversarial images PyTorch computed on the same exported models (scripts/fixtures/onnx/
 * export_fixtures.py: L∞, ε = 8/255, PGD 5 steps of 2/255 projected onto ball ∩ [0, 1], with the
 * bookkeeping of src/core/attacks/pgd.ts — a sample is frozen at its first misclassified iterate,
 * otherwise its highest-loss iterate is returned).
 *
 * sign(g) is only defined up to rounding where a gradient component is within float noise of zero:
 * pixels whose PyTorch gradient (for PGD: along the whole trajectory) is below 1e-5 of the sample's
 * largest component are counted and reported, and may differ; every other pixel must agree to 1e-4.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { loadOnnxModel } from '../../src/core/onnx/loadOnnx.ts';
import { makeLogitsFn, preprocessingFor } from '../../src/core/models/pipeline.ts';
import { fgsm } from '../../src/core/attacks/fgsm.ts';
import { pgd } from '../../src/core/attacks/pgd.ts';
import type { AttackOutcome, AttackProblem } from '../../src/core/attacks/types.ts';
import { createRng } from '../../src/core/random/rng.ts';
import type { LogitsFn } from '../../src/core/types.ts';
import { fixtureIndex, readFixture, referenceArray, type ModelReference } from './fixtures.ts';

const PIXEL_TOLERANCE = 1e-4;
/** "Within float noise of zero": below this fraction of the sample's largest gradient component. */
const NOISE_FRACTION = 1e-5;

const index = fixtureIndex();
const imageShape = index.images.shape as [number, number, number, number];
const images = referenceArray(index.images);
const perSample = imageShape[1] * imageShape[2] * imageShape[3];
// One opset per model keeps the suite short; forward.test.ts covers every exported opset.
const fixtures = index.files.filter((f, i, all) => f.model !== null && all.findIndex((g) => g.model === f.model) === i);

interface Comparison {
  readonly maxDiff: number;
  /** Pixels that differ by more than the tolerance although their gradient is not near zero. */
  readonly unexplained: number;
  readonly nearZero: number;
  readonly nearZeroDiffering: number;
}

function compareAdversarial(ours: Float32Array, torch: Float32Array, gradientMagnitude: Float32Array, clean: Float32Array): Comparison {
  let maxDiff = 0;
  let unexplained = 0;
  let nearZero = 0;
  let nearZeroDiffering = 0;
  for (let n = 0; n < imageShape[0]; n++) {
    let largest = 0;
    for (let i = n * perSample; i < (n + 1) * perSample; i++) largest = Math.max(largest, Math.abs(clean[i]!));
    for (let i = n * perSample; i < (n + 1) * perSample; i++) {
      const diff = Math.abs(ours[i]! - torch[i]!);
      const fragile = gradientMagnitude[i]! <= NOISE_FRACTION * largest;
      if (fragile) nearZero++;
      if (diff > PIXEL_TOLERANCE) {
        if (fragile) nearZeroDiffering++;
        else unexplained++;
      } else maxDiff = Math.max(maxDiff, diff);
    }
  }
  return { maxDiff, unexplained, nearZero, nearZeroDiffering };
}

async function attack(run: () => Promise<AttackOutcome>): Promise<{ adv: Float32Array; flipped: Uint8Array }> {
  const outcome = await run();
  const adv = new Float32Array(await outcome.adv.data());
  outcome.adv.dispose();
  return { adv, flipped: outcome.flipped };
}

for (const backend of BACKENDS) {
  describe(`PyTorch's FGSM and PGD reproduced on ONNX models (${backend})`, () => {
    const report: string[] = [];
    beforeAll(async () => {
      await useBackend(backend);
    });
    afterAll(() => console.log(`ONNX attacks vs PyTorch (${backend})\n  ${report.join('\n  ')}`));

    for (const fixture of fixtures) {
      it(fixture.file, async () => {
        const reference: ModelReference = index.models[fixture.model!]!;
        const model = await loadOnnxModel(readFixture(fixture.file));
        const x = tf.tensor4d(images, imageShape);
        const labels = tf.tensor1d(index.labels, 'int32');
        try {
          const logits: LogitsFn = makeLogitsFn(model, preprocessingFor(model.description));
          const problem: AttackProblem = { logits, x, labels, eps: index.eps, norm: 'linf' };
          const context = { rng: createRng(1) };
          const clean = referenceArray(reference.gradient);
          const before = tf.memory().numTensors;

          const f = await attack(() => fgsm.run(problem, { loss: 'ce', target: { kind: 'untargeted' } }, context));
          const fc = compareAdversarial(f.adv, referenceArray(reference.fgsm), clean.map(Math.abs), clean);
          report.push(`${fixture.file} FGSM: max |Δ| ${fc.maxDiff.toExponential(2)}; near-zero-gradient pixels ${fc.nearZero}, of which differ ${fc.nearZeroDiffering}`);
          expect(fc.unexplained).toBe(0); // source: PyTorch FGSM on the same model (x + ε·sign(∇x CE), clipped to [0, 1])

          const options = { steps: index.pgdSteps, stepSize: index.pgdStepSize, randomStart: false, restarts: 1, loss: 'ce' as const, target: { kind: 'untargeted' as const } };
          const p = await attack(() => pgd.run(problem, options, context));
          const pc = compareAdversarial(p.adv, referenceArray(reference.pgd), referenceArray(reference.pgdMinAbsGradient), clean);
          report.push(`${fixture.file} PGD (chosen steps ${reference.pgdChosenStep.join(',')}): max |Δ| ${pc.maxDiff.toExponential(2)}; near-zero-gradient pixels ${pc.nearZero}, of which differ ${pc.nearZeroDiffering}`);
          expect(pc.unexplained).toBe(0); // source: PyTorch PGD iterates on the same model
          expect(Array.from(p.flipped, (v) => v === 1)).toEqual(reference.pgdFlipped); // source: PyTorch argmax at the PGD iterates
          expect(tf.memory().numTensors).toBe(before);
        } finally {
          tf.dispose([x, labels]);
          model.dispose();
        }
      });
    }
  });
}
