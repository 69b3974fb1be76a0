import { describe, expect, it } from 'vitest';
import { DEMO_PLAN, optionUses, planCost, shownOption, toSweepConfig } from '../../src/ui/lib/plan.ts';
import { fieldSpec, readNumber } from '../../src/ui/lib/optionFields.ts';

describe('sweep plan → SweepConfig', () => {
  it('gives each attack the options its metadata declares, completed by its validate()', () => {
    const build = toSweepConfig({ ...DEMO_PLAN, options: { steps: 20, queries: 50 } }, 6);
    expect(build.ok).toBe(true);
    if (!build.ok) return;
    const [fgsm, pgd] = build.config.attacks;
    // FGSM declares neither steps nor queries, so it keeps only its own options.
    expect(fgsm).toEqual({ id: 'fgsm', options: { loss: 'ce', target: { kind: 'untargeted' } } });
    expect(pgd?.options).toEqual({ steps: 20, stepSize: null, randomStart: true, restarts: 1, loss: 'ce', target: { kind: 'untargeted' } });
    expect(build.config.eps).toEqual([0, 1 / 255, 2 / 255, 4 / 255, 8 / 255]);
    expect(build.config.norm).toBe('linf');
  });

  it('estimates the cost as clean-correct × positive budgets × evaluations per sample', () => {
    const build = toSweepConfig(DEMO_PLAN, 6);
    if (!build.ok) throw new Error(build.error);
    // Closed form: FGSM spends 1 evaluation and PGD steps × restarts = 10 per sample and budget; 4 budgets are above 0.
    expect(planCost(build.config, 149)).toBe(149 * 4 * (1 + 10));
  });

  it('says what is wrong with a plan', () => {
    expect(toSweepConfig({ ...DEMO_PLAN, attacks: [] }, 6)).toEqual({ ok: false, error: 'Choose at least one search.' });
    const target = toSweepConfig({ ...DEMO_PLAN, options: { target: { kind: 'class', classIndex: 9 } } }, 6);
    expect(!target.ok && target.error).toContain('target class 9');
    const restarts = toSweepConfig({ ...DEMO_PLAN, options: { randomStart: false, restarts: 3 } }, 6);
    expect(!restarts.ok && restarts.error).toContain('restarts');
    expect(toSweepConfig({ ...DEMO_PLAN, budgets: '0, abc' }, 6).ok).toBe(false);
  });

  it('lists the options of the chosen searches and shows a default only where they agree', () => {
    const uses = optionUses(['fgsm', 'pgd', 'apgd-ce']);
    const steps = uses.find((u) => u.key === 'steps')!;
    expect(steps.users.map((u) => [u.label, u.fallback])).toEqual([
      ['PGD', 10],
      ['APGD-CE', 100],
    ]);
    expect(shownOption(DEMO_PLAN, steps)).toBeUndefined();
    expect(shownOption({ ...DEMO_PLAN, options: { steps: 40 } }, steps)).toBe(40);
    const loss = uses.find((u) => u.key === 'loss')!;
    expect(loss.users.map((u) => u.label)).toEqual(['FGSM', 'PGD']);
    expect(shownOption(DEMO_PLAN, loss)).toBe('ce');
    expect(optionUses(['fgsm']).some((u) => u.key === 'steps')).toBe(false);
  });

  it('picks a widget for options added later from their default', () => {
    expect(fieldSpec('someFlag', true).kind).toBe('boolean');
    expect(fieldSpec('someCount', 3).kind).toBe('integer');
    expect(fieldSpec('someScale', null).kind).toBe('number-or-auto');
    expect(readNumber('2.5', fieldSpec('steps', 10))).toBeNull();
    expect(readNumber('0', fieldSpec('steps', 10))).toBeNull();
    expect(readNumber('12', fieldSpec('steps', 10))).toBe(12);
  });
});
