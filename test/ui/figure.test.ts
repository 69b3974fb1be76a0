import { describe, expect, it } from 'vitest';
import type { CurvePoint } from '../../src/core/sweep/types.ts';
import { wilsonInterval } from '../../src/core/stats/wilson.ts';
import { curveLayout, curveTraces, groupByAttack } from '../../src/ui/lib/figure.ts';
import { flippedItems } from '../../src/ui/lib/gallery.ts';
import type { SampleRecord } from '../../src/core/sweep/types.ts';

function point(attack: 'fgsm' | 'pgd', eps: number, robust: number): CurvePoint {
  const ci = wilsonInterval(robust, 100);
  return { attack, norm: 'linf', eps, samples: 100, cleanCorrect: 90, robust, robustAccuracy: robust / 100, ci95Low: ci.low, ci95High: ci.high, attackSuccessRate: (90 - robust) / 90 };
}

describe('robustness chart data', () => {
  const points = [point('pgd', 8 / 255, 20), point('fgsm', 0, 90), point('pgd', 0, 90), point('fgsm', 8 / 255, 40)];

  it('draws per attack a closed Wilson band and a line, then the clean accuracy across the budget range', () => {
    const traces = curveTraces(points, 0.9) as { x: number[]; y: number[]; name: string; fill?: string }[];
    expect(traces).toHaveLength(5);
    // Attacks in first-seen order: PGD (band, line), then FGSM (band, line), then the clean line.
    const [band, line] = traces;
    // The band polygon runs along the upper bounds by ascending ε and back along the lower bounds.
    expect(band!.x).toEqual([0, 8 / 255, 8 / 255, 0]);
    expect(band!.y).toEqual([wilsonInterval(90, 100).high, wilsonInterval(20, 100).high, wilsonInterval(20, 100).low, wilsonInterval(90, 100).low]);
    expect(band!.fill).toBe('toself');
    expect(line!.name).toContain('PGD');
    expect(line!.y).toEqual([0.9, 0.2]);
    expect(traces[3]!.y).toEqual([0.9, 0.4]);
    const clean = traces[4]!;
    expect(clean.x).toEqual([0, 8 / 255]);
    expect(clean.y).toEqual([0.9, 0.9]);
    expect(curveTraces(points, null)).toHaveLength(4);
  });

  it('groups by attack in first-seen order and labels budgets in grey levels for L∞', () => {
    expect([...groupByAttack(points).keys()]).toEqual(['pgd', 'fgsm']);
    const layout = curveLayout(points, 'linf');
    expect(layout.xaxis?.ticktext).toEqual(['0<br>0/255', '0.03137<br>8/255']);
  });
});

describe('flip gallery selection', () => {
  const record = (index: number, label: number, flipEps: number | null): SampleRecord => ({
    index,
    file: `f${index}.png`,
    label,
    cleanPred: flipEps === 0 ? (label + 1) % 3 : label,
    cleanConf: 0.9,
    outcomes: flipEps ? [{ attack: 'pgd', eps: flipEps, advPred: (label + 1) % 3, advConf: 0.6, linf: flipEps, l2: 0.1, flipped: true }] : [],
    minFlipEps: { pgd: flipEps },
  });
  const records = [record(0, 0, 0.03), record(1, 1, 0.01), record(2, 0, null), record(3, 2, 0), record(4, 0, 0.01)];

  it('keeps flipped samples only (not the never-flipped, not the wrong-clean), sorted by flipping ε', () => {
    expect(flippedItems(records, 'pgd', null, 'eps-ascending').map((i) => i.record.index)).toEqual([1, 4, 0]);
    expect(flippedItems(records, 'pgd', null, 'eps-descending').map((i) => i.record.index)).toEqual([0, 1, 4]);
    expect(flippedItems(records, 'pgd', 0, 'eps-ascending').map((i) => i.record.index)).toEqual([4, 0]);
    expect(flippedItems(records, 'fgsm', null, 'eps-ascending')).toEqual([]);
    expect(flippedItems(records, 'pgd', null, 'eps-ascending')[0]?.outcome?.advPred).toBe(2);
  });
});
