/**
 * Issue 5, test 4 (statistics): the per-class table and the flip matrices of a real sweep, checked by
 * recounting its exported samples.csv. The Wilson intervals themselves are checked against a reference
 * statistics library (7/50, 900/1000) in test/smoke.test.ts and test/sweep/stats.test.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { wilsonInterval } from '../../src/core/stats/wilson.ts';
import { flipMatrices, perClassRobustness, sweepStatistics } from '../../src/core/stats/perClass.ts';
import { medianFlipBudget } from '../../src/core/stats/curve.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import { samplesCsv } from '../../src/core/export/curveCsv.ts';
import { flipMatrixCsv, perClassCsv } from '../../src/core/export/statsCsv.ts';
import type { SweepResult } from '../../src/core/sweep/types.ts';
import { meansPlusRandomReluModel, mnistSampleSet, type TestModel } from '../sweep/fixtures.ts';

/** samples.csv parsed back: per (attack, eps, label) the samples, the robust ones and the predicted classes after the attack. */
function recount(csv: string): Map<string, { samples: number; robust: number; after: Map<number, number> }> {
  const out = new Map<string, { samples: number; robust: number; after: Map<number, number> }>();
  for (const line of csv.trimEnd().split('\n').slice(1)) {
    // File names here hold a comma inside quotes; the remaining 11 fields are plain.
    const fields = line.slice(line.lastIndexOf('"') + 2).split(',');
    const [label, cleanPred, , attack, , eps, advPred, , , , flipped] = fields as string[];
    const key = `${attack}|${eps}|${label}`;
    const entry = out.get(key) ?? { samples: 0, robust: 0, after: new Map<number, number>() };
    entry.samples++;
    if (cleanPred === label && flipped === '0') entry.robust++;
    entry.after.set(Number(advPred), (entry.after.get(Number(advPred)) ?? 0) + 1);
    out.set(key, entry);
  }
  return out;
}

describe('per-class robustness and flip matrices of a sweep (wasm)', () => {
  let model: TestModel;
  let result: SweepResult;
  beforeAll(async () => {
    await useBackend('wasm');
    model = meansPlusRandomReluModel(11);
    result = await runSweep({
      logits: model.logits,
      samples: mnistSampleSet(6, 840),
      config: { attacks: [{ id: 'fgsm', options: {} }, { id: 'pgd', options: { steps: 5 } }], norm: 'linf', eps: [0, 0.05, 0.1], seed: 4, batchSize: 30 },
    });
  });
  afterAll(() => model.dispose());

  it('per-class counts and intervals agree with a recount of samples.csv', () => {
    const counts = recount(samplesCsv(result));
    const table = perClassRobustness(result, Array.from({ length: 10 }, (_, k) => `digit ${k}`));
    expect(table).toHaveLength(result.curve.length);
    for (const point of table) {
      let robustTotal = 0;
      for (const c of point.classes) {
        const expected = counts.get(`${point.attack}|${point.eps}|${c.classIndex}`)!;
        expect(c.samples).toBe(expected.samples);
        expect(c.robust).toBe(expected.robust);
        expect(c.className).toBe(`digit ${c.classIndex}`);
        // Wilson 1927 on the class's own counts.
        const ci = wilsonInterval(expected.robust, expected.samples);
        expect([c.ci95Low, c.ci95High]).toEqual([ci.low, ci.high]);
        robustTotal += c.robust;
      }
      // The classes partition the samples: their robust counts add up to the curve's.
      expect(robustTotal).toBe(result.curve.find((p) => p.attack === point.attack && p.eps === point.eps)!.robust);
    }
  });

  it('flip matrices count every sample once, with the robust ones on the diagonal', () => {
    const counts = recount(samplesCsv(result));
    for (const m of flipMatrices(result)) {
      expect(m.counts).toHaveLength(10);
      m.counts.forEach((row, t) => {
        const expected = counts.get(`${m.attack}|${m.eps}|${t}`)!;
        row.forEach((n, p) => expect(n).toBe(expected.after.get(p) ?? 0));
        // A sample stays on the diagonal exactly when it is robust (correct clean, not flipped).
        expect(row[t]).toBe(expected.robust);
      });
    }
    // At ε = 0 the flip matrix is the clean confusion matrix.
    const clean = flipMatrices(result).find((m) => m.eps === 0)!;
    const diagonal = clean.counts.reduce((s, row, t) => s + row[t]!, 0);
    expect(diagonal).toBe(result.cleanCorrect);
  });

  it('writes both as CSV: one row per attack × budget × class, and the non-zero matrix cells', () => {
    const perClass = perClassCsv(perClassRobustness(result), 'linf').trimEnd().split('\n');
    expect(perClass[0]).toBe('attack,norm,eps,class,class_name,samples,clean_correct,robust,robust_accuracy,ci95_low,ci95_high');
    expect(perClass).toHaveLength(1 + result.curve.length * 10);
    const cells = flipMatrixCsv(flipMatrices(result), 'linf').trimEnd().split('\n');
    expect(cells[0]).toBe('attack,norm,eps,true_class,pred_class,count');
    // Every sample sits in exactly one cell per attack × budget.
    const total = cells.slice(1).reduce((s, line) => s + Number(line.split(',')[5]), 0);
    expect(total).toBe(result.samples * result.curve.length);
  });

  it('bundles the tables with the median flip budget of every attack', () => {
    const stats = sweepStatistics(result);
    expect(stats.perClass).toHaveLength(result.curve.length);
    expect(stats.flipMatrices).toHaveLength(result.curve.length);
    for (const attack of ['fgsm', 'pgd'] as const) expect(stats.medianFlipBudget[attack]).toEqual(medianFlipBudget(result.records, attack));
    console.log(`median flip budget on the grid: fgsm ${stats.medianFlipBudget.fgsm}, pgd ${stats.medianFlipBudget.pgd}; clean ${result.cleanCorrect}/${result.samples}`);
  });
});
