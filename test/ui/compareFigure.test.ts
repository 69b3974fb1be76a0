/** The comparison chart's Plotly data: one colour per run, one dash per search, Wilson bands. */
import { describe, expect, it } from 'vitest';
import type { LabelledRun } from '../../src/core/compare/compareRuns.ts';
import type { SavedRun } from '../../src/core/savedRun/types.ts';
import type { AttackId } from '../../src/core/attacks/types.ts';
import type { CurvePoint } from '../../src/core/sweep/types.ts';
import { wilsonInterval } from '../../src/core/stats/wilson.ts';
import { PALETTE } from '../../src/core/report/svgChart.ts';
import { comparisonLayout, comparisonTraces } from '../../src/ui/lib/compareFigure.ts';

function point(attack: AttackId, eps: number, robust: number, samples = 10): CurvePoint {
  const ci = wilsonInterval(robust, samples);
  return { attack, norm: 'linf', eps, samples, cleanCorrect: samples, robust, robustAccuracy: robust / samples, ci95Low: ci.low, ci95High: ci.high, attackSuccessRate: 1 - robust / samples };
}

function run(label: string, curve: CurvePoint[]): LabelledRun {
  return { label, run: { run: { curve, config: { norm: 'linf' } } } as unknown as SavedRun };
}

type Trace = { x: number[]; y: number[]; name: string; fill?: string; line: { color?: string; dash?: string } };

describe('comparison chart data', () => {
  const runs = [run('A', [point('fgsm', 0, 10), point('fgsm', 8 / 255, 7), point('pgd', 0, 10), point('pgd', 8 / 255, 3)]), run('B', [point('pgd', 0, 10), point('pgd', 8 / 255, 6)])];

  it('draws per run and search a Wilson band, then a line in the run colour with the search dash', () => {
    const traces = comparisonTraces(runs) as Trace[];
    expect(traces).toHaveLength(6);
    const [band, line] = traces;
    expect(band!.fill).toBe('toself');
    expect(band!.x).toEqual([0, 8 / 255, 8 / 255, 0]);
    // Wilson 95 % interval of 7 of 10 is 0.3968–0.8922 (Wilson 1927 score interval; values from memory, also in
    // common tables); the band's upper edge at 8/255 and lower edge at 8/255 are those numbers.
    expect(band!.y[1]).toBeCloseTo(0.8922, 4);
    expect(band!.y[2]).toBeCloseTo(0.3968, 4);
    expect(line!.name).toBe('A: FGSM');
    expect(line!.y).toEqual([1, 0.7]);
    expect(line!.line.color).toBe(PALETTE[0]);
    expect(line!.line.dash).toBe('solid');
    // PGD is the second search seen, so it is dashed in both runs; run B takes the second colour.
    expect(traces[3]!.line.dash).toBe('dash');
    expect(traces[5]!.name).toBe('B: PGD');
    expect(traces[5]!.line).toMatchObject({ color: PALETTE[1], dash: 'dash' });
    expect(traces[5]!.y).toEqual([1, 0.6]);
  });

  it('marks every budget of every run on the x axis, in grey levels for L∞', () => {
    const layout = comparisonLayout(runs);
    expect(layout.xaxis?.tickvals).toEqual([0, 8 / 255]);
    expect(layout.xaxis?.ticktext).toEqual(['0<br>0/255', '0.03137<br>8/255']);
  });
});
