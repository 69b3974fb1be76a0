/**
 * Contract checks for APGD-CE, APGD-DLR, Square, DeepFool and the noise baseline on small seeded nets
 * (a conv net and a dense net), on both backends: every returned point lies in the threat model
 * (definition of the L∞/L2 ball and the [0,1] pixel box), the flipped flags are the model's own argmax
 * verdict at the returned points, progress only grows and ends at its total, one seed gives identical
 * bytes, memory stays flat, and an aborted signal stops each search with an AbortError (DOM
 * AbortSignal spec) without leaking tensors.
 */
import { describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import type { AttackId, AttackOutcome, AttackProblem } from '../../src/core/attacks/types.ts';
import { argmaxRows } from './models.ts';
import { BUDGET, deltaNorms, useTinyNetBatches } from './invariantSetup.ts';

interface Variant {
  readonly id: AttackId;
  readonly options: Record<string, unknown>;
  /** Whether the search draws random numbers (DeepFool does not). */
  readonly random: boolean;
}

const VARIANTS: Variant[] = [
  { id: 'apgd-ce', options: { steps: 6, restarts: 2 }, random: true },
  { id: 'apgd-ce', options: { steps: 4, randomStart: false, target: { kind: 'least-likely' } }, random: false },
  { id: 'apgd-dlr', options: { steps: 6, restarts: 2 }, random: true },
  { id: 'apgd-dlr', options: { steps: 6, target: { kind: 'class', classIndex: 1 } }, random: true },
  { id: 'square', options: { queries: 200 }, random: true },
  { id: 'deepfool', options: { maxIterations: 10 }, random: false },
  { id: 'noise', options: { draws: 5 }, random: true },
];

async function run(variant: Variant, problem: AttackProblem, seed: number, signal?: AbortSignal, onProgress?: (done: number, total: number) => void): Promise<{ out: AttackOutcome; adv: Float32Array }> {
  const attack = getAttack(variant.id);
  const out = await attack.run(problem, attack.meta.validate(variant.options), {
    rng: createRng(seed),
    ...(signal ? { signal } : {}),
    ...(onProgress ? { onProgress } : {}),
  });
  return { out, adv: new Float32Array(await out.adv.data()) };
}

const describeVariant = (v: Variant): string => `${v.id} ${JSON.stringify(v.options)}`;

for (const backend of BACKENDS) {
  describe(`APGD, Square, DeepFool and noise invariants on ${backend}`, () => {
    const { problemFor, caseFor } = useTinyNetBatches(backend);

    for (const netName of ['conv', 'dense']) {
      for (const norm of ['linf', 'l2'] as const) {
        it(`${netName} net, ${norm}: points in the threat model, flags match argmax, progress, memory flat`, async () => {
          const { net, batch, problem, labels, dim } = await caseFor(netName, norm);
          const before = tf.memory().numTensors;
          const flips: Record<string, number> = {};
          for (const variant of VARIANTS) {
            const seen: [number, number][] = [];
            const { out, adv } = await run(variant, problem, 5, undefined, (done, total) => seen.push([done, total]));
            const predicted = tf.tidy(() => argmaxRows(net.logits(out.adv)));
            out.adv.dispose();
            const what = describeVariant(variant);
            for (const [n, d] of deltaNorms(adv, batch.pixels, dim).entries()) {
              // Definition of the threat model: ‖δ‖∞ ≤ ε (float32 rounding allowance 1e-6) / ‖δ‖₂ ≤ ε(1 + 1e-5).
              if (norm === 'linf') expect(d.linf, `${what} sample ${n}`).toBeLessThanOrEqual(BUDGET.linf + 1e-6);
              else expect(d.l2, `${what} sample ${n}`).toBeLessThanOrEqual(BUDGET.l2 * (1 + 1e-5));
            }
            // Pixel box [0, 1].
            expect(adv.every((v) => v >= 0 && v <= 1), what).toBe(true);
            // The flags are the model's own verdict at the returned points.
            expect(Array.from(out.flipped), what).toEqual(Array.from(predicted, (p, n) => (p !== labels[n] ? 1 : 0)));
            // Progress (attacks/types.ts ProgressFn): done only grows and the last call has done === total.
            expect(seen.length, what).toBeGreaterThan(0);
            seen.forEach(([done], i) => expect(done, what).toBeGreaterThan(i === 0 ? 0 : seen[i - 1]![0]));
            expect(seen[seen.length - 1]![0], what).toBe(seen[seen.length - 1]![1]);
            expect(out.gradientEvaluations, what).toBeGreaterThan(0);
            flips[what] = (flips[what] ?? 0) + out.flipped.reduce((s, f) => s + f, 0);
          }
          // Not vacuous: these budgets flip samples of these nets for every untargeted search but the noise baseline.
          const untargeted = VARIANTS.filter((v) => v.id !== 'noise' && v.options['target'] === undefined);
          for (const variant of untargeted) expect(flips[describeVariant(variant)], describeVariant(variant)).toBeGreaterThan(0);
          expect(tf.memory().numTensors).toBe(before);
        });
      }
    }

    it('one seed gives identical bytes; another seed changes the random searches', async () => {
      for (const norm of ['linf', 'l2'] as const) {
        const problem = problemFor('conv', norm);
        for (const variant of VARIANTS) {
          const runs = [];
          for (const seed of [7, 7, 8]) {
            const { out, adv } = await run(variant, problem, seed);
            out.adv.dispose();
            runs.push({ bytes: new Uint8Array(adv.buffer), flipped: out.flipped });
          }
          const what = `${describeVariant(variant)} ${norm}`;
          expect(Buffer.compare(runs[0]!.bytes, runs[1]!.bytes), what).toBe(0);
          expect(Array.from(runs[0]!.flipped), what).toEqual(Array.from(runs[1]!.flipped));
          if (variant.random) expect(Buffer.compare(runs[0]!.bytes, runs[2]!.bytes), what).not.toBe(0);
        }
      }
    });

    it('an aborted signal stops every search with an AbortError and leaks no tensors', async () => {
      const problem = problemFor('dense', 'linf');
      const long: Variant[] = [
        { id: 'apgd-ce', options: { steps: 50, restarts: 3 }, random: true },
        { id: 'apgd-dlr', options: { steps: 50 }, random: true },
        { id: 'square', options: { queries: 500 }, random: true },
        { id: 'deepfool', options: { maxIterations: 50, overshoot: 0 }, random: false },
        { id: 'noise', options: { draws: 50 }, random: true },
      ];
      const before = tf.memory().numTensors;
      for (const variant of long) {
        const what = describeVariant(variant);
        const early = new AbortController();
        early.abort();
        await expect(run(variant, problem, 1, early.signal), what).rejects.toMatchObject({ name: 'AbortError' });
        const midway = new AbortController();
        let calls = 0;
        await expect(
          run(variant, problem, 1, midway.signal, () => {
            calls++;
            if (calls === 1) midway.abort();
          }),
          what,
        ).rejects.toMatchObject({ name: 'AbortError' });
        // Stopped at the first check after the step that saw the abort.
        expect(calls, what).toBe(1);
      }
      expect(tf.memory().numTensors).toBe(before);
    });
  });
}
