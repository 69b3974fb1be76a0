/** Configuration checks of the sweep plan: bad input is refused with a message naming the problem. */
import { describe, expect, it } from 'vitest';
import { planSweep } from '../../src/core/sweep/plan.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import type { SweepConfig } from '../../src/core/sweep/types.ts';

const BASE: SweepConfig = { attacks: [{ id: 'fgsm', options: {} }], norm: 'linf', eps: [0.1, 0, 0.05], seed: 0, batchSize: 8 };
const plan = (changes: Partial<SweepConfig>) => planSweep({ ...BASE, ...changes }, (id) => getAttack(id));

describe('planSweep', () => {
  it('sorts budgets ascending, keeps the user spelling with each budget and completes options', () => {
    // Requirement: budgets sorted ascending, labels follow their budget; options completed by the attack's validate().
    const p = plan({ epsLabels: ['0.1', '0', '1/20'] });
    expect(p.budgets).toEqual([
      { eps: 0, label: '0' },
      { eps: 0.05, label: '1/20' },
      { eps: 0.1, label: '0.1' },
    ]);
    expect(p.config.attacks[0]!.options).toEqual(getAttack('fgsm').meta.validate({}));
    expect(p.config.eps).toEqual(BASE.eps); // the configuration itself keeps the user's order
  });

  it('refuses bad configurations with a message naming the problem', () => {
    // Requirement: one-line errors naming the bad value.
    expect(() => plan({ eps: [0.1, 0.1] })).toThrow(/listed twice/);
    expect(() => plan({ eps: [-0.1] })).toThrow(/not a finite number/);
    expect(() => plan({ eps: [Number.NaN] })).toThrow(/not a finite number/);
    expect(() => plan({ eps: [] })).toThrow(/at least one budget/);
    expect(() => plan({ attacks: [] })).toThrow(/at least one attack/);
    expect(() => plan({ attacks: [{ id: 'pgd', options: {} }, { id: 'pgd', options: {} }] })).toThrow(/listed twice/);
    expect(() => plan({ batchSize: 0 })).toThrow(/batchSize/);
    expect(() => plan({ seed: 1.5 })).toThrow(/seed/);
    expect(() => plan({ epsLabels: ['1'] })).toThrow(/epsLabels/);
    expect(() => plan({ attacks: [{ id: 'pgd', options: { steps: 0 } }] })).toThrow(/steps/);
  });
});
