/**
 * The sweep: every attack at every budget over a sample set, producing a robustness curve and
 * per-sample records. Budgets of one attack are nested balls, so a sample flipped at ε stays
 * flipped at every larger ε and is not attacked again; only the still-robust samples are re-batched.
 */
import { getAttack } from '../attacks/registry.ts';
import type { AttackId } from '../attacks/types.ts';
import { makeYielder } from '../attacks/control.ts';
import { createRng, type Rng } from '../random/rng.ts';
import type { LogitsFn, SampleSet } from '../types.ts';
import { assertInsideBudget, gatherBatch, predict, readAdversarial } from './evaluate.ts';
import { estimateSweepCost as estimateWith, planSweep, type AttackResolver, type PlannedAttack, type SweepPlan } from './plan.ts';
import { ProgressTracker } from './progress.ts';
import { cleanTable, curvePoint, sampleRecords, startPointTable, stillRobust, type CleanTable, type PointTable } from './tally.ts';
import type { CurvePoint, SweepConfig, SweepProgress, SweepResult } from './types.ts';

export interface SweepInput {
  readonly logits: LogitsFn;
  readonly samples: SampleSet;
  readonly config: SweepConfig;
  /** Defaults to the attack registry (attacks/registry.ts getAttack). */
  readonly resolveAttack?: AttackResolver;
}

export interface SweepHooks {
  /** Aborting stops the sweep promptly; runSweep then resolves with complete = false. */
  readonly signal?: AbortSignal;
  readonly onProgress?: (p: SweepProgress) => void;
  /** Called as each curve point finishes, with the result so far (for drawing partial curves). */
  readonly onPoint?: (point: CurvePoint, partial: SweepResult) => void;
  /** Called with the kept points of every attacked batch (the workbench's gallery and image export). */
  readonly onAdversarial?: (batch: AdversarialBatch) => void;
}

/** The points an attack kept for one batch, as the sweep judged them. */
export interface AdversarialBatch {
  readonly attack: AttackId;
  readonly eps: number;
  /** Sample index of each row. */
  readonly indices: readonly number[];
  /** 1 where the sweep counted the row as flipped. */
  readonly flipped: Uint8Array;
  /** rows·H·W·C values in [0,1], NHWC. */
  readonly pixels: Float32Array;
}

/** Everything one sweep run accumulates. */
interface SweepState {
  readonly input: SweepInput;
  readonly hooks: SweepHooks;
  readonly plan: SweepPlan;
  readonly startedAt: string;
  readonly tables: PointTable[];
  readonly curve: CurvePoint[];
  clean: CleanTable | null;
  progress: ProgressTracker | null;
  /** Gives the event loop a turn at most every few milliseconds. */
  readonly yieldTurn: () => Promise<void>;
}

/**
 * Run the sweep. Resolves with the full result, or with the finished points and complete = false
 * when `hooks.signal` aborts; any other failure rejects. Samples misclassified clean count as not
 * robust and are never attacked. ε = 0 is the clean point itself and is not attacked either.
 */
export async function runSweep(input: SweepInput, hooks: SweepHooks = {}): Promise<SweepResult> {
  checkSampleSet(input.samples);
  const state: SweepState = {
    input,
    hooks,
    plan: planSweep(input.config, input.resolveAttack ?? registryAttack),
    startedAt: new Date().toISOString(),
    tables: [],
    curve: [],
    clean: null,
    progress: null,
    yieldTurn: makeYielder(),
  };
  try {
    await runAll(state);
    return snapshot(state, true);
  } catch (err) {
    if (hooks.signal?.aborted === true) return snapshot(state, false);
    throw err;
  }
}

async function runAll(state: SweepState): Promise<void> {
  const { plan, input, hooks } = state;
  const clean = await cleanPass(state);
  state.clean = clean;
  const positive = plan.budgets.filter((b) => b.eps > 0).length;
  const perSample = plan.attacks.reduce((sum, a) => sum + a.perSample, 0);
  state.progress = new ProgressTracker(clean.correctCount * positive * perSample, hooks.onProgress);
  for (const [attackIndex, attack] of plan.attacks.entries()) {
    let previous: PointTable | null = null;
    for (const [budgetIndex, budget] of plan.budgets.entries()) {
      const table = startPointTable(attack.id, budget.eps, clean, previous);
      if (budget.eps > 0) {
        const remainingPositive = plan.budgets.slice(budgetIndex + 1).filter((b) => b.eps > 0).length;
        const flips = await attackBudget(state, attack, table, stillRobust(clean, previous), { attackIndex, budgetIndex });
        state.progress.dropPlanned(flips * attack.perSample * remainingPositive);
      }
      const point = curvePoint(table, clean, input.config.norm);
      state.tables.push(table);
      state.curve.push(point);
      hooks.onPoint?.(point, snapshot(state, state.curve.length === plan.attacks.length * plan.budgets.length));
      previous = table;
    }
  }
}

/** Clean prediction and confidence for every sample, in batches. */
async function cleanPass(state: SweepState): Promise<CleanTable> {
  const { samples, logits, config } = state.input;
  const n = samples.labels.length;
  const pred = new Int32Array(n);
  const conf = new Float32Array(n);
  for (let start = 0; start < n; start += config.batchSize) {
    await checkpoint(state);
    const indices = range(start, Math.min(n, start + config.batchSize));
    const { x, labels } = gatherBatch(samples, indices);
    try {
      const out = await predict(logits, x);
      pred.set(out.pred, start);
      conf.set(out.conf, start);
    } finally {
      x.dispose();
      labels.dispose();
    }
  }
  return cleanTable(samples.labels, pred, conf);
}

/** Which random stream a batch uses: fixed by (attack, budget) here and by the batch index later. */
interface StreamKey {
  readonly attackIndex: number;
  readonly budgetIndex: number;
}

/**
 * The stream for one batch, a pure function of (seed, attack index, budget index, batch index):
 * each fork starts from a fresh generator, so no stream depends on how much another one consumed.
 */
function batchRng(seed: number, key: StreamKey, batchIndex: number): Rng {
  return createRng(seed).fork(key.attackIndex).fork(key.budgetIndex).fork(batchIndex);
}

/** Attack the still-robust samples at one budget, writing into `table`; returns how many flipped. */
async function attackBudget(state: SweepState, attack: PlannedAttack, table: PointTable, active: readonly number[], key: StreamKey): Promise<number> {
  const { config } = state.input;
  let flips = 0;
  for (let start = 0, batchIndex = 0; start < active.length; start += config.batchSize, batchIndex++) {
    await checkpoint(state);
    const indices = active.slice(start, start + config.batchSize);
    flips += await attackBatch(state, attack, table, indices, batchRng(config.seed, key, batchIndex));
  }
  return flips;
}

async function attackBatch(state: SweepState, attack: PlannedAttack, table: PointTable, indices: readonly number[], rng: Rng): Promise<number> {
  const { samples, logits, config } = state.input;
  const progress = state.progress!;
  const planned = indices.length * attack.perSample;
  const { x, labels } = gatherBatch(samples, indices);
  try {
    const outcome = await attack.method.run({ logits, x, labels, eps: table.eps, norm: config.norm }, attack.options, {
      rng,
      ...(state.hooks.signal !== undefined ? { signal: state.hooks.signal } : {}),
      onProgress: (done, total) => progress.within(planned, total > 0 ? done / total : 0, attack.id, table.eps),
    });
    let readout;
    let keptPixels: Float32Array | null = null;
    try {
      readout = await readAdversarial(logits, x, outcome.adv);
      if (state.hooks.onAdversarial !== undefined) keptPixels = new Float32Array(await outcome.adv.data());
    } finally {
      outcome.adv.dispose();
    }
    assertInsideBudget(readout, config.norm, table.eps, attack.method.meta.label);
    let flips = 0;
    indices.forEach((sample, row) => {
      table.advPred[sample] = readout.pred[row]!;
      table.advConf[sample] = readout.conf[row]!;
      table.linf[sample] = readout.linf[row]!;
      table.l2[sample] = readout.l2[row]!;
      // The sweep's own prediction at the kept point decides, so records and curve always agree.
      const flipped = readout.pred[row] !== samples.labels[sample];
      table.flipped[sample] = flipped ? 1 : 0;
      if (flipped) flips++;
    });
    if (keptPixels !== null) state.hooks.onAdversarial?.({ attack: attack.id, eps: table.eps, indices, flipped: Uint8Array.from(indices, (s) => table.flipped[s]!), pixels: keptPixels });
    progress.batchDone(planned, attack.id, table.eps);
    return flips;
  } finally {
    x.dispose();
    labels.dispose();
  }
}

/** The result as it stands: finished points only, records over the finished tables. */
function snapshot(state: SweepState, complete: boolean): SweepResult {
  const { samples } = state.input;
  const n = samples.labels.length;
  const clean = state.clean;
  return {
    config: state.plan.config,
    cleanAccuracy: clean === null || n === 0 ? 0 : clean.correctCount / n,
    cleanCorrect: clean?.correctCount ?? 0,
    samples: n,
    curve: [...state.curve],
    records: clean === null ? [] : sampleRecords(samples, clean, state.tables),
    complete,
    startedAt: state.startedAt,
    endedAt: new Date().toISOString(),
  };
}

/**
 * Let queued events (such as a worker's cancel message) run now and then, then stop if aborted.
 * The yielder uses a timer: awaiting resolved promises alone would never let a message through.
 */
async function checkpoint(state: SweepState): Promise<void> {
  state.hooks.signal?.throwIfAborted();
  await state.yieldTurn();
  state.hooks.signal?.throwIfAborted();
}

function checkSampleSet(samples: SampleSet): void {
  const n = samples.labels.length;
  const size = samples.height * samples.width * samples.channels;
  if (samples.pixels.length !== n * size) {
    throw new Error(`The sample set holds ${samples.pixels.length} pixels values, expected ${n}·${size}.`);
  }
}

function range(start: number, end: number): number[] {
  return Array.from({ length: end - start }, (_, i) => start + i);
}

const registryAttack: AttackResolver = (id) => getAttack(id);

/**
 * Gradient evaluations the sweep would spend if every sample guessed correct clean were attacked at
 * every positive budget (an upper estimate for the plan screen; flipped samples drop out early).
 * Throws like runSweep on a bad configuration.
 */
export function estimateSweepCost(config: SweepConfig, cleanCorrectGuess: number, resolveAttack: AttackResolver = registryAttack): number {
  return estimateWith(config, cleanCorrectGuess, resolveAttack);
}
