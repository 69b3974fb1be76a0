import { describe, expect, it } from 'vitest';
import { DEMO_PLAN, optionUsers, planCost, toSweepConfig } from '../../src/ui/lib/plan.ts';

describe('sweep plan → SweepConfig', () => {
  it('gives each attack the options its metadata declares, completed by its validate()', () => {
    const build = toSweepConfig(DEMO_PLAN, 6);
    expect(build.ok).toBe(true);
    if (!build.ok) return;
    const [fgsm, pgd] = build.config.attacks;
    expect(fgsm).toEqual({ id: 'fgsm', options: { loss: 'ce', target: { kind: 'untargeted' } } });
    expect(pgd?.options).toEqual({ steps: 10, stepSize: null, randomStart: true, restarts: 1, loss: 'ce', target: { kind: 'untargeted' } });
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
    const target = toSweepConfig({ ...DEMO_PLAN, target: 'class', targetClass: 9 }, 6);
    expect(!target.ok && target.error).toContain('target class 9');
    const restarts = toSweepConfig({ ...DEMO_PLAN, randomStart: false, restarts: 3 }, 6);
    expect(!restarts.ok && restarts.error).toContain('restarts');
    expect(toSweepConfig({ ...DEMO_PLAN, budgets: '0, abc' }, 6).ok).toBe(false);
  });

  it('lists which searches use each option', () => {
    const users = optionUsers(['fgsm', 'pgd']);
    expect(users.get('loss')).toEqual(['FGSM', 'PGD']);
    expect(users.get('steps')).toEqual(['PGD']);
    expect(optionUsers(['fgsm']).has('steps')).toBe(false);
  });
});
