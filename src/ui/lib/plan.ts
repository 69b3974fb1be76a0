/**
 * The sweep plan as the workbench edits it, and its translation into the core's SweepConfig. Like
 * the command line, one set of search options is given and each attack takes the options its
 * metadata declares; the attacks' own validate() completes and checks them.
 */
import { ATTACKS, getAttack } from '../../core/attacks/registry.ts';
import type { AttackId, LossKind, TargetMode } from '../../core/attacks/types.ts';
import { estimateSweepCost } from '../../core/sweep/runSweep.ts';
import type { SweepConfig } from '../../core/sweep/types.ts';
import type { Norm } from '../../core/types.ts';
import { parseBudgets } from './budgets.ts';

export type TargetChoice = 'untargeted' | 'least-likely' | 'class';

/** Everything the plan screen edits (persisted). */
export interface PlanSettings {
  readonly attacks: readonly AttackId[];
  readonly norm: Norm;
  /** The budget editor's text (see budgets.ts). */
  readonly budgets: string;
  readonly steps: number;
  /** Step size in pixel units; null = automatic (2.5·ε/steps). */
  readonly stepSize: number | null;
  readonly restarts: number;
  readonly randomStart: boolean;
  readonly loss: LossKind;
  readonly target: TargetChoice;
  readonly targetClass: number;
  readonly seed: number;
  readonly batchSize: number;
}

/** The demo plan: both searches, L∞, five budgets up to 8/255, PGD with its default 10 steps. */
export const DEMO_PLAN: PlanSettings = {
  attacks: ['fgsm', 'pgd'],
  norm: 'linf',
  budgets: '0, 1/255, 2/255, 4/255, 8/255',
  steps: 10,
  stepSize: null,
  restarts: 1,
  randomStart: true,
  loss: 'ce',
  target: 'untargeted',
  targetClass: 0,
  seed: 0,
  batchSize: 32,
};

/** The option names the selected attacks declare, with the attacks that use each. */
export function optionUsers(attacks: readonly AttackId[]): Map<string, string[]> {
  const users = new Map<string, string[]>();
  for (const id of attacks) {
    const meta = getAttack(id).meta;
    for (const key of Object.keys(meta.defaults as object)) users.set(key, [...(users.get(key) ?? []), meta.label]);
  }
  return users;
}

/** All attacks the workbench offers, in menu order. */
export function attackChoices(): { id: AttackId; label: string; summary: string; norms: readonly Norm[] }[] {
  return ATTACKS.map((a) => ({ id: a.meta.id, label: a.meta.label, summary: a.meta.summary, norms: a.meta.norms }));
}

function targetMode(plan: PlanSettings): TargetMode {
  if (plan.target === 'class') return { kind: 'class', classIndex: plan.targetClass };
  return { kind: plan.target };
}

/** The search options as one set, before each attack keeps its own (as the CLI's flags do). */
export function rawSearchOptions(plan: PlanSettings): Record<string, unknown> {
  return {
    steps: plan.steps,
    stepSize: plan.stepSize,
    restarts: plan.restarts,
    randomStart: plan.randomStart,
    loss: plan.loss,
    target: targetMode(plan),
  };
}

export type ConfigBuild = { readonly ok: true; readonly config: SweepConfig } | { readonly ok: false; readonly error: string };

/** The SweepConfig of a plan, or the first problem in it, in words for the user. */
export function toSweepConfig(plan: PlanSettings, classCount: number | null): ConfigBuild {
  if (plan.attacks.length === 0) return { ok: false, error: 'Choose at least one search.' };
  const budgets = parseBudgets(plan.budgets, plan.norm);
  if (!budgets.ok) return { ok: false, error: budgets.error };
  if (plan.target === 'class' && classCount !== null && plan.targetClass >= classCount) {
    return { ok: false, error: `The target class ${plan.targetClass} does not exist: the model has ${classCount} classes.` };
  }
  if (!Number.isSafeInteger(plan.seed) || plan.seed < 0) return { ok: false, error: 'The seed must be a whole number ≥ 0.' };
  if (!Number.isInteger(plan.batchSize) || plan.batchSize < 1) return { ok: false, error: 'The batch size must be a whole number ≥ 1.' };
  const raw = rawSearchOptions(plan);
  try {
    const attacks = plan.attacks.map((id) => {
      const meta = getAttack(id).meta;
      if (!meta.norms.includes(plan.norm)) throw new Error(`${meta.label} does not support the ${plan.norm === 'linf' ? 'L∞' : 'L2'} norm.`);
      const known = new Set(Object.keys(meta.defaults as object));
      const own = Object.fromEntries(Object.entries(raw).filter(([key]) => known.has(key)));
      return { id, options: meta.validate(own) as Record<string, unknown> };
    });
    return { ok: true, config: { attacks, norm: plan.norm, eps: budgets.values, seed: plan.seed, batchSize: plan.batchSize } };
  } catch (err) {
    return { ok: false, error: err instanceof Error ? err.message : String(err) };
  }
}

/** Upper estimate of the gradient evaluations (forward + backward passes per sample) of a plan. */
export function planCost(config: SweepConfig, cleanCorrectGuess: number): number {
  return estimateSweepCost(config, cleanCorrectGuess);
}
