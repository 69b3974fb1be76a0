/**
 * DeepFool on affine classifiers z = Wᵀx + b, where the answer is known in closed form (Moosavi-
 * Dezfooli, Fawzi & Frossard, CVPR 2016, Sec. 3: for an affine classifier the step to the nearest
 * boundary is exact, so one step suffices). The smallest perturbation that changes the class y is
 *   L2:  min_{j≠y} |z_y − z_j| / ‖w_y − w_j‖₂
 *   L∞:  min_{j≠y} |z_y − z_j| / ‖w_y − w_j‖₁        (Hölder: the dual norm of L∞ is L1)
 * and DeepFool reports it times 1 + overshoot. Pixels are kept away from 0 and 1 so the box does not bind
 * (checked). Both backends.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { deepfool, deepfoolMinimalPerturbation } from '../../src/core/attacks/deepfool.ts';
import type { Norm } from '../../src/core/types.ts';
import { affineModel, classWeights, type AffineModel } from './models.ts';

const D = 24;
const K = 6;
const N = 12;
const OVERSHOOT = 0.02;

/** Closed-form distance to the nearest decision boundary of an affine model, in float64. */
function closedForm(model: AffineModel, x: ArrayLike<number>, norm: Norm): { label: number; distance: number } {
  const z = model.logits64(x);
  const y = z.indexOf(Math.max(...z));
  const wy = classWeights(model, y);
  let distance = Infinity;
  for (let j = 0; j < model.k; j++) {
    if (j === y) continue;
    const wj = classWeights(model, j);
    let dual = 0;
    for (let i = 0; i < model.d; i++) dual = norm === 'l2' ? dual + (wy[i]! - wj[i]!) ** 2 : dual + Math.abs(wy[i]! - wj[i]!);
    distance = Math.min(distance, Math.abs(z[y]! - z[j]!) / (norm === 'l2' ? Math.sqrt(dual) : dual));
  }
  return { label: y, distance };
}

for (const backend of BACKENDS) {
  describe(`DeepFool on affine models (${backend})`, () => {
    let model: AffineModel;
    let x: tf.Tensor4D;
    let labels: tf.Tensor1D;
    let pixels: Float32Array;
    const expected: Record<Norm, number[]> = { linf: [], l2: [] };
    beforeAll(async () => {
      await useBackend(backend);
      model = affineModel(11, D, K, 1);
      // Pixels in [0.3, 0.7]: the perturbations found are far smaller than 0.3 per pixel (checked below).
      pixels = createRng(12).uniformArray(N * D, 0.3, 0.7);
      x = tf.tensor4d(pixels, [N, 4, 6, 1]);
      const label: number[] = [];
      for (let n = 0; n < N; n++) {
        const row = pixels.subarray(n * D, (n + 1) * D);
        for (const norm of ['linf', 'l2'] as const) {
          const c = closedForm(model, row, norm);
          expected[norm].push(c.distance);
          if (norm === 'l2') label.push(c.label);
        }
      }
      labels = tf.tensor1d(label, 'int32');
    });
    afterAll(() => {
      tf.dispose([x, labels]);
      model.dispose();
    });

    for (const norm of ['l2', 'linf'] as const) {
      it(`${norm}: the perturbation equals the closed form × (1 + overshoot) after one step`, async () => {
        const before = tf.memory().numTensors;
        const found = await deepfoolMinimalPerturbation({ logits: model.logits, x, labels, norm }, deepfool.meta.validate({ overshoot: OVERSHOOT }));
        const adv = await found.adv.data();
        found.adv.dispose();
        let worst = 0;
        for (let n = 0; n < N; n++) {
          const want = expected[norm][n]! * (1 + OVERSHOOT);
          worst = Math.max(worst, Math.abs(found.norms[n]! - want) / want);
          // Moosavi-Dezfooli et al. 2016: exact for affine classifiers; 1e-3 relative allows float32.
          expect(Math.abs(found.norms[n]! - want) / want, `sample ${n}: ${found.norms[n]} vs ${want}`).toBeLessThan(1e-3);
          expect(found.iterations[n], `sample ${n}`).toBe(1);
          expect(found.flipped[n]).toBe(1);
        }
        console.log(`DeepFool ${norm} on an affine model (${backend}): largest relative deviation from the closed form ${worst.toExponential(2)}`);
        // The box never bound: no pixel of the points found reached 0 or 1.
        expect(adv.every((v) => v > 0 && v < 1)).toBe(true);
        // One step linearises K − 1 = 5 classes: 5 gradient passes per sample.
        expect(found.gradientEvaluations).toBe(K - 1);
        expect(tf.memory().numTensors).toBe(before);
      });

      it(`${norm}: as an attack it flips a sample exactly when ε exceeds the closed-form distance`, async () => {
        // Below the distance no perturbation can change an affine classifier's class; just above it the
        // projected DeepFool point (along the exact direction to the boundary) has crossed it.
        for (const [factor, flips] of [
          [0.98, 0],
          [1.01, 1],
        ] as const) {
          for (let n = 0; n < N; n++) {
            const index = tf.tensor1d([n], 'int32');
            const row = tf.gather(x, index);
            const label = tf.gather(labels, index);
            const eps = expected[norm][n]! * factor;
            const out = await deepfool.run({ logits: model.logits, x: row, labels: label, eps, norm }, deepfool.meta.validate({}), { rng: createRng(0) });
            tf.dispose([index, row, label, out.adv]);
            expect(out.flipped[0], `sample ${n} at ${factor} × distance`).toBe(flips);
          }
        }
      });
    }

    it('top-k restricts the classes linearised: topK = 2 uses only the runner-up class', async () => {
      // With only the runner-up (largest other logit) linearised, the step goes to that class's
      // boundary: |z_y − z_j| / ‖w_y − w_j‖₂ for j = the runner-up, which may be farther than the nearest.
      const found = await deepfoolMinimalPerturbation({ logits: model.logits, x, labels, norm: 'l2' }, deepfool.meta.validate({ topK: 2, maxIterations: 1 }));
      found.adv.dispose();
      for (let n = 0; n < N; n++) {
        const z = model.logits64(pixels.subarray(n * D, (n + 1) * D));
        const y = z.indexOf(Math.max(...z));
        const runnerUp = z.map((v, j) => (j === y ? -Infinity : v)).reduce((best, v, j, all) => (v > all[best]! ? j : best), y === 0 ? 1 : 0);
        const wy = classWeights(model, y);
        const wj = classWeights(model, runnerUp);
        const gap = Math.sqrt(wy.reduce((s, v, i) => s + (v - wj[i]!) ** 2, 0));
        const want = ((z[y]! - z[runnerUp]!) / gap) * (1 + OVERSHOOT);
        expect(Math.abs(found.norms[n]! - want) / want, `sample ${n}`).toBeLessThan(1e-3);
      }
      expect(found.gradientEvaluations).toBe(1);
    });
  });
}
