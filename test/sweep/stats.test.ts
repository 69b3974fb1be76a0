/** Statistics behind the curve: Wilson intervals and the curve summaries. */
import { describe, expect, it } from 'vitest';
import { wilsonInterval, Z95 } from '../../src/core/stats/wilson.ts';
import { meanRobustAccuracy, median, medianFlipBudget } from '../../src/core/stats/curve.ts';
import type { CurvePoint, SampleRecord } from '../../src/core/sweep/types.ts';
import { WILSON_REFERENCE } from '../helpers/wilsonReference.ts';

describe('Wilson score interval (Wilson 1927)', () => {
  it('matches a reference statistics library', () => {
    // Reference: statsmodels proportion_confint(method="wilson") values, 95 %, to 4 decimals (test/helpers/wilsonReference.ts).
    for (const reference of WILSON_REFERENCE) {
      const { low, high } = wilsonInterval(reference.successes, reference.trials);
      expect(low).toBeCloseTo(reference.low, 4);
      expect(high).toBeCloseTo(reference.high, 4);
    }
  });

  it('uses z = Φ⁻¹(0.975)', () => {
    // Standard normal quantile 1.959963984540054 (from memory); checked here through Φ(z) − 0.5 = 0.475,
    // Φ computed by the erf series (Abramowitz & Stegun 7.1.5).
    expect(erf(Z95 / Math.SQRT2) / 2).toBeCloseTo(0.475, 12);
  });

  it('gives the closed forms at 0/n and n/n', () => {
    // Closed form (Wilson 1927 with p̂ = 0 or 1): 0/n → [0, z²/(n+z²)], n/n → [n/(n+z²), 1].
    const z2 = Z95 * Z95;
    for (const n of [1, 10, 50, 1000]) {
      const none = wilsonInterval(0, n);
      expect(none.low).toBe(0);
      expect(none.high).toBeCloseTo(z2 / (n + z2), 12);
      const all = wilsonInterval(n, n);
      expect(all.low).toBeCloseTo(n / (n + z2), 12);
      expect(all.high).toBe(1);
    }
  });

  it('has endpoints that solve the score equation (p̂ − p)² = z²·p(1 − p)/n', () => {
    // Definition of the Wilson interval (Wilson 1927): the p where the score statistic equals ±z.
    for (const [k, n] of [[3, 17], [25, 40], [1, 200], [199, 200]] as const) {
      const { low, high } = wilsonInterval(k, n);
      const phat = k / n;
      for (const p of [low, high]) expect((phat - p) ** 2).toBeCloseTo((Z95 * Z95 * p * (1 - p)) / n, 12);
      expect(low).toBeLessThan(phat);
      expect(high).toBeGreaterThan(phat);
    }
  });
});

describe('curve summaries', () => {
  it('median of odd and even counts', () => {
    // Definition of the sample median.
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([])).toBeNaN();
  });

  it('median flip budget treats never-flipped samples as beyond the grid', () => {
    // Definition: the median of a sample censored above; unknown (null) once half are censored.
    const rec = (label: number, cleanPred: number, eps: number | null): SampleRecord => ({
      index: 0, file: 'f', label, cleanPred, cleanConf: 1, outcomes: [], minFlipEps: { pgd: cleanPred === label ? eps : 0 },
    });
    expect(medianFlipBudget([rec(0, 0, 0.1), rec(0, 0, 0.3), rec(0, 0, null), rec(0, 1, null)], 'pgd')).toBe(0.3);
    expect(medianFlipBudget([rec(0, 0, 0.1), rec(0, 0, null)], 'pgd')).toBeNull();
  });

  it('mean robust accuracy is the trapezoid area over the budget range', () => {
    // Trapezoid rule on a straight line from 1 to 0.5 over [0, 0.2] averages 0.75 (closed form).
    const point = (eps: number, acc: number): CurvePoint => ({
      attack: 'fgsm', norm: 'linf', eps, samples: 10, cleanCorrect: 10, robust: acc * 10, robustAccuracy: acc, ci95Low: 0, ci95High: 1, attackSuccessRate: 0,
    });
    expect(meanRobustAccuracy([point(0.2, 0.5), point(0, 1), point(0.1, 0.75)])).toBeCloseTo(0.75, 12);
  });
});

/** erf by its Maclaurin series (Abramowitz & Stegun 7.1.5), accurate to double precision for |x| < 2. */
function erf(x: number): number {
  let term = x;
  let sum = x;
  for (let n = 1; n < 60; n++) {
    term *= (-x * x) / n;
    sum += term / (2 * n + 1);
  }
  return (2 / Math.sqrt(Math.PI)) * sum;
}
