/**
 * The verdict rules of the health checks on hand-made evidence, at the thresholds issue 5 states
 * (convergence within 1 point, finite non-zero gradients for 99 % of samples) and at the flat-grey
 * argument of the large-budget check; and health.csv's format.
 */
import { describe, expect, it } from 'vitest';
import { evaluateHealth } from '../../src/core/health/evaluate.ts';
import { healthCsv } from '../../src/core/export/healthCsv.ts';
import type { HealthCheckId, HealthEvidence, HealthStatus } from '../../src/core/health/types.ts';

/** Evidence of a sound evaluation of 100 samples (every check passes). */
function sound(): HealthEvidence {
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
    convergence: { eps: 0.1, referenceRobust: 40, doubledSteps: 0, addedRestarts: 1 },
    gradients: { samples: 100, nonFinite: 0, zero: 0 },
    noise: [pair(0.1, 40, 95), pair(0.3, 5, 90)],
    saturation: { outputKind: 'probabilities', rows: 100, topOne: 30, saturatedRows: 1 },
  };
}

function statuses(e: HealthEvidence): Record<HealthCheckId, HealthStatus> {
  return Object.fromEntries(evaluateHealth(e).map((c) => [c.id, c.status])) as Record<HealthCheckId, HealthStatus>;
}

describe('health verdicts', () => {
  it('a sound evaluation passes all eight checks, in a fixed order, each with one line', () => {
    const checks = evaluateHealth(sound());
    expect(checks.map((c) => c.id)).toEqual(['monotone', 'large-budget', 'iterative-vs-single-step', 'gradient-free-vs-gradient', 'convergence', 'gradients', 'noise', 'saturation']);
    expect(checks.every((c) => c.status === 'pass' && !c.detail.includes('\n'))).toBe(true);
  });

  it('tolerates one point between paired searches and warns beyond it', () => {
    // Issue 5: doubling the steps or adding restarts lowers accuracy by at most 1 point.
    const at = (newFlips: number) => statuses({ ...sound(), convergence: { ...sound().convergence!, doubledSteps: newFlips } }).convergence;
    expect(at(1)).toBe('pass');
    expect(at(2)).toBe('warn');
    const noise = (noiseRobust: number) => statuses({ ...sound(), noise: [{ eps: 0.1, samples: 100, referenceRobust: 40, otherRobust: noiseRobust, otherOnly: 0 }] }).noise;
    expect(noise(39)).toBe('pass');
    expect(noise(38)).toBe('warn');
    const single = (iterativeRobust: number) => statuses({ ...sound(), singleStep: [{ attack: 'pgd', eps: 0.1, samples: 100, referenceRobust: iterativeRobust, otherRobust: 60, otherOnly: 0 }] })['iterative-vs-single-step'];
    expect(single(61)).toBe('pass');
    expect(single(62)).toBe('warn');
    // Per sample as well as overall: Square flipping 2 samples the gradient search missed warns.
    const square = (otherOnly: number) => statuses({ ...sound(), gradientFree: { ...sound().gradientFree!, otherOnly } })['gradient-free-vs-gradient'];
    expect(square(1)).toBe('pass');
    expect(square(2)).toBe('warn');
    const monotone = (resisted: number) => statuses({ ...sound(), monotone: { eps: 0.3, flippedBefore: 60, resisted } }).monotone;
    expect(monotone(1)).toBe('pass');
    expect(monotone(2)).toBe('warn');
  });

  it('needs finite, non-zero gradients for 99 % of samples', () => {
    // Issue 5: input gradients finite and non-zero for at least 99 % of samples.
    expect(statuses({ ...sound(), gradients: { samples: 100, nonFinite: 0, zero: 1 } }).gradients).toBe('pass');
    expect(statuses({ ...sound(), gradients: { samples: 100, nonFinite: 1, zero: 1 } }).gradients).toBe('warn');
  });

  it('warns when the large budget leaves more robust than a constant prediction can be right', () => {
    // At L∞ 0.5 every image can become flat grey, whose one prediction is right for at most the largest class share.
    expect(statuses({ ...sound(), largeBudget: { eps: 0.5, robust: 10 } })['large-budget']).toBe('pass');
    expect(statuses({ ...sound(), largeBudget: { eps: 0.5, robust: 11 } })['large-budget']).toBe('warn');
  });

  it('warns on saturated probability outputs, never on logits, and skips without the raw outputs', () => {
    expect(statuses({ ...sound(), saturation: { outputKind: 'probabilities', rows: 100, topOne: 90, saturatedRows: 2 } }).saturation).toBe('warn');
    expect(statuses({ ...sound(), saturation: { outputKind: 'logits', rows: 100, topOne: 90, saturatedRows: 90 } }).saturation).toBe('pass');
    expect(statuses({ ...sound(), saturation: null }).saturation).toBe('skip');
  });

  it('skips the search checks when the sweep had no positive budget', () => {
    const none: HealthEvidence = { ...sound(), reference: null, monotone: null, largeBudget: null, singleStep: [], gradientFree: null, convergence: null, noise: [] };
    const s = statuses(none);
    for (const id of ['monotone', 'large-budget', 'iterative-vs-single-step', 'gradient-free-vs-gradient', 'convergence', 'noise'] as const) expect(s[id]).toBe('skip');
    expect(s.gradients).toBe('pass');
  });
});

describe('health.csv', () => {
  it('has the header check,status,detail and quotes details with commas', () => {
    const csv = healthCsv(evaluateHealth(sound()));
    const lines = csv.trimEnd().split('\n');
    expect(lines[0]).toBe('check,status,detail');
    expect(lines).toHaveLength(9);
    expect(lines[2]).toMatch(/^large-budget,pass,"pgd at ε = 0\.5 .*"$/);
  });
});
