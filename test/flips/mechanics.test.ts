/**
 * Mechanics of a flip-budget run: tensors released, one seed one result, cancellation, the
 * definitions of the curve and the median, flips.csv's format, and configuration errors.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { runFlipBudgets } from '../../src/core/flips/runFlipBudgets.ts';
import { flipBudgetHistogram, medianFlipEps, robustAccuracyFromFlips } from '../../src/core/flips/curve.ts';
import { defaultMaxEps, DEFAULT_TOL } from '../../src/core/flips/defaults.ts';
import { flipsCsv } from '../../src/core/export/flipsCsv.ts';
import type { FlipBudgetConfig, FlipRecord, FlipSearchId } from '../../src/core/flips/types.ts';
import type { SampleSet } from '../../src/core/types.ts';
import { affineModel, type AffineModel } from '../attacks/models.ts';

const D = 36;

function samples(count: number): SampleSet {
  const rng = createRng(21);
  return {
    files: Array.from({ length: count }, (_, i) => `s${i}`),
    // Labels are drawn at random, so some samples are misclassified clean (flip budget 0).
    labels: Int32Array.from({ length: count }, () => rng.int(4)),
    classNames: ['a', 'b', 'c', 'd'],
    height: 6,
    width: 6,
    channels: 1,
    pixels: rng.uniformArray(count * D, 0, 1),
  };
}

const config = (search: FlipSearchId, extra: Partial<FlipBudgetConfig> = {}): FlipBudgetConfig => ({
  search,
  norm: 'linf',
  maxEps: 0.5,
  tol: DEFAULT_TOL,
  options: search === 'apgd-ce' ? { steps: 10 } : {},
  seed: 7,
  batchSize: 8,
  ...extra,
});

describe('flip-budget runs (wasm)', () => {
  let model: AffineModel;
  beforeAll(async () => {
    await useBackend('wasm');
    model = affineModel(5, D, 4, 1);
  });
  afterAll(() => model.dispose());

  for (const search of ['pgd', 'apgd-ce', 'deepfool'] as const) {
    it(`${search}: releases every tensor, repeats under one seed, gives 0 exactly to samples misclassified clean`, async () => {
      const set = samples(20);
      const before = tf.memory().numTensors;
      const a = await runFlipBudgets({ logits: model.logits, samples: set, config: config(search) });
      expect(tf.memory().numTensors).toBe(before);
      const b = await runFlipBudgets({ logits: model.logits, samples: set, config: config(search) });
      expect(b.records).toEqual(a.records);
      expect(a.complete).toBe(true);
      for (const r of a.records) {
        if (r.cleanPred !== r.label) expect([r.flipEps, r.advPred, r.probes]).toEqual([0, r.cleanPred, 0]);
        else if (r.flipEps !== null) {
          expect(r.flipEps).toBeGreaterThan(0);
          expect(r.flipEps).toBeLessThanOrEqual(0.5);
          expect(r.advPred).not.toBe(r.label);
          // The bisection stops once the bracket (failedEps, flipEps] is at most tol wide.
          if (search !== 'deepfool') expect(r.flipEps - r.failedEps).toBeLessThanOrEqual(DEFAULT_TOL);
        }
      }
      expect(a.cleanCorrect).toBe(a.records.filter((r) => r.cleanPred === r.label).length);
    });
  }

  it('stops promptly when aborted and reports the finished samples', async () => {
    const controller = new AbortController();
    const before = tf.memory().numTensors;
    const result = await runFlipBudgets(
      { logits: model.logits, samples: samples(40), config: config('pgd') },
      { signal: controller.signal, onProgress: (p) => p.probes >= 3 && controller.abort() },
    );
    expect(result.complete).toBe(false);
    expect(result.records.length).toBeLessThan(40);
    expect(tf.memory().numTensors).toBe(before);
  });

  it('refuses bad settings with a message naming them', async () => {
    const run = (c: FlipBudgetConfig): Promise<unknown> => runFlipBudgets({ logits: model.logits, samples: samples(2), config: c });
    await expect(run(config('pgd', { tol: 0 }))).rejects.toThrow(/tol/);
    await expect(run(config('pgd', { tol: 0.6 }))).rejects.toThrow(/tol/);
    await expect(run(config('pgd', { options: { target: { kind: 'least-likely' } } }))).rejects.toThrow(/untargeted/);
    await expect(run(config('pgd', { options: { steps: 0 } }))).rejects.toThrow(/steps/);
  });
});

describe('what flip budgets imply', () => {
  const record = (flipEps: number | null, correct = true): FlipRecord => ({ index: 0, file: 'f,1', label: 1, cleanPred: correct ? 1 : 2, flipEps, failedEps: 0, advPred: 2, probes: 1 });

  it('robust accuracy at ε is the share of budgets above ε (never-flipped count as robust everywhere)', () => {
    // Definition (issue 5): accuracy(ε) = share of samples whose flip budget exceeds ε.
    const curve = robustAccuracyFromFlips([0, 0.1, 0.2, 0.2, null], [0, 0.1, 0.15, 0.2, 1]);
    expect(curve.map((p) => p.robust)).toEqual([4, 3, 3, 1, 1]);
    expect(curve[0]!.robustAccuracy).toBe(0.8);
  });

  it('the median counts never-flipped samples as beyond every budget and skips samples wrong clean', () => {
    // Definition: the median of a sample censored above; unknown (null) once half are censored.
    expect(medianFlipEps([record(0.1), record(0.3), record(null), record(0, false)])).toBe(0.3);
    expect(medianFlipEps([record(0.1), record(null)])).toBeNull();
    expect(medianFlipEps([record(0, false)])).toBeNaN();
  });

  it('writes flips.csv with 0 for misclassified, an empty field for never flipped, six decimals otherwise', () => {
    expect(flipsCsv([record(0.0312549), record(null), record(0, false)])).toBe(
      'file,label,clean_pred,flip_eps,adv_pred\n"f,1",1,1,0.031255,2\n"f,1",1,1,,2\n"f,1",1,2,0,2\n',
    );
  });

  it('bins positive budgets into (edge, edge] and counts the misclassified and never-flipped apart', () => {
    // Definition of a histogram with right-closed bins over (0, maxEps].
    const h = flipBudgetHistogram([record(0.1), record(0.25), record(0.5), record(0.26), record(null), record(0, false)], 2, 0.5);
    expect(h.edges).toEqual([0, 0.25, 0.5]);
    expect(h.counts).toEqual([2, 2]);
    expect([h.misclassified, h.neverFlipped]).toEqual([1, 1]);
  });

  it('defaults the largest budget to the flat-grey radius', () => {
    // Every pixel moved to 0.5 changes it by at most 0.5: L∞ 0.5, L2 0.5·√(pixels).
    expect(defaultMaxEps('linf', 784)).toBe(0.5);
    expect(defaultMaxEps('l2', 784)).toBe(14);
  });
});
