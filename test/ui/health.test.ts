import { describe, expect, it } from 'vitest';
import { evaluateHealth } from '../../src/core/health/evaluate.ts';
import type { HealthEvidence } from '../../src/core/health/types.ts';
import { getAttack } from '../../src/core/attacks/registry.ts';
import { DEFAULT_HEALTH_SETTINGS, STATUS_LOOK, checkNumbers, checksInPanelOrder, healthRequest, healthSettingsFrom, numberText, statusSummary } from '../../src/ui/lib/health.ts';

/**
 * Evidence of a 100-sample evaluation with one problem: at ε = 0.1 random noise leaves 30 robust
 * where PGD leaves 40, the sign of masked gradients Carlini et al. (2019) describe. The verdicts
 * come from the core's rules; this file tests only how the panel words them.
 */
function evidence(): HealthEvidence {
  const pair = (eps: number, referenceRobust: number, otherRobust: number) => ({ eps, samples: 100, referenceRobust, otherRobust, otherOnly: 0 });
  return {
    norm: 'linf',
    samples: 100,
    constantShare: 0.1,
    reference: 'pgd',
    monotone: { eps: 0.3, flippedBefore: 60, resisted: 0 },
    largeBudget: { eps: 0.5, robust: 0 },
    singleStep: [{ attack: 'pgd', ...pair(0.1, 40, 60) }],
    gradientFree: pair(0.3, 5, 8),
    convergence: { eps: 0.1, referenceRobust: 40, doubledSteps: null, addedRestarts: null },
    gradients: { samples: 100, nonFinite: 0, zero: 0 },
    noise: [pair(0.1, 40, 30)],
    saturation: { outputKind: 'probabilities', rows: 100, topOne: 30, saturatedRows: 1 },
  };
}

describe('health panel wording', () => {
  const checks = evaluateHealth(evidence());

  it('puts warnings first and counts each status in words', () => {
    // One warning (noise), one skip (convergence: no steps or restarts to add), six passes, from the core's rules.
    expect(checks.map((c) => c.status).filter((s) => s === 'warn')).toHaveLength(1);
    expect(checksInPanelOrder(checks)[0]?.id).toBe('noise');
    expect(checksInPanelOrder(checks).at(-1)?.id).toBe('convergence');
    expect(statusSummary(checks)).toBe('1 warning, 6 pass, 1 not run');
    expect(statusSummary([])).toBe('no checks');
    // Every status has a word and a mark, so it reads without colour.
    for (const look of Object.values(STATUS_LOOK)) expect(look.word.length > 0 && look.mark.length > 0).toBe(true);
  });

  it('shows the numbers behind a check: budgets to four digits, shares as percentages, counts as counts', () => {
    const large = checks.find((c) => c.id === 'large-budget')!;
    expect(checkNumbers(large)).toEqual([
      ['ε', '0.5'],
      ['robust accuracy', '0.0 %'],
      ['chance', '10.0 %'],
    ]);
    expect(numberText('eps', 8 / 255)).toBe('0.03137');
    expect(numberText('samples', 12345)).toBe('12,345');
    expect(numberText('ratio', 1 / 3)).toBe('0.3333');
  });

  it('asks the worker for the searches with the chosen queries and draws, defaulting to their metadata', () => {
    expect(DEFAULT_HEALTH_SETTINGS.queries).toBe((getAttack('square').meta.defaults as { queries: number }).queries);
    expect(DEFAULT_HEALTH_SETTINGS.draws).toBe((getAttack('noise').meta.defaults as { draws: number }).draws);
    expect(healthRequest({ after: true, queries: 200, draws: 3 })).toEqual({ squareOptions: { queries: 200 }, noiseOptions: { draws: 3 } });
    // The searches accept what the panel sends (their own validate()).
    expect(getAttack('square').meta.validate({ queries: 200 })).toMatchObject({ queries: 200 });
  });

  it('reads stored settings back, replacing anything unusable by the default', () => {
    expect(healthSettingsFrom({ after: true, queries: 50, draws: 4 })).toEqual({ after: true, queries: 50, draws: 4 });
    expect(healthSettingsFrom({ after: 'yes', queries: 0, draws: 2.5 })).toEqual({ ...DEFAULT_HEALTH_SETTINGS, after: false });
    expect(healthSettingsFrom(null)).toBe(DEFAULT_HEALTH_SETTINGS);
  });
});
