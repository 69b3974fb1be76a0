/**
 * PGD's bookkeeping against its definition (README.md of src/core/attacks; Madry et al. 2018 for the
 * iteration): the logits function is wrapped to record every point the search evaluates, then
 *  - a sample is flipped iff some evaluated point of it is misclassified (any iterate, any restart),
 *  - a flipped sample returns its first misclassified point and is never evaluated again after it,
 *  - an unflipped sample returns one of its evaluated points of highest cross-entropy,
 *  - progress is monotone and ends at samples × steps × restarts,
 *  - the default step is 2.5·ε/steps (common practice) in the norm's own length,
 *  - a targeted search leaves samples whose class already is the target exactly as they were.
 * Recorded rows are matched to their sample by the nearest clean image (images are far apart
 * compared with ε).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { pgd } from '../../src/core/attacks/pgd.ts';
import type { LogitsFn } from '../../src/core/types.ts';
import { tinyDenseNet, type TinyNet } from './models.ts';

const N = 24;
const DIM = 36;
const STEPS = 6;
const RESTARTS = 3;

interface Seen {
  readonly point: Float32Array;
  readonly logits: Float32Array;
}

function nearestSample(point: Float32Array, clean: Float32Array): number {
  let best = -1;
  let bestDistance = Infinity;
  for (let n = 0; n < N; n++) {
    let d = 0;
    for (let i = 0; i < DIM; i++) d = Math.max(d, Math.abs(point[i]! - clean[n * DIM + i]!));
    if (d < bestDistance) [best, bestDistance] = [n, d];
  }
  return best;
}

function crossEntropy(z: Float32Array, y: number): number {
  const m = Math.max(...z);
  return m + Math.log(z.reduce((s, v) => s + Math.exp(v - m), 0)) - z[y]!;
}

const argmax = (z: Float32Array): number => z.indexOf(Math.max(...z));

describe('PGD bookkeeping (wasm)', () => {
  let net: TinyNet;
  beforeAll(async () => {
    await useBackend('wasm');
    net = tinyDenseNet(77);
  });
  afterAll(() => net.dispose());

  it('flips on any iterate, freezes flipped points, keeps the highest-loss point otherwise', async () => {
    const clean = createRng(12).uniformArray(N * DIM, 0, 1);
    const x = tf.tensor4d(clean, [N, 6, 6, 1]);
    const labels = tf.tidy(() => tf.cast(tf.argMax(net.logits(x), 1), 'int32')) as tf.Tensor1D;
    const y = await labels.data();
    const seen: Seen[][] = Array.from({ length: N }, () => []);
    const recording: LogitsFn = (images) => {
      const z = net.logits(images);
      const [pixels, values] = [images.dataSync() as Float32Array, z.dataSync() as Float32Array];
      const k = z.shape[1];
      for (let r = 0; r < images.shape[0]; r++) {
        const point = pixels.slice(r * DIM, (r + 1) * DIM);
        seen[nearestSample(point, clean)]!.push({ point, logits: values.slice(r * k, (r + 1) * k) });
      }
      return z;
    };
    const progress: [number, number][] = [];
    const options = pgd.meta.validate({ steps: STEPS, restarts: RESTARTS });
    const out = await pgd.run({ logits: recording, x, labels, eps: 0.1, norm: 'linf' }, options, {
      rng: createRng(4),
      onProgress: (done, total) => progress.push([done, total]),
    });
    const adv = await out.adv.data();
    tf.dispose([x, labels, out.adv]);

    let flips = 0;
    let survivors = 0;
    for (let n = 0; n < N; n++) {
      const points = seen[n]!;
      const returned = Array.from(adv.subarray(n * DIM, (n + 1) * DIM));
      const firstWrong = points.findIndex((s) => argmax(s.logits) !== y[n]);
      expect(out.flipped[n], `sample ${n}`).toBe(firstWrong >= 0 ? 1 : 0);
      if (firstWrong >= 0) {
        flips++;
        expect(Array.from(points[firstWrong]!.point)).toEqual(returned);
        expect(points.length - 1, `sample ${n} evaluated after its flip`).toBe(firstWrong);
      } else {
        survivors++;
        // Every restart evaluates steps + 1 points (start, then one per step).
        expect(points.length).toBe(RESTARTS * (STEPS + 1));
        const losses = points.map((s) => crossEntropy(s.logits, y[n]!));
        const match = points.findIndex((s) => Array.from(s.point).every((v, i) => v === returned[i]));
        expect(match, `sample ${n} returned a point never evaluated`).toBeGreaterThanOrEqual(0);
        expect(losses[match]!).toBeGreaterThanOrEqual(Math.max(...losses) - 1e-5);
      }
    }
    console.log(`PGD bookkeeping: ${flips} flipped, ${survivors} unflipped of ${N}; ${out.gradientEvaluations.toFixed(2)} gradient evaluations per sample`);
    // Both branches were exercised.
    expect(flips).toBeGreaterThan(0);
    expect(survivors).toBeGreaterThan(0);
    const total = N * STEPS * RESTARTS;
    expect(progress.every(([, t]) => t === total)).toBe(true);
    expect(progress.every(([d], i) => i === 0 || d > progress[i - 1]![0])).toBe(true);
    expect(progress.at(-1)![0]).toBe(total);
    expect(out.gradientEvaluations).toBeLessThanOrEqual(STEPS * RESTARTS);
  });

  /** Records the points a search evaluates, in call order. */
  function recorder(): { logits: LogitsFn; points: Float32Array[] } {
    const points: Float32Array[] = [];
    return {
      points,
      logits: (images) => {
        points.push(images.dataSync() as Float32Array);
        return net.logits(images);
      },
    };
  }

  for (const norm of ['linf', 'l2'] as const) {
    it(`${norm}: the default step is 2.5·ε/steps`, async () => {
      const clean = createRng(13).uniformArray(N * DIM, 0.3, 0.7);
      const x = tf.tensor4d(clean, [N, 6, 6, 1]);
      const labels = tf.tidy(() => tf.cast(tf.argMax(net.logits(x), 1), 'int32')) as tf.Tensor1D;
      const eps = 0.1;
      const rec = recorder();
      const out = await pgd.run({ logits: rec.logits, x, labels, eps, norm }, pgd.meta.validate({ steps: 10, randomStart: false }), { rng: createRng(1) });
      tf.dispose([x, labels, out.adv]);
      // Evaluation 0 is x itself; evaluation 1 is one step later (rows flipped at x are dropped, none here).
      expect(Array.from(rec.points[0]!)).toEqual(Array.from(clean));
      const second = rec.points[1]!;
      expect(second.length).toBe(N * DIM);
      const alpha = (2.5 * eps) / 10;
      for (let n = 0; n < N; n++) {
        const delta = Array.from({ length: DIM }, (_, i) => second[n * DIM + i]! - clean[n * DIM + i]!);
        // Box cannot bind: pixels in [0.3, 0.7], α = 0.025.
        if (norm === 'linf') delta.forEach((d) => expect(Math.abs(Math.abs(d) - alpha) < 1e-6 || d === 0).toBe(true));
        else expect(Math.sqrt(delta.reduce((s, d) => s + d * d, 0))).toBeCloseTo(alpha, 6);
      }
    });
  }

  it('a targeted search leaves samples already of the target class untouched', async () => {
    const clean = createRng(14).uniformArray(N * DIM, 0, 1);
    const x = tf.tensor4d(clean, [N, 6, 6, 1]);
    const labels = tf.tidy(() => tf.cast(tf.argMax(net.logits(x), 1), 'int32')) as tf.Tensor1D;
    const y = await labels.data();
    const target = y[0]!;
    const out = await pgd.run(
      { logits: net.logits, x, labels, eps: 0.1, norm: 'linf' },
      pgd.meta.validate({ steps: 4, target: { kind: 'class', classIndex: target } }),
      { rng: createRng(1) },
    );
    const adv = await out.adv.data();
    tf.dispose([x, labels, out.adv]);
    let untouched = 0;
    for (let n = 0; n < N; n++) {
      if (y[n] !== target) continue;
      untouched++;
      expect(Array.from(adv.subarray(n * DIM, (n + 1) * DIM))).toEqual(Array.from(clean.subarray(n * DIM, (n + 1) * DIM)));
      expect(out.flipped[n]).toBe(0);
    }
    expect(untouched).toBeGreaterThan(0);
    const one = tf.zeros([1, 6, 6, 1]) as tf.Tensor4D;
    const zero = tf.tensor1d([0], 'int32');
    await expect(
      pgd.run({ logits: net.logits, x: one, labels: zero, eps: 0.1, norm: 'linf' }, pgd.meta.validate({ target: { kind: 'class', classIndex: 9 } }), {
        rng: createRng(1),
      }),
    ).rejects.toThrow('pgd: target class 9 is out of range for a model with 5 classes');
    tf.dispose([one, zero]);
  });
});
