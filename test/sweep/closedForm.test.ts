/**
 * Closed-form check of the sweep with FGSM on an affine two-class model z = xW + b.
 *
 * For a binary affine classifier the margin of sample x with true class y is m(x) = d·x + c with
 * d = w_y − w_o, c = b_y − b_o. Inside the pixel box, the smallest perturbation that flips it has
 * size m/‖d‖₁ under L∞ (move every pixel by ε against sign(d)) and m/‖d‖₂ under L2 (move along −d):
 * Hölder's inequality gives d·δ ≥ −ε‖d‖₁ (resp. −ε‖d‖₂) with equality there. The CE gradient of a
 * binary affine model is −p_o·d, so FGSM's step (sign of the gradient for L∞, the normalised gradient
 * for L2) is exactly that optimal δ: FGSM is exact for linear models (Goodfellow et al. 2015, the
 * linearity argument of "Explaining and Harnessing Adversarial Examples"). Pixels are drawn in
 * [0.35, 0.65] and no pixel moves by more than the budget (≤ 0.15), so the box never binds.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import type { LogitsFn, Norm, SampleSet } from '../../src/core/types.ts';
import type { SweepResult } from '../../src/core/sweep/types.ts';

const SIDE = 4;
const D = SIDE * SIDE;
const COUNT = 80;

interface AffineProblem {
  readonly samples: SampleSet;
  readonly logits: LogitsFn;
  /** Exact minimal flip budget per sample (0 for samples misclassified clean). */
  readonly exact: Float64Array;
  readonly dispose: () => void;
}

/** Random affine model and samples; sample i is labelled wrongly when i % 16 === 0. */
function affineProblem(seed: number, norm: Norm): AffineProblem {
  const rng = createRng(seed);
  const w = rng.normalArray(D * 2); // row-major [D, 2]
  const b = new Float32Array([-sumColumn(w, 0) * 0.5, -sumColumn(w, 1) * 0.5]); // logits tie at x = 0.5
  const pixels = rng.uniformArray(COUNT * D, 0.35, 0.65);
  const labels = new Int32Array(COUNT);
  const exact = new Float64Array(COUNT);
  for (let i = 0; i < COUNT; i++) {
    const z = [0, 1].map((k) => b[k]! + dotColumn(w, k, pixels, i));
    const predicted = z[1]! > z[0]! ? 1 : 0;
    const y = i % 16 === 0 ? 1 - predicted : predicted;
    labels[i] = y;
    if (y !== predicted) continue;
    let n1 = 0;
    let n2 = 0;
    for (let p = 0; p < D; p++) {
      const d = w[p * 2 + y]! - w[p * 2 + (1 - y)]!;
      n1 += Math.abs(d);
      n2 += d * d;
    }
    exact[i] = (z[y]! - z[1 - y]!) / (norm === 'linf' ? n1 : Math.sqrt(n2));
  }
  const wT = tf.tensor2d(w, [D, 2]);
  const bT = tf.tensor1d(b);
  const logits: LogitsFn = (x) => tf.tidy(() => tf.add(tf.matMul(tf.reshape(x, [x.shape[0], D]) as tf.Tensor2D, wT), bT) as tf.Tensor2D);
  const samples: SampleSet = {
    files: Array.from({ length: COUNT }, (_, i) => `s${i}.png`),
    labels,
    classNames: ['a', 'b'],
    height: SIDE,
    width: SIDE,
    channels: 1,
    pixels,
  };
  return { samples, logits, exact, dispose: () => tf.dispose([wT, bT]) };
}

function sumColumn(w: Float32Array, k: number): number {
  let s = 0;
  for (let p = 0; p < D; p++) s += w[p * 2 + k]!;
  return s;
}

function dotColumn(w: Float32Array, k: number, pixels: Float32Array, i: number): number {
  let s = 0;
  for (let p = 0; p < D; p++) s += w[p * 2 + k]! * pixels[i * D + p]!;
  return s;
}

/** First grid budget ≥ the exact value, or null when the grid ends first. */
function firstGridBudget(grid: readonly number[], exact: number): number | null {
  return grid.find((e) => e >= exact) ?? null;
}

const GRIDS: Record<Norm, number[]> = {
  linf: Array.from({ length: 13 }, (_, i) => i / 200), // 0, 0.005, …, 0.06
  l2: Array.from({ length: 16 }, (_, i) => i / 100), // 0, 0.01, …, 0.15
};

/** Exact values closer than this to a grid budget are left out: float32 rounding could tip them. */
const GAP = 2e-4;

for (const backend of BACKENDS) {
  for (const norm of ['linf', 'l2'] as const) {
    describe(`FGSM flip budgets on an affine 2-class model, ${norm} (${backend})`, () => {
      let problem: AffineProblem;
      let result: SweepResult;
      let kept: number[];
      beforeAll(async () => {
        await useBackend(backend);
        problem = affineProblem(norm === 'linf' ? 11 : 12, norm);
        const grid = GRIDS[norm];
        kept = Array.from(problem.exact.keys()).filter((i) => problem.exact[i] === 0 || grid.every((e) => Math.abs(e - problem.exact[i]!) > GAP));
        const config = { attacks: [{ id: 'fgsm' as const, options: {} }], norm, eps: [...grid].reverse(), seed: 3, batchSize: 16 };
        result = await runSweep({ logits: problem.logits, samples: problem.samples, config });
        problem.dispose();
      });

      it('finds each sample\'s first grid budget at or above its closed-form minimal flip size', () => {
        // Closed form m/‖d‖₁ (L∞) or m/‖d‖₂ (L2), Goodfellow et al. 2015 linearity argument (see header).
        expect(kept.length).toBeGreaterThan(COUNT * 0.6);
        const flippedSomewhere = kept.filter((i) => typeof result.records[i]!.minFlipEps.fgsm === 'number' && problem.exact[i]! > 0);
        const heldOut = kept.filter((i) => result.records[i]!.minFlipEps.fgsm === null);
        expect(flippedSomewhere.length).toBeGreaterThan(10); // the grid actually separates samples
        expect(heldOut.length).toBeGreaterThan(0);
        for (const i of kept) {
          const exact = problem.exact[i]!;
          const expected = exact === 0 ? 0 : firstGridBudget(GRIDS[norm], exact);
          expect(result.records[i]!.minFlipEps.fgsm, `sample ${i}, exact ${exact}`).toBe(expected);
        }
      });

      it('moves by exactly ε in the chosen norm, and by ε per pixel under L∞', () => {
        // Closed form: the L∞ step moves every one of the D pixels by ε, so ‖δ‖₂ = ε√D; the L2 step has length ε.
        for (const i of kept) {
          for (const o of result.records[i]!.outcomes) {
            if (o.eps === 0 || problem.exact[i] === 0 || (o.flipped && o.eps !== result.records[i]!.minFlipEps.fgsm)) continue;
            const size = norm === 'linf' ? o.linf : o.l2;
            expect(Math.abs(size - o.eps)).toBeLessThan(1e-5);
            if (norm === 'linf') expect(Math.abs(o.l2 - o.eps * Math.sqrt(D))).toBeLessThan(1e-4);
          }
        }
      });

      it('gives the closed-form robust count at every budget', () => {
        // Robust at ε ⇔ correct clean and exact minimal flip size > ε (closed form above). Samples within
        // GAP of ε may go either way, hence the two bounds.
        const exact = Array.from(problem.exact);
        expect(result.curve.map((p) => p.eps)).toEqual(GRIDS[norm]);
        for (const point of result.curve) {
          expect(point.robust).toBeGreaterThanOrEqual(exact.filter((e) => e > point.eps + GAP).length);
          expect(point.robust).toBeLessThanOrEqual(exact.filter((e) => e > point.eps - GAP && e > 0).length);
        }
      });
    });
  }
}
