/**
 * Flip budgets over a sample set: for every sample the smallest ε at which the chosen search flips it
 * (bisect.ts), or DeepFool's estimate of it. Samples misclassified clean get 0 and are not searched.
 */
import * as tf from '@tensorflow/tfjs';
import { createRng } from '../random/rng.ts';
import type { LogitsFn, SampleSet } from '../types.ts';
import { gatherBatch, predict } from '../sweep/evaluate.ts';
import { bisectBatch, type BisectionRows } from './bisect.ts';
import { medianFlipEps } from './curve.ts';
import { checkBisectionSettings } from './defaults.ts';
import { makeFlipSearch, validateFlipOptions, type AttackLookup, type FlipSearch } from './searches.ts';
import type { FlipBudgetConfig, FlipBudgetResult, FlipProgress, FlipRecord } from './types.ts';

export interface FlipBudgetInput {
  readonly logits: LogitsFn;
  readonly samples: SampleSet;
  readonly config: FlipBudgetConfig;
  /** Defaults to the attack registry. */
  readonly resolveAttack?: AttackLookup;
}

export interface FlipBudgetHooks {
  /** Aborting stops promptly; the result then holds the finished samples and complete = false. */
  readonly signal?: AbortSignal;
  readonly onProgress?: (p: FlipProgress) => void;
}

/** Measure every sample's flip budget. Throws an Error naming the problem for a bad configuration. */
export async function runFlipBudgets(input: FlipBudgetInput, hooks: FlipBudgetHooks = {}): Promise<FlipBudgetResult> {
  const { samples } = input;
  checkConfig(input.config);
  // The result records the options as the search completed them, so a run can be repeated exactly.
  const config: FlipBudgetConfig = { ...input.config, options: validateFlipOptions(input.config.search, input.config.options, input.resolveAttack) };
  const search = makeFlipSearch(config, input.resolveAttack);
  const startedAt = new Date().toISOString();
  const records: FlipRecord[] = [];
  const n = samples.labels.length;
  let probes = 0;
  let complete = true;
  try {
    for (let start = 0, batch = 0; start < n; start += config.batchSize, batch++) {
      await checkpoint(hooks.signal);
      const indices = Array.from({ length: Math.min(config.batchSize, n - start) }, (_, i) => start + i);
      const onProbe = (): void => {
        probes++;
        hooks.onProgress?.({ done: records.length, total: n, probes });
      };
      records.push(...(await batchRecords(input, search, indices, batch, hooks.signal, onProbe)));
      hooks.onProgress?.({ done: records.length, total: n, probes });
    }
  } catch (err) {
    if (hooks.signal?.aborted !== true) throw err;
    complete = false;
  }
  return {
    config,
    samples: n,
    cleanCorrect: records.filter((r) => r.cleanPred === r.label).length,
    records,
    medianFlipEps: medianFlipEps(records),
    complete,
    startedAt,
    endedAt: new Date().toISOString(),
  };
}

function checkConfig(config: FlipBudgetConfig): void {
  checkBisectionSettings(config.maxEps, config.tol);
  if (!Number.isInteger(config.batchSize) || config.batchSize < 1) throw new Error(`batchSize must be a positive integer, got ${config.batchSize}.`);
  if (!Number.isSafeInteger(config.seed)) throw new Error(`seed must be an integer, got ${config.seed}.`);
}

async function batchRecords(
  input: FlipBudgetInput,
  search: FlipSearch,
  indices: readonly number[],
  batch: number,
  signal: AbortSignal | undefined,
  onProbe: () => void,
): Promise<FlipRecord[]> {
  const { samples, logits } = input;
  const all = gatherBatch(samples, indices);
  let cleanPred: Int32Array;
  try {
    cleanPred = (await predict(logits, all.x)).pred;
  } finally {
    tf.dispose([all.x, all.labels]);
  }
  const correct = indices.filter((s, row) => cleanPred[row] === samples.labels[s]);
  const measured = correct.length === 0 ? null : await measureRows(input, search, correct, batch, signal, onProbe);
  return indices.map((sample, row) => {
    const base = { index: sample, file: samples.files[sample] ?? String(sample), label: samples.labels[sample]!, cleanPred: cleanPred[row]! };
    const at = correct.indexOf(sample);
    if (at < 0 || measured === null) return { ...base, flipEps: 0, failedEps: 0, advPred: cleanPred[row]!, probes: 0 };
    return { ...base, flipEps: measured.flipEps[at]!, failedEps: measured.failedEps[at]!, advPred: measured.advPred[at]!, probes: measured.probes[at]! };
  });
}

/** Flip budgets of the clean-correct rows of one batch. */
async function measureRows(
  input: FlipBudgetInput,
  search: FlipSearch,
  rows: readonly number[],
  batch: number,
  signal: AbortSignal | undefined,
  onProbe: () => void,
): Promise<BisectionRows> {
  const { samples, logits, config } = input;
  const { x, labels } = gatherBatch(samples, rows);
  const rng = createRng(config.seed).fork(batch);
  try {
    if (search.kind === 'estimate') {
      const estimated = await search.estimate({ logits, x, labels, norm: config.norm, maxEps: config.maxEps, rng, ...(signal !== undefined ? { signal } : {}) });
      onProbe();
      return estimated;
    }
    return await bisectBatch({
      logits,
      x,
      labels,
      norm: config.norm,
      maxEps: config.maxEps,
      tol: config.tol,
      probe: search.probe,
      rng,
      onProbe,
      ...(signal !== undefined ? { signal } : {}),
    });
  } finally {
    x.dispose();
    labels.dispose();
  }
}

/** Let queued events (a worker's cancel message) run, then stop if aborted. */
async function checkpoint(signal: AbortSignal | undefined): Promise<void> {
  await new Promise<void>((resolve) => setTimeout(resolve, 0));
  signal?.throwIfAborted();
}
