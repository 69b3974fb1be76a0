/**
 * The health checks end to end: run the extra searches on the sweep's model and samples, then judge.
 */
import type { AttackId, AttackMethod } from '../attacks/types.ts';
import type { SweepResult } from '../sweep/types.ts';
import type { LogitsFn, OutputKind, SampleSet } from '../types.ts';
import { collectHealthEvidence } from './collect.ts';
import { evaluateHealth } from './evaluate.ts';
import type { HealthCheck, HealthEvidence } from './types.ts';

export interface HealthInput {
  readonly logits: LogitsFn;
  /** The samples the sweep ran on. */
  readonly samples: SampleSet;
  /** The finished sweep; its configuration (norm, budgets, searches, seed, batch size) drives the checks. */
  readonly sweep: SweepResult;
  /** Whether the model's last layer gives logits or probabilities (ModelDescription.outputKind). */
  readonly outputKind: OutputKind;
  /** The model's own outputs on pixels (e.g. makeLogitsFn(model, pre, 'logits')), for the saturation check of probability models. */
  readonly rawOutputs?: LogitsFn;
  /** Options for Square and random noise when the sweep did not run them (each search validates its own). */
  readonly squareOptions?: Readonly<Record<string, unknown>>;
  readonly noiseOptions?: Readonly<Record<string, unknown>>;
  readonly resolveAttack?: (id: AttackId) => AttackMethod<unknown>;
  readonly signal?: AbortSignal;
  /** Called after each extra search with a short description of it. */
  readonly onStep?: (what: string) => void;
}

export interface HealthReport {
  readonly checks: readonly HealthCheck[];
  readonly evidence: HealthEvidence;
}

/** Run the extra searches the checks need and return the eight checks with their evidence. */
export async function runHealthChecks(input: HealthInput): Promise<HealthReport> {
  const { sweep } = input;
  const evidence = await collectHealthEvidence({
    logits: input.logits,
    samples: input.samples,
    norm: sweep.config.norm,
    seed: sweep.config.seed,
    batchSize: sweep.config.batchSize,
    sweep,
    outputKind: input.outputKind,
    ...(input.rawOutputs !== undefined ? { rawOutputs: input.rawOutputs } : {}),
    ...(input.squareOptions !== undefined ? { squareOptions: input.squareOptions } : {}),
    ...(input.noiseOptions !== undefined ? { noiseOptions: input.noiseOptions } : {}),
    ...(input.resolveAttack !== undefined ? { resolveAttack: input.resolveAttack } : {}),
    ...(input.signal !== undefined ? { signal: input.signal } : {}),
    ...(input.onStep !== undefined ? { onRun: input.onStep } : {}),
  });
  return { checks: evaluateHealth(evidence), evidence };
}
