import { describe, expect, it } from 'vitest';
import { flipBudgetHistogram, medianFlipEps, robustAccuracyFromFlips } from '../../src/core/flips/curve.ts';
import type { FlipRecord } from '../../src/core/flips/types.ts';
import { wilsonInterval } from '../../src/core/stats/wilson.ts';
import { FLIP_CURVE_NAME, flipCurveTraces, histogramLayout, histogramTraces, medianText } from '../../src/ui/lib/flipFigure.ts';
import { curveGrid, histogramUpper, niceCeil, remapRecords } from '../../src/worker/flipView.ts';

/** Hand-made flip budgets: one misclassified clean (0), one never flipped (null), four positive ones. */
function records(): FlipRecord[] {
  const budgets: (number | null)[] = [0, 0.012, 0.018, null, 0.031, 0.0071];
  return budgets.map((flipEps, index) => ({ index, file: `f${index}.png`, label: 1, cleanPred: flipEps === 0 ? 2 : 1, flipEps, failedEps: 0, advPred: 2, probes: 3 }));
}

describe('shaping a flip-budget run for the charts', () => {
  it('ends the histogram at a round number above the largest budget, never beyond the largest tried', () => {
    // Closed form: the round numbers are 1, 2, 2.5 and 5 times powers of ten.
    expect([0.031, 0.02, 0.0201, 0.24, 3, 0].map(niceCeil)).toEqual([0.05, 0.02, 0.025, 0.25, 5, 0]);
    expect(histogramUpper(records(), 0.5)).toBe(0.05);
    expect(histogramUpper(records(), 0.04)).toBe(0.04);
    expect(histogramUpper(records().filter((r) => r.flipEps === null || r.flipEps === 0), 0.5)).toBe(0.5);
    expect(curveGrid(0.05, 5).map((v) => Number(v.toFixed(12)))).toEqual([0, 0.01, 0.02, 0.03, 0.04, 0.05]);
  });

  it('renumbers the records of a subset to the whole set', () => {
    expect(remapRecords(records().slice(0, 3), [7, 20, 41]).map((r) => r.index)).toEqual([7, 20, 41]);
  });

  it('draws one bar per bin at its centre, as wide as the bin, with the median marked', () => {
    const h = flipBudgetHistogram(records(), 5, 0.05);
    const [bars] = histogramTraces(h, 'linf') as { x: number[]; y: number[]; width: number[] }[];
    // Budgets 0.0071 → bin (0, 0.01], 0.012 and 0.018 → (0.01, 0.02], 0.031 → (0.03, 0.04].
    expect(bars!.y).toEqual([1, 2, 0, 1, 0]);
    expect(bars!.x.map((v) => Number(v.toFixed(12)))).toEqual([0.005, 0.015, 0.025, 0.035, 0.045]);
    expect(bars!.width.every((w) => Math.abs(w - 0.01) < 1e-12)).toBe(true);
    expect([h.misclassified, h.neverFlipped]).toEqual([1, 1]);
    // Median over the five clean-correct images: 0.0071, 0.012, 0.018, 0.031, ∞ → the third, 0.018.
    const median = medianFlipEps(records());
    expect(median).toBe(0.018);
    const layout = histogramLayout(h, 'linf', median);
    expect(layout.shapes?.[0]).toMatchObject({ x0: 0.018, x1: 0.018 });
    expect(layout.yaxis?.dtick).toBe(1);
    expect(histogramLayout(h, 'linf', null).shapes).toEqual([]);
  });

  it('draws the implied curve as steps with its Wilson band', () => {
    const points = robustAccuracyFromFlips(
      records().map((r) => r.flipEps),
      [0, 0.01, 0.02, 0.05],
    );
    const traces = flipCurveTraces(points) as { name: string; y: number[]; fill?: string; line: { shape?: string } }[];
    expect(traces.map((t) => t.name)).toEqual(['95 % interval, lower edge', '95 % interval', FLIP_CURVE_NAME]);
    // Images holding at ε are those with a budget above ε: 5, 4, 2 and 1 of 6.
    expect(traces[2]!.y).toEqual([5 / 6, 4 / 6, 2 / 6, 1 / 6]);
    expect(traces[0]!.y[1]).toBe(wilsonInterval(4, 6).low);
    expect(traces[1]!.fill).toBe('tonexty');
    expect(traces.every((t) => t.line.shape === 'hv')).toBe(true);
  });

  it('words the median, including the two cases without a number', () => {
    expect(medianText(8 / 255, 0.5, 'linf')).toBe('0.03137 (8/255)');
    expect(medianText(null, 0.5, 'linf')).toContain('never flipped');
    expect(medianText(Number.NaN, 0.5, 'l2')).toContain('no image was read correctly');
  });
});
