/**
 * Registry and option validation. The expected values are the documented contract (README.md of
 * src/core/attacks and the option comments in fgsm.ts / pgd.ts): defaults, the plan estimate,
 * error messages naming the option and the value.
 */
import { describe, expect, it } from 'vitest';
import { ATTACKS, attackIds, getAttack, isAttackId } from '../../src/core/attacks/registry.ts';
import type { AttackId } from '../../src/core/attacks/types.ts';

describe('attack registry', () => {
  it('lists every search with its metadata', () => {
    expect(attackIds()).toEqual(['fgsm', 'pgd', 'apgd-ce', 'apgd-dlr', 'square', 'deepfool', 'noise']);
    expect(ATTACKS.map((a) => a.meta.label)).toEqual(['FGSM', 'PGD', 'APGD-CE', 'APGD-DLR', 'Square', 'DeepFool', 'Random noise']);
    for (const id of attackIds()) {
      const attack = getAttack(id);
      expect(attack.meta.id).toBe(id);
      expect(attack.meta.norms).toEqual(['linf', 'l2']);
      // Every summary cites its paper and year.
      expect(attack.meta.summary).toMatch(/(et al\.|& \w+), ".+", [A-Za-z]+ 20\d\d\)/);
      // validate({}) completes exactly the defaults.
      expect(attack.meta.validate({})).toEqual(attack.meta.defaults);
    }
    expect(isAttackId('pgd')).toBe(true);
    expect(isAttackId('deepfool')).toBe(true);
    expect(isAttackId('nope')).toBe(false);
    expect(() => getAttack('nope' as AttackId)).toThrow(/Unknown attack "nope"/);
  });

  it('estimates gradient evaluations per sample per budget', () => {
    expect(getAttack('fgsm').meta.estimateGradientEvaluations(getAttack('fgsm').meta.defaults)).toBe(1);
    const pgd = getAttack('pgd').meta;
    expect(pgd.estimateGradientEvaluations(pgd.validate({ steps: 20, restarts: 3 }))).toBe(60);
    expect(pgd.defaults).toMatchObject({ steps: 10, stepSize: null, randomStart: true, restarts: 1, loss: 'ce' });
  });

  it('rejects bad options with a message naming the option and the value', () => {
    const pgd = getAttack('pgd').meta;
    expect(() => pgd.validate({ steps: 0 })).toThrow('pgd: steps must be a positive integer (got 0)');
    expect(() => pgd.validate({ steps: 2.5 })).toThrow('pgd: steps must be a positive integer (got 2.5)');
    expect(() => pgd.validate({ restarts: -1 })).toThrow('pgd: restarts must be a positive integer (got -1)');
    expect(() => pgd.validate({ stepSize: 0 })).toThrow('pgd: stepSize must be a finite number > 0 or null (got 0)');
    expect(() => pgd.validate({ randomStart: 'yes' as unknown as boolean })).toThrow('pgd: randomStart must be true or false (got "yes")');
    expect(() => pgd.validate({ restarts: 2, randomStart: false })).toThrow(/pgd: restarts must be 1 without randomStart/);
    expect(() => pgd.validate({ loss: 'hinge' as 'ce' })).toThrow('pgd: loss must be "ce" or "margin" (got "hinge")');
    const fgsm = getAttack('fgsm').meta;
    expect(() => fgsm.validate({ steps: 3 } as never)).toThrow('fgsm: unknown option "steps" (known: loss, target)');
    expect(() => fgsm.validate({ target: { kind: 'class', classIndex: -2 } })).toThrow('fgsm: target.classIndex must be an integer ≥ 0 (got -2)');
    expect(() => fgsm.validate({ target: { kind: 'nearest' } as never })).toThrow(/fgsm: target must be/);
    expect(fgsm.validate({ target: { kind: 'class', classIndex: 3 } })).toEqual({ loss: 'ce', target: { kind: 'class', classIndex: 3 } });
  });
});
