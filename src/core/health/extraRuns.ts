/**
 * Small helpers for the extra searches the health checks run: each is an ordinary sweep over (a
 * subset of) the samples, and its verdicts are read from the per-sample records.
 */
import type { AttackId, AttackMethod } from '../attacks/types.ts';
import { runSweep } from '../sweep/runSweep.ts';
import type { SweepResult } from '../sweep/types.ts';
import type { LogitsFn, Norm, SampleSet } from '../types.ts';

export interface ExtraRunContext {
  readonly logits: LogitsFn;
  readonly samples: SampleSet;
  readonly norm: Norm;
  readonly seed: number;
  readonly batchSize: number;
  readonly resolveAttack?: (id: AttackId) => AttackMethod<unknown>;
  readonly signal?: AbortSignal;
  /** Called once per finished extra run, with a short name of what ran. */
  readonly onRun?: (what: string) => void;
}

/** The samples at `indices`, in that order. */
export function subsetSamples(samples: SampleSet, indices: readonly number[]): SampleSet {
  const size = samples.height * samples.width * samples.channels;
  const pixels = new Float32Array(indices.length * size);
  indices.forEach((s, row) => pixels.set(samples.pixels.subarray(s * size, (s + 1) * size), row * size));
  return {
    ...samples,
    files: indices.map((s) => samples.files[s] ?? String(s)),
    labels: Int32Array.from(indices, (s) => samples.labels[s]!),
    pixels,
  };
}

/** Run one search at the given budgets over the samples at `indices` (all samples when omitted). */
export async function runExtra(
  ctx: ExtraRunContext,
  what: string,
  attack: { readonly id: AttackId; readonly options: Readonly<Record<string, unknown>> },
  eps: readonly number[],
  seedOffset: number,
  indices?: readonly number[],
): Promise<SweepResult> {
  const samples = indices === undefined ? ctx.samples : subsetSamples(ctx.samples, indices);
  const result = await runSweep(
    {
      logits: ctx.logits,
      samples,
      config: { attacks: [attack], norm: ctx.norm, eps: [...eps], seed: ctx.seed + 7919 * seedOffset, batchSize: ctx.batchSize },
      ...(ctx.resolveAttack !== undefined ? { resolveAttack: ctx.resolveAttack } : {}),
    },
    ctx.signal !== undefined ? { signal: ctx.signal } : {},
  );
  // runSweep resolves with complete = false on abort; the checks must not read a partial run.
  if (!result.complete) ctx.signal?.throwIfAborted();
  ctx.onRun?.(what);
  return result;
}

/** 1 per record where the sample is correct clean and `attack` did not flip it at `eps`. */
export function robustMask(result: SweepResult, attack: AttackId, eps: number): Uint8Array {
  return Uint8Array.from(result.records, (r) => {
    if (r.cleanPred !== r.label) return 0;
    const outcome = r.outcomes.find((o) => o.attack === attack && o.eps === eps);
    if (outcome === undefined) throw new Error(`No ${attack} outcome at ε = ${eps} in the sweep.`);
    return outcome.flipped ? 0 : 1;
  });
}

/** Number of ones. */
export function countOnes(mask: ArrayLike<number>): number {
  let n = 0;
  for (let i = 0; i < mask.length; i++) if (mask[i] !== 0) n++;
  return n;
}

/** Indices where the mask is 1. */
export function indicesOf(mask: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let i = 0; i < mask.length; i++) if (mask[i] !== 0) out.push(i);
  return out;
}
