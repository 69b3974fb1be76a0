/**
 * FGSM on a binary linear classifier, where its effect is known in closed form: the gradient of any
 * of the losses is a positive multiple of c = w_other − w_y, so the L∞ step ε·sign(c) raises the
 * margin z_other − z_y by exactly ε·‖c‖₁ and the L2 step ε·c/‖c‖₂ by exactly ε·‖c‖₂ (Goodfellow et al.
 * 2015, Sec. 3; ‖·‖₁ and ‖·‖₂ are the dual norms of ‖·‖∞ and ‖·‖₂). Pixels lie in [0.3, 0.7] and
 * ε ≤ 0.2, so the [0,1] box never binds.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { fgsm } from '../../src/core/attacks/fgsm.ts';
import type { LossKind } from '../../src/core/attacks/types.ts';
import type { Norm } from '../../src/core/types.ts';
import { affineModel, classWeights, type AffineModel } from './models.ts';

const N = 20;
const SIDE = 8;
const D = SIDE * SIDE;

for (const backend of BACKENDS) {
  describe(`FGSM on a binary linear model (${backend})`, () => {
    let model: AffineModel;
    const pixels = createRng(21).uniformArray(N * D, 0.3, 0.7);
    let labels: Int32Array;
    beforeAll(async () => {
      await useBackend(backend);
      model = affineModel(7, D, 2, 0.3);
      labels = Int32Array.from({ length: N }, (_, n) => {
        const z = model.logits64(pixels.subarray(n * D, (n + 1) * D));
        return z[1]! > z[0]! ? 1 : 0;
      });
    });
    afterAll(() => model.dispose());

    const cases: { norm: Norm; eps: number; loss: LossKind }[] = [
      { norm: 'linf', eps: 0.05, loss: 'ce' },
      { norm: 'linf', eps: 0.05, loss: 'margin' },
      { norm: 'l2', eps: 0.2, loss: 'ce' },
      { norm: 'l2', eps: 0.2, loss: 'margin' },
    ];
    for (const { norm, eps, loss } of cases) {
      it(`${norm} step with the ${loss} loss moves the margin by ε·‖w₁ − w₀‖_dual`, async () => {
        const x = tf.tensor4d(pixels, [N, SIDE, SIDE, 1]);
        const y = tf.tensor1d(labels, 'int32');
        const out = await fgsm.run(
          { logits: model.logits, x, labels: y, eps, norm },
          fgsm.meta.validate({ loss }),
          { rng: createRng(1) },
        );
        const adv = await out.adv.data();
        tf.dispose([x, y, out.adv]);
        const w0 = classWeights(model, 0);
        const w1 = classWeights(model, 1);
        const c = w1.map((v, i) => v - w0[i]!);
        const l1 = c.reduce((s, v) => s + Math.abs(v), 0);
        const l2 = Math.sqrt(c.reduce((s, v) => s + v * v, 0));
        const expectedRise = eps * (norm === 'linf' ? l1 : l2);
        for (let n = 0; n < N; n++) {
          const before = model.logits64(pixels.subarray(n * D, (n + 1) * D));
          const after = model.logits64(adv.subarray(n * D, (n + 1) * D));
          const sign = labels[n] === 0 ? 1 : -1; // margin of the other class over the true one
          const rise = sign * (after[1]! - after[0]! - (before[1]! - before[0]!));
          // Closed form: ε·‖c‖₁ (L∞) or ε·‖c‖₂ (L2); float32 pixel rounding only.
          expect(Math.abs(rise - expectedRise)).toBeLessThan(1e-5 * expectedRise + 1e-6);
        }
      });
    }
  });
}
