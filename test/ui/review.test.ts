/**
 * The review screen's pure helpers: the plan that repeats a saved run's configuration, labels,
 * dates, the run list's transitions, and the words of the difference table.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PLAN, toSweepConfig, type PlanSettings } from '../../src/ui/lib/plan.ts';
import { parseBudgetValue } from '../../src/ui/lib/budgets.ts';
import { budgetText, demoModelOf, planFromConfig, reviewStepText, savedAtText, uniqueLabel } from '../../src/ui/lib/review.ts';
import { CURRENT_RUN, INITIAL_REVIEW, comparedIds, comparisonChosen, entryAdded, entryRemoved, inclusionToggled } from '../../src/ui/store/review.ts';
import { differenceExcludesZero, differenceText, points } from '../../src/ui/lib/compareFigure.ts';
import { newcombeDifference } from '../../src/core/compare/newcombe.ts';
import type { SavedRun } from '../../src/core/savedRun/types.ts';
import type { SweepConfig } from '../../src/core/sweep/types.ts';

function configOf(plan: PlanSettings): SweepConfig {
  const build = toSweepConfig(plan, 6);
  if (!build.ok) throw new Error(build.error);
  return build.config;
}

describe('planFromConfig', () => {
  it('gives back the very same SweepConfig through toSweepConfig (demo plan)', () => {
    const config = configOf(DEMO_PLAN);
    const plan = planFromConfig(config, DEMO_PLAN.health);
    expect(plan.budgets).toBe('0, 1/255, 2/255, 4/255, 8/255');
    expect(configOf(plan)).toEqual(config);
  });

  it('carries non-default options, L2 budgets written as decimals, seed and batch size', () => {
    const config = configOf({ ...DEMO_PLAN, attacks: ['pgd', 'deepfool'], norm: 'l2', budgets: '0.1, 0.25, 1/3', options: { steps: 17, restarts: 2 }, seed: 9, batchSize: 5 });
    const plan = planFromConfig(config, DEMO_PLAN.health);
    expect(plan.attacks).toEqual(['pgd', 'deepfool']);
    expect(plan.options['steps']).toBe(17);
    expect(configOf(plan)).toEqual(config);
  });

  it('keeps the spelling a CLI run recorded for its budgets', () => {
    const config: SweepConfig = { attacks: [{ id: 'fgsm', options: {} }], norm: 'linf', eps: [0, 0.05], epsLabels: ['0', '0.05'], seed: 0, batchSize: 8 };
    expect(planFromConfig(config, DEMO_PLAN.health).budgets).toBe('0, 0.05');
  });
});

describe('labels and dates', () => {
  it('writes exact fractions of 255 as k/255 and other budgets as round-trip decimals', () => {
    expect(budgetText(8 / 255)).toBe('8/255');
    expect(budgetText(0)).toBe('0');
    // 0.03 · 255 = 7.65 grey levels: not a whole number, so it stays a decimal.
    expect(budgetText(0.03)).toBe('0.03');
    // 1/3 is exactly 85 grey levels (85/255 = 1/3); the plan editor's parser reads every form back to the same number.
    expect(budgetText(1 / 3)).toBe('85/255');
    for (const eps of [1 / 3, 0.03, 8 / 255, Math.SQRT1_2, 1e-7]) expect(parseBudgetValue(budgetText(eps))).toBe(eps);
  });

  it('numbers repeated labels and prints ISO times in UTC without the locale', () => {
    expect(uniqueLabel('a', [])).toBe('a');
    expect(uniqueLabel('a', ['a', 'a (2)'])).toBe('a (3)');
    expect(savedAtText('2025-03-04T17:05:59.999Z')).toBe('2025-03-04 17:05 UTC');
    expect(savedAtText('2025-03-04T19:05:00+02:00')).toBe('2025-03-04 17:05 UTC');
    expect(savedAtText('yesterday')).toBe('yesterday');
  });

  it('recognises a demo model by the SHA-256 of its files', () => {
    const saved = { run: { model: { sha256: 'bb' } } } as unknown as SavedRun;
    expect(demoModelOf(saved, { standard: 'aa', hardened: 'bb' })).toBe('hardened');
    expect(demoModelOf(saved, { standard: 'aa' })).toBeNull();
  });
});

describe('the run list', () => {
  const saved = {} as SavedRun;
  const two = (() => {
    const a = entryAdded(INITIAL_REVIEW, { label: 'A', fileName: 'a.json', source: 'file', saved });
    const b = entryAdded(a.state, { label: 'B', fileName: 'b.json', source: 'file', saved });
    return b.state;
  })();

  it('compares every run in the order added, the current run last, unless unticked', () => {
    expect(two.entries.map((e) => e.id)).toEqual(['run-1', 'run-2']);
    expect(comparedIds(two, true)).toEqual(['run-1', 'run-2', CURRENT_RUN]);
    expect(comparedIds(two, false)).toEqual(['run-1', 'run-2']);
    expect(comparedIds(inclusionToggled(two, 'run-1'), true)).toEqual(['run-2', CURRENT_RUN]);
    expect(comparedIds(inclusionToggled(inclusionToggled(two, 'run-1'), 'run-1'), true)).toEqual(['run-1', 'run-2', CURRENT_RUN]);
  });

  it('puts the chosen baseline first and forgets a removed run', () => {
    expect(comparedIds({ ...two, baseline: CURRENT_RUN }, true)).toEqual([CURRENT_RUN, 'run-1', 'run-2']);
    const chosen = comparisonChosen(two, ['run-2', CURRENT_RUN], ['run-1', 'run-2', CURRENT_RUN]);
    expect(comparedIds(chosen, true)).toEqual(['run-2', CURRENT_RUN]);
    const removed = entryRemoved({ ...chosen, viewing: 'run-2' }, 'run-2');
    expect(removed.viewing).toBeNull();
    expect(removed.baseline).toBeNull();
    expect(comparedIds(removed, true)).toEqual([CURRENT_RUN]);
  });

  it('counts the runs in the review step status line', () => {
    const facts = (state: typeof two, current: boolean, busy = false) => ({ kept: state.entries.length, current, compared: comparedIds(state, current).length, busy });
    // Two kept runs and the current one, all ticked: three to compare; one unticked leaves two.
    expect(reviewStepText(facts(two, true))).toBe('3 runs to compare');
    expect(reviewStepText(facts(inclusionToggled(two, 'run-1'), true))).toBe('2 runs to compare');
    // Two of three unticked: nothing to compare, and the line says how many are ticked.
    expect(reviewStepText(facts(inclusionToggled(inclusionToggled(two, 'run-1'), 'run-2'), true))).toBe('1 of 3 runs ticked');
    expect(reviewStepText(facts(INITIAL_REVIEW, false))).toBe('nothing saved yet');
    expect(reviewStepText(facts(INITIAL_REVIEW, true))).toBe("this session's run only");
    expect(reviewStepText(facts(entryRemoved(two, 'run-2'), false))).toBe('1 saved run');
    expect(reviewStepText(facts(two, true, true))).toBe('working…');
  });
});

describe('difference table words', () => {
  it("prints Newcombe's published example 56/70 − 48/80 as +20.0 pp (5.2 to 33.4)", () => {
    // Newcombe, Statistics in Medicine 17 (1998), Table II, method 10: 0.2000 with [0.0524, 0.3339] (from memory).
    const ci = newcombeDifference(48, 80, 56, 70);
    const row = { difference: 56 / 70 - 48 / 80, differenceLow: ci.low, differenceHigh: ci.high };
    expect(differenceText(row)).toBe('+20.0 pp (95 % interval +5.2 to +33.4 pp)');
    expect(differenceExcludesZero(row)).toBe(true);
  });

  it('signs negative differences with a minus and prints a zero without sign', () => {
    // Same example with the runs swapped: the interval is negated (antisymmetry of the construction).
    const ci = newcombeDifference(56, 70, 48, 80);
    expect(differenceText({ difference: -0.2, differenceLow: ci.low, differenceHigh: ci.high })).toBe('−20.0 pp (95 % interval −33.4 to −5.2 pp)');
    expect(points(0)).toBe('0.0 pp');
    expect(points(-0.0004)).toBe('0.0 pp');
    expect(differenceExcludesZero({ differenceLow: -0.01, differenceHigh: 0.2 })).toBe(false);
  });
});
