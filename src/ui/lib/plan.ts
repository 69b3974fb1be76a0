/**
 * The sweep plan as the workbench edits it, and its translation into the core's SweepConfig. Like
 * the command line, one set of search options is given and each attack takes the options its
 * metadata declares; the attacks' own validate() completes and checks them. The option form is
 * generated from the attacks' metadata (see optionUses).
 */
import { ATTACKS, getAttack } from '../../core/attacks/registry.ts';
import type { AttackId, TargetMode } from '../../core/attacks/types.ts';
import { estimateSweepCost } from '../../core/sweep/runSweep.ts';
import type { SweepConfig } from '../../core/sweep/types.ts';
import type { Norm } from '../../core/types.ts';
import { parseBudgets } from './budgets.ts';
import { DEFAULT_HEALTH_SETTINGS, type HealthSettings } from './health.ts';

/** Everything the plan screen edits (persisted). */
export interface PlanSettings {
  readonly attacks: readonly AttackId[];
  readonly norm: Norm;
  /** The budget editor's text (see budgets.ts). */
  readonly budgets: string;
  /**
   * Search options the user set, shared by every chosen search that declares them (as the CLI's
   * flags are); an option not set here keeps each search's own default.
   */
  readonly options: Readonly<Record<string, unknown>>;
  readonly seed: number;
  readonly batchSize: number;
  /** The health checks: whether they follow the sweep, and the settings of the searches they add. */
  readonly health: HealthSettings;
}

/** The demo plan: FGSM and PGD with their defaults, L∞, five budgets up to 8/255. */
export const DEMO_PLAN: PlanSettings = {
  attacks: ['fgsm', 'pgd'],
  norm: 'linf',
  budgets: '0, 1/255, 2/255, 4/255, 8/255',
  options: {},
  seed: 0,
  batchSize: 32,
  health: DEFAULT_HEALTH_SETTINGS,
};

/** One option of the chosen searches: who declares it and their defaults. */
export interface OptionUse {
  readonly key: string;
  readonly users: readonly { readonly id: AttackId; readonly label: string; readonly fallback: unknown }[];
}

/** The options the chosen searches declare (in first-seen order), with each search's default. */
export function optionUses(attacks: readonly AttackId[]): OptionUse[] {
  const uses = new Map<string, OptionUse['users'][number][]>();
  for (const id of attacks) {
    const meta = getAttack(id).meta;
    for (const [key, fallback] of Object.entries(meta.defaults as object)) uses.set(key, [...(uses.get(key) ?? []), { id, label: meta.label, fallback }]);
  }
  return [...uses.entries()].map(([key, users]) => ({ key, users }));
}

/** All attacks the workbench offers, in menu order. */
export function attackChoices(): { id: AttackId; label: string; summary: string; norms: readonly Norm[] }[] {
  return ATTACKS.map((a) => ({ id: a.meta.id, label: a.meta.label, summary: a.meta.summary, norms: a.meta.norms }));
}

/** The shared option value to show: the user's, else the default when all users agree on it (else undefined). */
export function shownOption(plan: PlanSettings, use: OptionUse): unknown {
  if (use.key in plan.options) return plan.options[use.key];
  const first = JSON.stringify(use.users[0]?.fallback);
  return use.users.every((u) => JSON.stringify(u.fallback) === first) ? use.users[0]?.fallback : undefined;
}

export type ConfigBuild = { readonly ok: true; readonly config: SweepConfig } | { readonly ok: false; readonly error: string };

/** The SweepConfig of a plan, or the first problem in it, in words for the user. */
export function toSweepConfig(plan: PlanSettings, classCount: number | null): ConfigBuild {
  if (plan.attacks.length === 0) return { ok: false, error: 'Choose at least one search.' };
  const budgets = parseBudgets(plan.budgets, plan.norm);
  if (!budgets.ok) return { ok: false, error: budgets.error };
  const target = plan.options['target'] as TargetMode | undefined;
  if (target?.kind === 'class' && classCount !== null && target.classIndex >= classCount) {
    return { ok: false, error: `The target class ${target.classIndex} does not exist: the model has ${classCount} classes.` };
  }
  if (!Number.isSafeInteger(plan.seed) || plan.seed < 0) return { ok: false, error: 'The seed must be a whole number ≥ 0.' };
  if (!Number.isInteger(plan.batchSize) || plan.batchSize < 1) return { ok: false, error: 'The batch size must be a whole number ≥ 1.' };
  const raw = plan.options;
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
