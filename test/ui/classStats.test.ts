import { describe, expect, it } from 'vitest';
import type { AdversarialOutcome, SampleRecord, SweepResult } from '../../src/core/sweep/types.ts';
import { sweepStatistics } from '../../src/core/stats/perClass.ts';
import type { SavedRun } from '../../src/core/savedRun/types.ts';
import { cellShade, choiceKey, defaultChoice, matrixTotals, savedRunClassViews, statChoices, statsAt } from '../../src/ui/lib/classStats.ts';

/** A sweep of five hand-made images over two classes, FGSM and PGD at ε = 0 and 0.1. */
function sweep(): SweepResult {
  const outcome = (attack: 'fgsm' | 'pgd', eps: number, advPred: number, label: number): AdversarialOutcome => ({ attack, eps, advPred, advConf: 0.9, linf: eps, l2: eps, flipped: advPred !== label });
  const record = (index: number, label: number, cleanPred: number, fgsm: number, pgd: number): SampleRecord => ({
    index,
    file: `${index}.png`,
    label,
    cleanPred,
    cleanConf: 0.9,
    outcomes: [outcome('fgsm', 0, cleanPred, label), outcome('fgsm', 0.1, fgsm, label), outcome('pgd', 0, cleanPred, label), outcome('pgd', 0.1, pgd, label)],
    minFlipEps: {},
  });
  // Image 4 is read wrongly clean (class 1 read as 0) and stays wrong.
  const records = [record(0, 0, 0, 0, 1), record(1, 0, 0, 0, 0), record(2, 1, 1, 0, 0), record(3, 1, 1, 1, 1), record(4, 1, 0, 0, 0)];
  return { config: { attacks: [], norm: 'linf', eps: [0, 0.1], seed: 0, batchSize: 8 }, cleanAccuracy: 0.8, cleanCorrect: 4, samples: 5, curve: [], records, complete: true, startedAt: '', endedAt: '' };
}

describe('per-class views', () => {
  const stats = sweepStatistics(sweep(), ['left', 'right']);

  it('offers every search × positive budget and starts at the last search at its largest budget', () => {
    const choices = statChoices(stats, 'linf');
    expect(choices.map((c) => c.key)).toEqual([choiceKey('fgsm', 0.1), choiceKey('pgd', 0.1)]);
    expect(choices[1]?.label).toBe('PGD at ε = 0.1 (25.5/255)');
    expect(defaultChoice(choices)).toBe(choiceKey('pgd', 0.1));
    expect(defaultChoice([])).toBeNull();
    expect(statsAt(stats, 'square@0.1')).toBeNull();
  });

  it('totals the flip matrix by hand-countable rows, columns and diagonal', () => {
    const at = statsAt(stats, choiceKey('pgd', 0.1))!;
    // Counted by hand from the records: left → [1 left, 1 right]; right → [2 left, 1 right].
    expect(at.matrix.counts).toEqual([
      [1, 1],
      [2, 1],
    ]);
    expect(matrixTotals(at.matrix)).toEqual({ rows: [2, 3], columns: [3, 2], diagonal: 2, total: 5 });
    // The diagonal equals the images that held: correct clean and not flipped (images 1 and 3).
    expect(at.perClass.classes.map((c) => c.robust)).toEqual([1, 1]);
  });

  it('computes the same views for a saved run from its records, with the class names of its run record', () => {
    const result = sweep();
    // Only the fields sweepResultOf reads; the rest of a saved file plays no part here.
    const saved = {
      run: { config: result.config, samples: { cleanAccuracy: 0.8, cleanCorrect: 4, count: 5, classNames: ['left', 'right'] }, curve: [], complete: true, startedAt: '', endedAt: '' },
      records: result.records,
    } as unknown as SavedRun;
    const at = statsAt(savedRunClassViews(saved), choiceKey('pgd', 0.1))!;
    // The same hand counts as above: left → [1 left, 1 right]; right → [2 left, 1 right]; images 1 and 3 held.
    expect(at.matrix.counts).toEqual([
      [1, 1],
      [2, 1],
    ]);
    expect(at.matrix.classNames).toEqual(['left', 'right']);
    expect(at.perClass.classes.map((c) => [c.className, c.samples, c.robust])).toEqual([
      ['left', 2, 1],
      ['right', 3, 1],
    ]);
  });

  it('shades a cell by its share of the row, and not at all when empty', () => {
    expect(cellShade(0, 5, false)).toBe('rgba(162, 59, 42, 0.000)');
    expect(cellShade(5, 5, true)).toBe('rgba(47, 93, 98, 0.720)');
    expect(cellShade(1, 4, false)).toBe('rgba(162, 59, 42, 0.270)');
  });
});
