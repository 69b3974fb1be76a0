/**
 * APGD's schedule and the DLR loss against the definitions of Croce & Hein, "Reliable Evaluation of
 * Adversarial Robustness with an Ensemble of Diverse Parameter-free Attacks", ICML 2020 (Sec. 3.2:
 * checkpoints p₀ = 0, p₁ = 0.22, p_{j+1} = p_j + max(p_j − p_{j−1} − 0.03, 0.06), w_j = ⌈p_j·N⌉, the two
 * halving conditions with ρ = 0.75; Sec. 4: the DLR loss and its targeted form), every expected value
 * worked out by hand in the comments.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { apgdCheckpoints, StepSizeSchedule } from '../../src/core/attacks/apgdSchedule.ts';
import { dlrLoss, targetedDlrLoss } from '../../src/core/attacks/dlr.ts';
import { apgdCe, apgdDlr } from '../../src/core/attacks/apgd.ts';

describe('APGD checkpoints', () => {
  it('follow the closed form of the recursion', () => {
    // By hand: p = 0, .22, .22+max(.19,.06)=.41, .41+max(.16,.06)=.57, .57+max(.13,.06)=.70,
    // .70+max(.10,.06)=.80, .80+max(.07,.06)=.87, .87+max(.04,.06)=.93, .93+.06=.99, (1.05 > 1 stops).
    // Integer arithmetic matters: run in float64 the recursion gives p₃ = 0.5700000000000001, and
    // ⌈0.5700000000000001·100⌉ = 58, not 57.
    expect(apgdCheckpoints(100)).toEqual([0, 22, 41, 57, 70, 80, 87, 93, 99]);
    // N = 10: ⌈2.2⌉=3, ⌈4.1⌉=5, ⌈5.7⌉=6, 7, 8, ⌈8.7⌉=9, ⌈9.3⌉=10, ⌈9.9⌉=10 (repeat dropped); float64
    // would give ⌈0.7000000000000001·10⌉ = 8 for p₄.
    expect(apgdCheckpoints(10)).toEqual([0, 3, 5, 6, 7, 8, 9, 10]);
    // N = 50: 11, ⌈20.5⌉=21, ⌈28.5⌉=29, 35, 40, ⌈43.5⌉=44, ⌈46.5⌉=47, ⌈49.5⌉=50.
    expect(apgdCheckpoints(50)).toEqual([0, 11, 21, 29, 35, 40, 44, 47, 50]);
    // N = 1000: every p_j·1000 is an integer.
    expect(apgdCheckpoints(1000)).toEqual([0, 220, 410, 570, 700, 800, 870, 930, 990]);
    expect(() => apgdCheckpoints(0)).toThrow(/positive integer/);
  });
});

describe('APGD step-size halving', () => {
  /** Feeds losses f(x(1)), f(x(2)), … for one sample and returns the iterations at which η halved. */
  function halvings(losses: number[], iterations: number): number[] {
    const schedule = new StepSizeSchedule(1, iterations);
    schedule.start(0, 1, 0);
    const out: number[] = [];
    losses.forEach((loss, i) => {
      const k = i + 1;
      schedule.observe(0, loss);
      const interval = schedule.intervalEndingAt(k);
      if (interval !== null && schedule.decide(0, interval)) out.push(k);
    });
    return out;
  }

  it('halves when fewer than ρ = 0.75 of the steps since the last checkpoint increased the loss', () => {
    // Steadily increasing loss: 22 successes ≥ 0.75·22 = 16.5 at w₁ = 22, the best changed: no halving anywhere.
    expect(halvings(Array.from({ length: 99 }, (_, i) => i + 1), 100)).toEqual([]);
    // 17 increases then 5 decreases in the first 22 steps: 17 ≥ 16.5, and the best changed → no halving at 22.
    const seventeen = [...Array.from({ length: 17 }, (_, i) => i + 1), 16, 15, 14, 13, 12];
    expect(halvings(seventeen, 100)).toEqual([]);
    // 16 increases then 6 decreases: 16 < 16.5 → halving at 22.
    const sixteen = [...Array.from({ length: 16 }, (_, i) => i + 1), 15, 14, 13, 12, 11, 10];
    expect(halvings(sixteen, 100)).toEqual([22]);
  });

  it('halves when neither η nor the best loss changed since the last checkpoint', () => {
    // Constant loss: 0 successes at every checkpoint → halving at each of 22, 41, 57, 70, 80, 87, 93, 99.
    expect(halvings(new Array(99).fill(0), 100)).toEqual([22, 41, 57, 70, 80, 87, 93, 99]);
    // Oscillating loss 5, 1, 5, 1, … from a start at 0: 11 successes of 22 (< 16.5) → halve at 22.
    // From 23 to 41 (19 steps) 9 successes (< 14.25) → halve at 41, and so on.
    const oscillating = Array.from({ length: 99 }, (_, i) => (i % 2 === 0 ? 5 : 1));
    expect(halvings(oscillating, 100)).toEqual([22, 41, 57, 70, 80, 87, 93, 99]);
  });

  it('the stall condition needs an unchanged η: a halved step is judged by its successes only', () => {
    // Checkpoints 22, 41, 57 (N = 100). Both runs end with the same 35 steps: a drop to 0, then 34
    // rises 0.1, 0.2, …, 3.4 that stay below the best loss 22 (18 successes of 19 by 41, 15 or 16 of 16 by 57).
    const tail = [0, ...Array.from({ length: 34 }, (_, i) => 0.1 * (i + 1))];
    // A: rising 1..22 (no halving at 22). At 41 the best has not changed and η was not halved at 22 →
    // condition 2 halves. At 57 η was just halved, successes 15 ≥ 12 → no halving.
    const risingFirst = [...Array.from({ length: 22 }, (_, i) => i + 1), ...tail];
    expect(halvings(risingFirst, 100)).toEqual([41]);
    // B: 22 then flat 21.9: 1 success of 22 → condition 1 halves at 22. At 41 η was halved at 22, so
    // the unchanged best does not count and 18 ≥ 14.25 → no halving; at 57 η is unchanged since 41
    // and the best still 22 → condition 2 halves.
    const flatFirst = [22, ...new Array(21).fill(21.9), ...tail];
    expect(halvings(flatFirst, 100)).toEqual([22, 57]);
  });
});

describe('DLR loss', () => {
  beforeAll(async () => {
    await useBackend('cpu');
  });

  it('matches its formula on hand-made logits', () => {
    // z = [2, 5, 1, 3, −1]: sorted 5, 3, 2, 1, −1, so z_π1 = 5, z_π3 = 2, z_π4 = 1.
    // y = 0: −(2 − 5)/(5 − 2) = 1.   y = 1: −(5 − 3)/(5 − 2) = −2/3.   y = 3: −(3 − 5)/3 = 2/3.
    // Second row z = [0, 0, 4, 1, 2]: sorted 4, 2, 1, 0, 0; y = 2: −(4 − 2)/(4 − 1) = −2/3.
    const z = tf.tensor2d([
      [2, 5, 1, 3, -1],
      [2, 5, 1, 3, -1],
      [2, 5, 1, 3, -1],
      [0, 0, 4, 1, 2],
    ]);
    const y = tf.tensor1d([0, 1, 3, 2], 'int32');
    const values = Array.from(tf.tidy(() => dlrLoss(z, y)).dataSync());
    [1, -2 / 3, 2 / 3, -2 / 3].forEach((v, i) => expect(values[i]).toBeCloseTo(v, 6));
    // Targeted: y = 1, t = 3 on the first row: −(5 − 3)/(5 − (2 + 1)/2) = −2/3.5; y = 2, t = 0 on the
    // second: −(4 − 0)/(4 − (1 + 0)/2) = −4/3.5.
    const targeted = Array.from(tf.tidy(() => targetedDlrLoss(tf.slice(z, [1, 0], [3, 5]), tf.tensor1d([1, 3, 2], 'int32'), tf.tensor1d([3, 1, 0], 'int32'))).dataSync());
    // Row 2 (y = 3, t = 1): −(3 − 5)/3.5 = 2/3.5.
    [-2 / 3.5, 2 / 3.5, -4 / 3.5].forEach((v, i) => expect(targeted[i]).toBeCloseTo(v, 6));
    tf.dispose([z, y]);
  });

  it('is invariant to shifting and positively scaling the logits (Croce & Hein 2020, Sec. 4)', () => {
    const z = tf.tensor2d([[0.3, -1.2, 2.5, 0.9, 1.7, -0.4]]);
    const y = tf.tensor1d([4], 'int32');
    const base = tf.tidy(() => dlrLoss(z, y).dataSync()[0]!);
    const moved = tf.tidy(() => dlrLoss(tf.add(tf.mul(z, 1000), 7), y).dataSync()[0]!);
    expect(moved).toBeCloseTo(base, 5);
    tf.dispose([z, y]);
  });

  it('has the analytic input gradient through the sorted logits', () => {
    // For z = [2, 5, 1, 3, −1], y = 0: DLR = −(z0 − z1)/(z1 − z0) with π1 = 1, π3 = 0, which is
    // identically 1 near this point, so every partial derivative is 0. For y = 3 (π1 = 1, π3 = 0):
    // DLR = (z1 − z3)/(z1 − z0): ∂/∂z0 = (z1 − z3)/(z1 − z0)² = 2/9, ∂/∂z1 = (z3 − z0)/(z1 − z0)² = 1/9,
    // ∂/∂z3 = −1/3, others 0.
    const z = tf.tensor2d([[2, 5, 1, 3, -1]]);
    const grad = (label: number): number[] => Array.from(tf.tidy(() => tf.grad((v: tf.Tensor) => tf.sum(dlrLoss(v as tf.Tensor2D, tf.tensor1d([label], 'int32'))))(z).dataSync()));
    grad(0).forEach((g) => expect(g).toBeCloseTo(0, 6));
    [2 / 9, 1 / 9, 0, -1 / 3, 0].forEach((v, i) => expect(grad(3)[i]).toBeCloseTo(v, 6));
    z.dispose();
  });

  it('needs 3 classes (4 for the targeted form)', () => {
    const z = tf.tensor2d([[1, 2]]);
    expect(() => dlrLoss(z, tf.tensor1d([0], 'int32'))).toThrow(/at least 3 classes/);
    z.dispose();
  });
});

describe('APGD options', () => {
  it('defaults to the parameter-free setting and rejects bad options', () => {
    // Croce & Hein 2020: 100 iterations; one run from a random start.
    expect(apgdCe.meta.validate({})).toEqual({ steps: 100, restarts: 1, randomStart: true, target: { kind: 'untargeted' } });
    expect(apgdDlr.meta.estimateGradientEvaluations(apgdDlr.meta.validate({ steps: 20, restarts: 3 }))).toBe(60);
    expect(() => apgdCe.meta.validate({ steps: 0 })).toThrow('apgd-ce: steps must be a positive integer (got 0)');
    expect(() => apgdDlr.meta.validate({ restarts: 2, randomStart: false })).toThrow(/apgd-dlr: restarts must be 1 without randomStart/);
    expect(() => apgdDlr.meta.validate({ loss: 'ce' } as never)).toThrow(/apgd-dlr: unknown option "loss"/);
  });
});
