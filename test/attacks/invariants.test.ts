/**
 * Contract checks on small seeded nets (a conv net and a dense net), on both backends: every
 * returned point lies in the threat model (definition of the L∞/L2 ball and the [0,1] pixel box), the
 * flipped flags agree with the model's own argmax at the returned points, one seed gives identical
 * bytes, memory stays flat, and an aborted signal stops PGD with an AbortError (DOM AbortSignal spec).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { BACKENDS, useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import type { AttackId, AttackMethod, AttackOutcome, AttackProblem, TargetMode } from '../../src/core/attacks/types.ts';
import type { Norm } from '../../src/core/types.ts';
import { argmaxRows, tinyConvNet, tinyDenseNet, type TinyNet } from './models.ts';

const N = 16;
const BUDGET: Record<Norm, number> = { linf: 0.08, l2: 0.6 };
const TARGETS: TargetMode[] = [{ kind: 'untargeted' }, { kind: 'class', classIndex: 1 }, { kind: 'least-likely' }];

interface Batch {
  readonly x: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly pixels: Float32Array;
  dispose(): void;
}

/** Random images labelled with the net's own clean prediction (so every sample is clean-correct). */
function makeBatch(net: TinyNet, seed: number): Batch {
  const pixels = createRng(seed).uniformArray(N * net.shape[0] * net.shape[1] * net.shape[2], 0, 1);
  const x = tf.tensor4d(pixels, [N, ...net.shape]);
  const labels = tf.tensor1d(tf.tidy(() => argmaxRows(net.logits(x))), 'int32');
  return { x, labels, pixels, dispose: () => tf.dispose([x, labels]) };
}

function norms(adv: Float32Array, clean: Float32Array, dim: number): { linf: number; l2: number }[] {
  return Array.from({ length: adv.length / dim }, (_, n) => {
    let linf = 0;
    let sq = 0;
    for (let i = n * dim; i < (n + 1) * dim; i++) {
      const d = adv[i]! - clean[i]!;
      linf = Math.max(linf, Math.abs(d));
      sq += d * d;
    }
    return { linf, l2: Math.sqrt(sq) };
  });
}

async function runOnce(attack: AttackMethod<unknown>, options: Record<string, unknown>, problem: AttackProblem, seed: number): Promise<{ out: AttackOutcome; adv: Float32Array }> {
  const out = await attack.run(problem, attack.meta.validate(options), { rng: createRng(seed) });
  return { out, adv: new Float32Array(await out.adv.data()) };
}

const PGD_OPTIONS = { steps: 5, restarts: 2 };

for (const backend of BACKENDS) {
  describe(`attack invariants on ${backend}`, () => {
    const nets: Record<string, TinyNet> = {};
    const batches: Record<string, Batch> = {};
    beforeAll(async () => {
      await useBackend(backend);
      nets['conv'] = tinyConvNet(31);
      nets['dense'] = tinyDenseNet(32);
      for (const [name, net] of Object.entries(nets)) batches[name] = makeBatch(net, 40 + name.length);
    });
    afterAll(() => {
      Object.values(batches).forEach((b) => b.dispose());
      Object.values(nets).forEach((n) => n.dispose());
    });

    const variants: { id: AttackId; options: Record<string, unknown> }[] = [
      { id: 'fgsm', options: {} },
      { id: 'pgd', options: { ...PGD_OPTIONS, randomStart: true } },
      { id: 'pgd', options: { steps: 5, randomStart: false, loss: 'margin' } },
    ];
    for (const netName of ['conv', 'dense']) {
      for (const norm of ['linf', 'l2'] as const) {
        it(`${netName} net, ${norm}: points in the threat model, flags match argmax, memory flat`, async () => {
          const net = nets[netName]!;
          const batch = batches[netName]!;
          const problem: AttackProblem = { logits: net.logits, x: batch.x, labels: batch.labels, eps: BUDGET[norm], norm };
          const labels = await batch.labels.data();
          const dim = net.shape[0] * net.shape[1] * net.shape[2];
          const before = tf.memory().numTensors;
          let pgdFlips = 0;
          for (const { id, options } of variants) {
            for (const target of TARGETS) {
              const { out, adv } = await runOnce(getAttack(id), { ...options, target }, problem, 5);
              const predicted = tf.tidy(() => argmaxRows(net.logits(out.adv)));
              out.adv.dispose();
              const what = `${id} ${JSON.stringify(options)} ${target.kind}`;
              for (const [n, d] of norms(adv, batch.pixels, dim).entries()) {
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
      const net = nets['conv']!;
      const batch = batches['conv']!;
      for (const norm of ['linf', 'l2'] as const) {
        const problem: AttackProblem = { logits: net.logits, x: batch.x, labels: batch.labels, eps: BUDGET[norm], norm };
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
      const net = nets['dense']!;
      const batch = batches['dense']!;
      const problem: AttackProblem = { logits: net.logits, x: batch.x, labels: batch.labels, eps: BUDGET.linf, norm: 'linf' };
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
