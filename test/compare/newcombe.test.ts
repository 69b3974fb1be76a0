/**
 * Newcombe's hybrid score interval for a difference of independent proportions against the worked
 * examples of Newcombe, "Interval estimation for the difference between independent proportions:
 * comparison of eleven methods", Statistics in Medicine 17 (1998), Table II, method 10 (values to
 * four decimals, from memory).
 */
import { describe, expect, it } from 'vitest';
import { newcombeDifference } from '../../src/core/compare/newcombe.ts';

// [m, n, x, y, lower, upper] for the difference m/n − x/y.
const PUBLISHED: [number, number, number, number, number, number][] = [
  [56, 70, 48, 80, 0.0524, 0.3339],
  [9, 10, 3, 10, 0.1705, 0.809],
  [5, 56, 0, 29, -0.0381, 0.1926],
  [0, 10, 0, 20, -0.1611, 0.2775],
  [0, 10, 0, 10, -0.2775, 0.2775],
  [10, 10, 0, 20, 0.6791, 1],
  [10, 10, 0, 10, 0.6075, 1],
];

describe('newcombeDifference', () => {
  for (const [m, n, x, y, low, high] of PUBLISHED) {
    it(`${m}/${n} − ${x}/${y} gives [${low}, ${high}] (Newcombe 1998, Table II)`, () => {
      // Our function gives the interval of p₂ − p₁, so the first proportion of the table goes second.
      const ci = newcombeDifference(x, y, m, n);
      expect(ci.low).toBeCloseTo(low, 4);
      expect(ci.high).toBeCloseTo(high, 4);
    });
  }

  it('is antisymmetric: swapping the runs negates the interval', () => {
    // Follows from the construction (square-and-add of the two Wilson intervals).
    const ab = newcombeDifference(13, 20, 9, 20);
    const ba = newcombeDifference(9, 20, 13, 20);
    expect(ab.low).toBeCloseTo(-ba.high, 12);
    expect(ab.high).toBeCloseTo(-ba.low, 12);
  });
});
