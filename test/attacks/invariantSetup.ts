/**
 * Set-up shared by the attack invariant tests: the two small seeded nets of models.ts (conv and dense)
 * with a batch of random images each, labelled with the net's own clean prediction (so every sample
 * is clean-correct), and the achieved perturbation sizes of returned points.
 */
import { afterAll, beforeAll } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from '../helpers/backend.ts';
import { createRng } from '../../src/core/random/rng.ts';
import type { AttackProblem } from '../../src/core/attacks/types.ts';
import type { Norm } from '../../src/core/types.ts';
import { argmaxRows, tinyConvNet, tinyDenseNet, type TinyNet } from './models.ts';

/** Images per batch. */
const N = 16;

/** The budget of every invariant check, per norm. */
export const BUDGET: Record<Norm, number> = { linf: 0.08, l2: 0.6 };

export interface Batch {
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

/** One net × norm case of the threat-model checks. */
export interface InvariantCase {
  readonly net: TinyNet;
  readonly batch: Batch;
  readonly problem: AttackProblem;
  /** The batch's labels, read back. */
  readonly labels: ArrayLike<number>;
  /** Pixels per sample. */
  readonly dim: number;
}

/** The nets 'conv' and 'dense' with their batches (built by beforeAll). */
export interface TinyNetBatches {
  /** The attack problem on a net's batch at the BUDGET of `norm`. */
  problemFor(netName: string, norm: Norm): AttackProblem;
  /** The net, its batch, the problem at the BUDGET of `norm`, the labels read back and the pixels per sample. */
  caseFor(netName: string, norm: Norm): Promise<InvariantCase>;
}

/** Registers beforeAll/afterAll in the calling describe block: start `backend`, build the nets and their batches, dispose them afterwards. */
export function useTinyNetBatches(backend: 'wasm' | 'cpu'): TinyNetBatches {
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
  const problemFor = (netName: string, norm: Norm): AttackProblem => {
    const net = nets[netName]!;
    const batch = batches[netName]!;
    return { logits: net.logits, x: batch.x, labels: batch.labels, eps: BUDGET[norm], norm };
  };
  const caseFor = async (netName: string, norm: Norm): Promise<InvariantCase> => {
    const net = nets[netName]!;
    const batch = batches[netName]!;
    const problem = problemFor(netName, norm);
    const labels = await batch.labels.data();
    return { net, batch, problem, labels, dim: net.shape[0] * net.shape[1] * net.shape[2] };
  };
  return { problemFor, caseFor };
}

/** ‖δ‖∞ and ‖δ‖₂ (float64) of every sample of adv − clean, for samples of `dim` pixels. */
export function deltaNorms(adv: Float32Array, clean: Float32Array, dim: number): { linf: number; l2: number }[] {
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
