/**
 * The searches a flip-budget run can use. PGD runs as its own per-row probe (every row bisects its
 * own budget, warm-started); other registered searches run through attackProbe; DeepFool gives an
 * estimate of the minimal L2 or L∞ perturbation directly, without bisection.
 */
import { getAttack, isAttackId } from '../attacks/registry.ts';
import { pgdMeta, type PgdOptions } from '../attacks/pgd.ts';
import type { AttackMethod } from '../attacks/types.ts';
import type { Rng } from '../random/rng.ts';
import type * as tf from '@tensorflow/tfjs';
import type { LogitsFn, Norm } from '../types.ts';
import { attackProbe } from './attackProbe.ts';
import type { BisectionRows } from './bisect.ts';
import { deepfoolEstimate } from './deepfoolEstimate.ts';
import { pgdProbe } from './pgdProbe.ts';
import type { FlipProbe } from './probe.ts';
import type { FlipBudgetConfig, FlipSearchId } from './types.ts';

/** Looks a registered search up by id (the registry by default; tests may pass their own). */
export type AttackLookup = (id: string) => AttackMethod<unknown>;

export interface EstimateInput {
  readonly logits: LogitsFn;
  readonly x: tf.Tensor4D;
  readonly labels: tf.Tensor1D;
  readonly norm: Norm;
  readonly maxEps: number;
  readonly rng: Rng;
  readonly signal?: AbortSignal;
}

export type FlipSearch =
  | { readonly kind: 'bisect'; readonly probe: FlipProbe }
  | { readonly kind: 'estimate'; readonly estimate: (input: EstimateInput) => Promise<BisectionRows> };

/** Search ids a flip-budget run accepts, in menu order. */
export const FLIP_SEARCH_IDS: readonly FlipSearchId[] = ['pgd', 'apgd-ce', 'deepfool'];

/** Type guard for ids from the command line or a configuration file. */
export function isFlipSearchId(value: string): value is FlipSearchId {
  return (FLIP_SEARCH_IDS as readonly string[]).includes(value);
}

/**
 * PGD settings for flip budgets where the user gives none. The margin loss max_{j≠y} z_j − z_y
 * follows the runner-up class straight to its boundary; cross-entropy spreads the ascent over all
 * classes and, on the affine models of test/flips, lands several per cent above the exact minimal
 * budget. A second restart, from a random point, escapes a runner-up class that is not the nearest.
 */
export const FLIP_PGD_DEFAULTS: Readonly<Record<string, unknown>> = { loss: 'margin', restarts: 2 };

/**
 * The search's options completed by its own validate() (throws naming the bad option); PGD starts
 * from FLIP_PGD_DEFAULTS. Flip budgets are untargeted: a target option is refused.
 */
export function validateFlipOptions(search: FlipSearchId, options: Readonly<Record<string, unknown>>, resolve: AttackLookup = registryLookup): Record<string, unknown> {
  if ('target' in options && (options['target'] as { kind?: unknown } | undefined)?.kind !== 'untargeted') {
    throw new Error(`${search}: flip budgets are untargeted; remove the target option`);
  }
  if (search === 'pgd') {
    // Without random starts a second restart would repeat the first, so the default drops to one.
    const defaults = options['randomStart'] === false ? { ...FLIP_PGD_DEFAULTS, restarts: 1 } : FLIP_PGD_DEFAULTS;
    return { ...pgdMeta.validate({ ...defaults, ...options } as Partial<PgdOptions>) };
  }
  return resolve(search).meta.validate(options as Partial<unknown>) as Record<string, unknown>;
}

/** The search behind a configuration. */
export function makeFlipSearch(config: FlipBudgetConfig, resolve: AttackLookup = registryLookup): FlipSearch {
  const options = validateFlipOptions(config.search, config.options, resolve);
  if (config.search === 'pgd') return { kind: 'bisect', probe: pgdProbe(options as unknown as PgdOptions) };
  if (config.search === 'deepfool') return { kind: 'estimate', estimate: (input) => deepfoolEstimate(input, options) };
  const method = resolve(config.search);
  if (!method.meta.norms.includes(config.norm)) throw new Error(`${method.meta.label} does not support the ${config.norm} norm.`);
  return { kind: 'bisect', probe: attackProbe(method, options) };
}

function registryLookup(id: string): AttackMethod<unknown> {
  if (!isAttackId(id)) throw new Error(`The search "${id}" is not available in this build.`);
  return getAttack(id);
}
