/**
 * Checks a SweepConfig and turns it into the plan the sweep loop follows: attacks resolved and
 * their options completed, budgets sorted ascending with their printed labels.
 */
import type { AttackId, AttackMethod } from '../attacks/types.ts';
import type { SweepAttackSpec, SweepConfig } from './types.ts';

/** Looks an attack up by id (the registry's getAttack, or a test's own). */
export type AttackResolver = (id: AttackId) => AttackMethod<unknown>;

export interface PlannedAttack {
  readonly id: AttackId;
  readonly method: AttackMethod<unknown>;
  /** Options completed with the attack's defaults by its validate(). */
  readonly options: unknown;
  /** Gradient evaluations per sample per budget (the attack's own estimate). */
  readonly perSample: number;
}

export interface PlannedBudget {
  readonly eps: number;
  /** How exports print this budget. */
  readonly label: string;
}

export interface SweepPlan {
  readonly attacks: readonly PlannedAttack[];
  /** Ascending, no duplicates. */
  readonly budgets: readonly PlannedBudget[];
  /** The configuration with each attack's options completed by validate() (for run.json). */
  readonly config: SweepConfig;
}

/** Validate the configuration (throws an Error naming the problem) and build the plan. */
export function planSweep(config: SweepConfig, resolve: AttackResolver): SweepPlan {
  checkScalars(config);
  const attacks = config.attacks.map((spec) => planAttack(spec, config, resolve));
  const budgets = sortBudgets(config);
  const completed: SweepAttackSpec[] = attacks.map((a) => ({
    id: a.id,
    options: a.options as Readonly<Record<string, unknown>>,
  }));
  return { attacks, budgets, config: { ...config, attacks: completed } };
}

/**
 * Upper estimate of the gradient evaluations a sweep costs, for the plan screen: every sample
 * guessed correct clean is attacked at every positive budget. The real sweep spends less because
 * flipped samples are not attacked again at larger budgets.
 */
export function estimateSweepCost(config: SweepConfig, cleanCorrectGuess: number, resolve: AttackResolver): number {
  const plan = planSweep(config, resolve);
  const positive = plan.budgets.filter((b) => b.eps > 0).length;
  const perSample = plan.attacks.reduce((sum, a) => sum + a.perSample, 0);
  return Math.max(0, cleanCorrectGuess) * positive * perSample;
}

function checkScalars(config: SweepConfig): void {
  if (config.attacks.length === 0) throw new Error('The sweep needs at least one attack.');
  if (config.eps.length === 0) throw new Error('The sweep needs at least one budget (eps).');
  if (!Number.isInteger(config.batchSize) || config.batchSize < 1) {
    throw new Error(`batchSize must be a positive integer, got ${config.batchSize}.`);
  }
  if (!Number.isSafeInteger(config.seed)) throw new Error(`seed must be an integer, got ${config.seed}.`);
  const ids = new Set<string>();
  for (const spec of config.attacks) {
    if (ids.has(spec.id)) throw new Error(`Attack "${spec.id}" is listed twice.`);
    ids.add(spec.id);
  }
  if (config.epsLabels !== undefined && config.epsLabels.length !== config.eps.length) {
    throw new Error(`epsLabels has ${config.epsLabels.length} entries for ${config.eps.length} budgets.`);
  }
}

function planAttack(spec: SweepAttackSpec, config: SweepConfig, resolve: AttackResolver): PlannedAttack {
  const method = resolve(spec.id);
  if (!method.meta.norms.includes(config.norm)) {
    throw new Error(`${method.meta.label} does not support the ${config.norm} norm.`);
  }
  const options = method.meta.validate(spec.options as Partial<unknown>);
  const perSample = method.meta.estimateGradientEvaluations(options);
  return { id: spec.id, method, options, perSample };
}

function sortBudgets(config: SweepConfig): PlannedBudget[] {
  const budgets = config.eps.map((eps, i) => {
    if (!Number.isFinite(eps) || eps < 0) throw new Error(`Budget ${eps} is not a finite number ≥ 0.`);
    return { eps, label: config.epsLabels?.[i] ?? formatNumber(eps) };
  });
  budgets.sort((a, b) => a.eps - b.eps);
  for (let i = 1; i < budgets.length; i++) {
    if (budgets[i]!.eps === budgets[i - 1]!.eps) throw new Error(`Budget ${budgets[i]!.label} is listed twice.`);
  }
  return budgets;
}

/** Shortest decimal that reads back to the same double (ECMAScript Number::toString guarantees it). */
export function formatNumber(value: number): string {
  return String(value);
}
