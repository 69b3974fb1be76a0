/**
 * Contract checks on small seeded nets (a conv net and a dense net), on both backends: every
 * returned point lies in the threat model (definition of the L∞/L2 ball and the [0,1] pixel box), the
 * flipped flags agree with the model's own argmax at the returned points, one seed gives identical
 * bytes, memory stays flat, and an aborted signal stops PGD with an AbortError (DOM AbortSignal spec).
 */
import { describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import type { AttackId, AttackMethod, AttackOutcome, AttackProblem, TargetMode } from '../../src/core/attacks/types.ts';
import { argmaxRows } from './models.ts';
import { BUDGET, deltaNorms, useTinyNetBatches } from './invariantSetup.ts';

const TARGETS: TargetMode[] = [{ kind: 'untargeted' }, { kind: 'class', classIndex: 1 }, { kind: 'least-likely' }];

async function runOnce(attack: AttackMethod<unknown>, options: Record<string, unknown>, problem: AttackProblem, seed: number): Promise<{ out: AttackOutcome; adv: Float32Array }> {
  const out = await attack.run(problem, attack.meta.validate(options), { rng: createRng(seed) });
  return { out, adv: new Float32Array(await out.adv.data()) };
}

const PGD_OPTIONS = { steps: 5, restarts: 2 };

for (const backend of BACKENDS) {
  describe(`attack invariants on ${backend}`, () => {
    const { problemFor, caseFor } = useTinyNetBatches(backend);

    const variants: { id: AttackId; options: Record<string, unknown> }[] = [
      { id: 'fgsm', options: {} },
      { id: 'pgd', options: { ...PGD_OPTIONS, randomStart: true } },
      { id: 'pgd', options: { steps: 5, randomStart: false, loss: 'margin' } },
    ];
    for (const netName of ['conv', 'dense']) {
      for (const norm of ['linf', 'l2'] as const) {
        it(`${netName} net, ${norm}: points in the threat model, flags match argmax, memory flat`, async () => {
          const { net, batch, problem, labels, dim } = await caseFor(netName, norm);
          const before = tf.memory().numTensors;
          let pgdFlips = 0;
          for (const { id, options } of variants) {
            for (const target of TARGETS) {
              const { out, adv } = await runOnce(getAttack(id), { ...options, target }, problem, 5);
              const predicted = tf.tidy(() => argmaxRows(net.logits(out.adv)));
              out.adv.dispose();
              const what = `${id} ${JSON.stringify(options)} ${target.kind}`;
              for (const [n, d] of deltaNorms(adv, batch.pixels, dim).entries()) {
                // Definition of the threat model: ‖δ‖∞ ≤ ε (float32 rounding allowance 1e-6) / ‖δ‖₂ ≤ ε(1 + 1e-5).
                if (norm === 'linf') expect(d.linf, `${what} sample ${n}`).toBeLessThanOrEqual(BUDGET.linf + 1e-6);
                else expect(d.l2, `${what} sample ${n}`).toBeLessThanOrEqual(BUDGET.l2 * (1 + 1e-5));
              }
              // Pixel box [0, 1].
              expect(adv.every((v) => v >= 0 && v <= 1), what).toBe(true);
              // The flags are the model's own verdict at the returned points.
              expect(Array.from(out.flipped), what).toEqual(Array.from(predicted, (p, n) => (p !== labels[n] ? 1 : 0)));
              if (id === 'pgd' && target.kind === 'untargeted') pgdFlips += out.flipped.reduce((s, f) => s + f, 0);
            }
          }
          // Not a vacuous check: these budgets do flip samples of these nets.
          expect(pgdFlips).toBeGreaterThan(0);
          expect(tf.memory().numTensors).toBe(before);
        });
      }
    }

    it('one seed gives identical bytes, another seed different ones (PGD with random start, both norms)', async () => {
      for (const norm of ['linf', 'l2'] as const) {
        const problem = problemFor('conv', norm);
        const runs = [];
        for (const seed of [7, 7, 8]) {
          const { out, adv } = await runOnce(getAttack('pgd'), PGD_OPTIONS, problem, seed);
          out.adv.dispose();
          runs.push({ bytes: new Uint8Array(adv.buffer), flipped: out.flipped });
        }
        expect(Buffer.compare(runs[0]!.bytes, runs[1]!.bytes)).toBe(0);
        expect(Array.from(runs[0]!.flipped)).toEqual(Array.from(runs[1]!.flipped));
        expect(Buffer.compare(runs[0]!.bytes, runs[2]!.bytes)).not.toBe(0);
      }
    });

    it('an aborted signal stops PGD with an AbortError and leaks no tensors', async () => {
      const problem = problemFor('dense', 'linf');
      const pgd = getAttack('pgd');
      const options = pgd.meta.validate({ steps: 50, restarts: 3 });
      const before = tf.memory().numTensors;
      const early = new AbortController();
      early.abort();
      await expect(pgd.run(problem, options, { rng: createRng(1), signal: early.signal })).rejects.toMatchObject({ name: 'AbortError' });
      const midway = new AbortController();
      const seen: number[] = [];
      const onProgress = (done: number, total: number): void => {
        seen.push(done / total);
        if (seen.length === 3) midway.abort();
      };
      await expect(pgd.run(problem, options, { rng: createRng(1), signal: midway.signal, onProgress })).rejects.toMatchObject({ name: 'AbortError' });
      // Stopped right after the step that saw the abort.
      expect(seen.length).toBe(3);
      expect(tf.memory().numTensors).toBe(before);
    });
  });
}
