/**
 * Gathers the evidence for the health checks from a finished sweep, running the extra searches the
 * checks need: the reference search at a budget large enough to reach flat grey, with doubled steps
 * and with added restarts, afresh at the largest budget, FGSM, random noise and the Square attack
 * (each only when the sweep did not already run it).
 */
import * as tf from '@tensorflow/tfjs';
import type { AttackId } from '../attacks/types.ts';
import { getAttack } from '../attacks/registry.ts';
import type { SweepResult } from '../sweep/types.ts';
import type { OutputKind } from '../types.ts';
import { defaultMaxEps } from '../flips/defaults.ts';
import { countOnes, indicesOf, robustMask, runExtra, type ExtraRunContext } from './extraRuns.ts';
import { measureGradients, measureSaturation } from './measure.ts';
import type { HealthEvidence, PairedCount } from './types.ts';

/** Gradient-based iterative searches, strongest first when robust accuracies tie. */
const ITERATIVE: readonly AttackId[] = ['apgd-ce', 'apgd-dlr', 'pgd'];

export interface CollectInput extends ExtraRunContext {
  readonly sweep: SweepResult;
  readonly outputKind: OutputKind;
  /** The model's own outputs on pixels (probabilities for a probability model), for the saturation check. */
  readonly rawOutputs?: ExtraRunContext['logits'];
  /** Options of the searches added for the checks when the sweep lacks them (validated by each search). */
  readonly squareOptions?: Readonly<Record<string, unknown>>;
  readonly noiseOptions?: Readonly<Record<string, unknown>>;
}

type Spec = { readonly id: AttackId; readonly options: Readonly<Record<string, unknown>> };

/** Run what the checks need and return the evidence (plain data). */
export async function collectHealthEvidence(input: CollectInput): Promise<HealthEvidence> {
  const { sweep, samples } = input;
  const n = samples.labels.length;
  const positive = [...sweep.config.eps].filter((e) => e > 0).sort((a, b) => a - b);
  const gradients = await measureGradients(input.logits, samples, input.batchSize);
  const saturation = await saturationEvidence(input);
  const base = { norm: input.norm, samples: n, constantShare: constantShare(samples.labels), gradients, saturation };
  const epsMax = positive[positive.length - 1];
  if (epsMax === undefined) {
    return { ...base, reference: null, monotone: null, largeBudget: null, singleStep: [], gradientFree: null, convergence: null, noise: [] };
  }
  const ref = await referenceRun(input, positive);
  return {
    ...base,
    reference: ref.spec.id,
    monotone: await monotoneEvidence(input, ref.spec, ref.result, epsMax, positive),
    largeBudget: await largeBudgetEvidence(input, ref.spec),
    singleStep: await singleStepEvidence(input, ref, positive),
    gradientFree: await pairedWith(input, ref, { id: 'square', options: input.squareOptions ?? {} }, [epsMax], 4).then((p) => p[0] ?? null),
    convergence: await convergenceEvidence(input, ref, positive),
    noise: await pairedWith(input, ref, { id: 'noise', options: input.noiseOptions ?? {} }, positive, 5),
  };
}

function constantShare(labels: Int32Array): number {
  const counts = new Map<number, number>();
  for (const y of labels) counts.set(y, (counts.get(y) ?? 0) + 1);
  return labels.length === 0 ? 0 : Math.max(...counts.values()) / labels.length;
}

async function saturationEvidence(input: CollectInput): Promise<HealthEvidence['saturation']> {
  if (input.outputKind === 'logits') {
    const logits = input.logits;
    const m = await measureSaturation((x) => tf.softmax(logits(x)), input.samples, input.batchSize);
    return { outputKind: 'logits', ...m };
  }
  if (input.rawOutputs === undefined) return null;
  const m = await measureSaturation(input.rawOutputs, input.samples, input.batchSize);
  return { outputKind: 'probabilities', ...m };
}

interface Reference {
  readonly spec: Spec;
  /** A sweep over all samples that holds the reference's outcomes at every positive budget. */
  readonly result: SweepResult;
}

/** The sweep's strongest gradient-based iterative search (lowest robust count at its largest budget), or PGD run for the checks. */
async function referenceRun(input: CollectInput, positive: readonly number[]): Promise<Reference> {
  const epsMax = positive[positive.length - 1]!;
  const candidates = input.sweep.config.attacks.filter((a) => ITERATIVE.includes(a.id));
  const robustAt = (id: AttackId): number => input.sweep.curve.find((p) => p.attack === id && p.eps === epsMax)?.robust ?? Number.POSITIVE_INFINITY;
  const best = [...candidates].sort((a, b) => robustAt(a.id) - robustAt(b.id) || ITERATIVE.indexOf(a.id) - ITERATIVE.indexOf(b.id))[0];
  if (best !== undefined && input.sweep.complete) return { spec: best, result: input.sweep };
  const resolve = input.resolveAttack ?? getAttack;
  const spec: Spec = best ?? { id: 'pgd', options: resolve('pgd').meta.validate({}) as Record<string, unknown> };
  return { spec, result: await runExtra(input, `${spec.id} over the sweep's budgets`, spec, positive, 1) };
}

/** Samples the reference flipped at a smaller budget, searched afresh at the largest one. */
async function monotoneEvidence(input: CollectInput, spec: Spec, result: SweepResult, epsMax: number, positive: readonly number[]): Promise<HealthEvidence['monotone']> {
  const atMax = robustMask(result, spec.id, epsMax);
  const smaller = positive.filter((e) => e < epsMax).map((e) => robustMask(result, spec.id, e));
  const clean = Uint8Array.from(result.records, (r) => (r.cleanPred === r.label ? 1 : 0));
  const flippedBefore = indicesOf(Uint8Array.from(atMax, (robust, i) => (clean[i] === 1 && robust === 0 && smaller.some((m) => m[i] === 0) ? 1 : 0)));
  if (flippedBefore.length === 0) return { eps: epsMax, flippedBefore: 0, resisted: 0 };
  const fresh = await runExtra(input, `${spec.id} afresh at the largest budget`, spec, [epsMax], 2, flippedBefore);
  return { eps: epsMax, flippedBefore: flippedBefore.length, resisted: countOnes(robustMask(fresh, spec.id, epsMax)) };
}

/** The reference at the budget within which every image can become flat grey. */
async function largeBudgetEvidence(input: CollectInput, spec: Spec): Promise<HealthEvidence['largeBudget']> {
  const { samples } = input;
  const eps = defaultMaxEps(input.norm, samples.height * samples.width * samples.channels);
  const run = await runExtra(input, `${spec.id} at the flat-grey budget`, spec, [eps], 3);
  return { eps, robust: countOnes(robustMask(run, spec.id, eps)) };
}

/** A search's outcomes at `eps`: from the sweep when it ran it completely, otherwise run now. */
async function outcomesOf(input: CollectInput, spec: Spec, eps: readonly number[], seedOffset: number): Promise<{ id: AttackId; result: SweepResult }> {
  const inSweep = input.sweep.config.attacks.find((a) => a.id === spec.id);
  if (inSweep !== undefined && input.sweep.complete) return { id: spec.id, result: input.sweep };
  return { id: spec.id, result: await runExtra(input, `${spec.id} for the checks`, spec, eps, seedOffset) };
}

/** Paired robust counts of the reference and another search at each budget. */
async function pairedWith(input: CollectInput, ref: Reference, spec: Spec, eps: readonly number[], seedOffset: number): Promise<PairedCount[]> {
  const other = await outcomesOf(input, spec, eps, seedOffset);
  return eps.map((e) => paired(robustMask(ref.result, ref.spec.id, e), robustMask(other.result, other.id, e), e));
}

function paired(reference: Uint8Array, other: Uint8Array, eps: number): PairedCount {
  let otherOnly = 0;
  for (let i = 0; i < reference.length; i++) if (other[i] === 0 && reference[i] === 1) otherOnly++;
  return { eps, samples: reference.length, referenceRobust: countOnes(reference), otherRobust: countOnes(other), otherOnly };
}

/** Every iterative search of the sweep (and the reference) against FGSM, per budget. */
async function singleStepEvidence(input: CollectInput, ref: Reference, positive: readonly number[]): Promise<HealthEvidence['singleStep']> {
  const fgsm = await outcomesOf(input, { id: 'fgsm', options: {} }, positive, 6);
  const iterative: Reference[] = input.sweep.complete
    ? input.sweep.config.attacks.filter((a) => ITERATIVE.includes(a.id)).map((spec) => ({ spec, result: input.sweep }))
    : [];
  if (!iterative.some((r) => r.spec.id === ref.spec.id)) iterative.push(ref);
  return iterative.flatMap((it) =>
    positive.map((e) => ({ attack: it.spec.id, ...paired(robustMask(it.result, it.spec.id, e), robustMask(fgsm.result, fgsm.id, e), e) })),
  );
}

/**
 * New flips among the reference's robust samples at the budget where its robust accuracy is closest
 * to half the clean accuracy (the steepest part of the curve), with doubled steps and with two
 * more restarts.
 */
async function convergenceEvidence(input: CollectInput, ref: Reference, positive: readonly number[]): Promise<HealthEvidence['convergence']> {
  const clean = ref.result.records.filter((r) => r.cleanPred === r.label).length;
  const eps = [...positive].sort((a, b) => Math.abs(countOnes(robustMask(ref.result, ref.spec.id, a)) - clean / 2) - Math.abs(countOnes(robustMask(ref.result, ref.spec.id, b)) - clean / 2) || a - b)[0]!;
  const robust = indicesOf(robustMask(ref.result, ref.spec.id, eps));
  const base = { eps, referenceRobust: robust.length };
  const options = ref.spec.options;
  const steps = typeof options['steps'] === 'number' ? options['steps'] : null;
  const restarts = typeof options['restarts'] === 'number' && options['randomStart'] !== false ? options['restarts'] : null;
  if (robust.length === 0) return { ...base, doubledSteps: steps === null ? null : 0, addedRestarts: restarts === null ? null : 0 };
  const newFlips = async (what: string, changed: Record<string, unknown>, offset: number): Promise<number> => {
    const run = await runExtra(input, what, { id: ref.spec.id, options: { ...options, ...changed } }, [eps], offset, robust);
    return robust.length - countOnes(robustMask(run, ref.spec.id, eps));
  };
  return {
    ...base,
    doubledSteps: steps === null ? null : await newFlips(`${ref.spec.id} with ${2 * steps} steps`, { steps: 2 * steps }, 7),
    addedRestarts: restarts === null ? null : await newFlips(`${ref.spec.id} with ${restarts + 2} restarts`, { restarts: restarts + 2 }, 8),
  };
}
