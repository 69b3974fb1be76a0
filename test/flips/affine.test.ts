/**
 * Flip budgets against the exact minimal budgets of affine classifiers (closed forms in closedForm.ts):
 * a flip budget is the size of a point the model misclassifies, so it can never fall below the exact
 * minimum, and a good search with a fine bisection lands close to it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { runFlipBudgets } from '../../src/core/flips/runFlipBudgets.ts';
import { robustAccuracyFromFlips } from '../../src/core/flips/curve.ts';
import type { FlipBudgetConfig, FlipSearchId } from '../../src/core/flips/types.ts';
import type { Norm, SampleSet } from '../../src/core/types.ts';
import { affineModel, type AffineModel } from '../attacks/models.ts';
import { boxBindingImages, medianOf, minimalL2, minimalLinf, pickSamples, type Sample } from './closedForm.ts';

const SIDE = 8;
const D = SIDE * SIDE;
const K = 5;
const N = 40;

/** Interior images: pixels in [0.3, 0.7], so the box cannot bind below a budget of 0.3 (|δ_i| ≤ ‖δ‖). */
function interiorImages(seed: number): Float32Array {
  return createRng(seed).uniformArray(4 * N * D, 0.3, 0.7);
}

function sampleSet(samples: readonly Sample[]): SampleSet {
  return {
    files: samples.map((_, i) => `s${i}.png`),
    labels: Int32Array.from(samples.map((s) => s.y)),
    classNames: Array.from({ length: K }, (_, k) => String(k)),
    height: SIDE,
    width: SIDE,
    channels: 1,
    pixels: Float32Array.from(samples.flatMap((s) => Array.from(s.x))),
  };
}

interface Case {
  readonly norm: Norm;
  /** 'box': pixels at 0 and 1 so the box binds (L∞ only); 'interior': pixels in [0.3, 0.7], budgets below 0.3. */
  readonly images: 'box' | 'interior';
  /** Largest allowed median ratio flip budget / exact budget. */
  readonly medianRatio: number;
  readonly search: FlipSearchId;
  readonly options: Record<string, unknown>;
  readonly tol: number;
  readonly maxEps: number;
}

// Issue 5, test 1: medians within 3 % of the closed form for PGD (margin loss) and DeepFool (its 2 %
// overshoot included). APGD-CE maximises cross-entropy, whose ascent on an affine model heads for a
// mix of all class directions rather than the nearest boundary, so its budgets sit above the minimum
// by design (measured: 2.9 % L∞, 12.8 % L2 at 20 and at 100 iterations); it is held to "never below"
// and a loose 15 % here.
const CASES: readonly Case[] = [
  { norm: 'linf', images: 'box', search: 'pgd', options: {}, tol: 2e-4, maxEps: 0.5, medianRatio: 1.03 },
  { norm: 'l2', images: 'interior', search: 'pgd', options: {}, tol: 1e-3, maxEps: 2, medianRatio: 1.03 },
  // DeepFool linearises without the box, so it is checked where the box does not bind.
  { norm: 'linf', images: 'interior', search: 'deepfool', options: {}, tol: 2e-4, maxEps: 0.5, medianRatio: 1.03 },
  { norm: 'l2', images: 'interior', search: 'deepfool', options: {}, tol: 1e-3, maxEps: 2, medianRatio: 1.03 },
  { norm: 'linf', images: 'box', search: 'apgd-ce', options: { steps: 20 }, tol: 2e-4, maxEps: 0.5, medianRatio: 1.15 },
  { norm: 'l2', images: 'interior', search: 'apgd-ce', options: { steps: 20 }, tol: 1e-3, maxEps: 2, medianRatio: 1.15 },
];

describe('flip budgets of affine classifiers against the closed form (wasm)', () => {
  let model: AffineModel;
  beforeAll(async () => {
    await useBackend('wasm');
    model = affineModel(2024, D, K, 0.5);
  });
  afterAll(() => model.dispose());

  for (const c of CASES) {
    it(`${c.search} ${c.norm} (${c.images} images): never below the exact budget, median within ${Math.round(100 * (c.medianRatio - 1))} %`, async () => {
      const samples = pickSamples(model, c.images === 'box' ? boxBindingImages(8, 4 * N * D) : interiorImages(9), N);
      const exact = samples.map((s) => (c.norm === 'linf' ? minimalLinf(model, s) : minimalL2(model, s)));
      // Interior images: every |δ_i| ≤ ‖δ‖ < 0.3, so the box never binds and the closed forms above are exact.
      if (c.images === 'interior') expect(Math.max(...exact)).toBeLessThan(0.3);
      const config: FlipBudgetConfig = { search: c.search, norm: c.norm, maxEps: c.maxEps, tol: c.tol, options: c.options, seed: 1, batchSize: 16 };
      const result = await runFlipBudgets({ logits: model.logits, samples: sampleSet(samples), config });
      const flips = result.records.map((r) => r.flipEps);
      // Closed form: no point closer than the exact minimum is misclassified (float32 slack of 1e-4 relative).
      flips.forEach((f, i) => {
        expect(f, `sample ${i}`).not.toBeNull();
        expect(f!, `sample ${i}`).toBeGreaterThanOrEqual(exact[i]! * (1 - 1e-4) - 1e-6);
        expect(result.records[i]!.advPred).not.toBe(samples[i]!.y);
      });
      const ratio = medianOf(flips as number[]) / medianOf(exact);
      const worst = Math.max(...flips.map((f, i) => f! / exact[i]!));
      console.log(`${c.search} ${c.norm}: median flip budget ${medianOf(flips as number[]).toFixed(5)} vs exact ${medianOf(exact).toFixed(5)} (ratio ${ratio.toFixed(4)}), worst sample ratio ${worst.toFixed(3)}, probes/sample ${(result.records.reduce((s, r) => s + r.probes, 0) / N).toFixed(1)}`);
      expect(ratio).toBeLessThanOrEqual(c.medianRatio);
      expect(result.medianFlipEps).toBeCloseTo(medianOf(flips as number[]), 12);

      // The curve from flip budgets, checked against the exact robust accuracy at a grid of budgets:
      // never below it (flip budgets never undercut the minimum), and close to it.
      const grid = [0.25, 0.5, 0.75].map((q) => [...exact].sort((a, b) => a - b)[Math.floor(q * N)]!);
      const curve = robustAccuracyFromFlips(flips, grid);
      curve.forEach((p, g) => {
        const exactRobust = exact.filter((e) => e > grid[g]!).length;
        expect(p.robust).toBeGreaterThanOrEqual(exactRobust);
        expect(p.robust - exactRobust).toBeLessThanOrEqual(Math.ceil(0.1 * N));
      });
    });
  }
});
