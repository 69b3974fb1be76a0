/**
 * The loss helpers against their closed forms on an affine classifier z = Wᵀx + b, where every
 * quantity is known analytically: ∂CE_y/∂x = Σ_k (p_k − [k = y])·w_k (softmax cross-entropy) and
 * ∂(z_a − z_b)/∂x = w_a − w_b (margin losses).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { expectClose } from '../helpers/close.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { leastLikelyTargets, lossAndInputGradient, misclassified } from '../../src/core/attacks/losses.ts';
import type { LossKind } from '../../src/core/attacks/types.ts';
import { affineModel, classWeights, type AffineModel } from './models.ts';

const N = 12;
const D = 16;
const K = 4;

function logSumExp(z: number[]): number {
  const m = Math.max(...z);
  return m + Math.log(z.reduce((s, v) => s + Math.exp(v - m), 0));
}

function argmaxExcept(z: number[], skip: number): number {
  let best = -1;
  for (let j = 0; j < z.length; j++) if (j !== skip && (best < 0 || z[j]! > z[best]!)) best = j;
  return best;
}

/** Closed-form loss and gradient for one sample (float64). */
function expected(model: AffineModel, x: Float32Array, y: number, loss: LossKind, target: number | null): { value: number; grad: number[] } {
  const z = model.logits64(x);
  const w = Array.from({ length: K }, (_, c) => classWeights(model, c));
  const combine = (coef: number[]): number[] => Array.from({ length: D }, (_, i) => coef.reduce((s, a, c) => s + a * w[c]![i]!, 0));
  const lse = logSumExp(z);
  const p = z.map((v) => Math.exp(v - lse));
  if (target === null && loss === 'ce') return { value: lse - z[y]!, grad: combine(p.map((pk, k) => pk - (k === y ? 1 : 0))) };
  if (target === null) {
    const j = argmaxExcept(z, y);
    return { value: z[j]! - z[y]!, grad: combine(z.map((_, k) => (k === j ? 1 : 0) - (k === y ? 1 : 0))) };
  }
  if (loss === 'ce') return { value: z[target]! - lse, grad: combine(p.map((pk, k) => (k === target ? 1 : 0) - pk)) };
  const j = argmaxExcept(z, target);
  return { value: z[target]! - z[j]!, grad: combine(z.map((_, k) => (k === target ? 1 : 0) - (k === j ? 1 : 0))) };
}

for (const backend of BACKENDS) {
  describe(`loss helpers on ${backend}`, () => {
    let model: AffineModel;
    const pixels = createRng(5).uniformArray(N * D, 0, 1);
    const labels = Int32Array.from({ length: N }, (_, i) => i % K);
    beforeAll(async () => {
      await useBackend(backend);
      model = affineModel(11, D, K, 0.8);
    });
    afterAll(() => model.dispose());

    const cases: { loss: LossKind; target: number | null }[] = [
      { loss: 'ce', target: null },
      { loss: 'margin', target: null },
      { loss: 'ce', target: 2 },
      { loss: 'margin', target: 2 },
    ];
    for (const { loss, target } of cases) {
      it(`${loss} ${target === null ? 'untargeted' : 'targeted'}: value and input gradient match the closed form`, () => {
        const before = tf.memory().numTensors;
        const got = tf.tidy(() => {
          const x = tf.tensor4d(pixels, [N, 4, 4, 1]);
          const t = target === null ? null : tf.fill([N], target, 'int32');
          const r = lossAndInputGradient(model.logits, x, tf.tensor1d(labels, 'int32'), loss, t as tf.Tensor1D | null);
          return { loss: r.loss.dataSync(), grad: r.grad.dataSync(), logits: r.logits.dataSync() };
        });
        expect(tf.memory().numTensors).toBe(before);
        for (let n = 0; n < N; n++) {
          const x = pixels.subarray(n * D, (n + 1) * D);
          const e = expected(model, x, labels[n]!, loss, target);
          // Closed form (softmax cross-entropy / margin derivatives); float32 rounding tolerance.
          expectClose([got.loss[n]!], [e.value], 1e-4, 1e-4, `loss of sample ${n}`);
          expectClose(got.grad.subarray(n * D, (n + 1) * D), e.grad, 1e-4, 1e-4, `gradient of sample ${n}`);
          expectClose(got.logits.subarray(n * K, (n + 1) * K), model.logits64(x), 1e-4, 1e-4, `logits of sample ${n}`);
        }
      });
    }

    it('least-likely target is the argmin of the clean logits; misclassified is argmax ≠ label', () => {
      const [ll, mis] = tf.tidy(() => {
        const z = model.logits(tf.tensor4d(pixels, [N, 4, 4, 1]));
        return [leastLikelyTargets(z).dataSync(), misclassified(z, tf.tensor1d(labels, 'int32')).dataSync()];
      });
      for (let n = 0; n < N; n++) {
        const z = model.logits64(pixels.subarray(n * D, (n + 1) * D));
        // Definitions: least-likely class = argmin_k z_k; misclassified ⇔ argmax_k z_k ≠ y.
        expect(ll![n]).toBe(z.indexOf(Math.min(...z)));
        expect(mis![n]).toBe(z.indexOf(Math.max(...z)) !== labels[n] ? 1 : 0);
      }
    });
  });
}
