import { describe, expect, it } from 'vitest';
import { DEFAULT_FLIP_SETTINGS, FLIP_BINS, flipSettingsFrom, resolvedMaxEps, toFlipRequest } from '../../src/ui/lib/flipPlan.ts';
import { validateFlipOptions } from '../../src/core/flips/searches.ts';
import { DEFAULT_PREPROCESSING } from '../../src/core/types.ts';

const ctx = { pixelsPerImage: 16 * 16 * 3, seed: 4, batchSize: 8, preprocessing: DEFAULT_PREPROCESSING };

describe('flip-budget form → worker request', () => {
  it('leaves the default largest budget to the worker and resolves it for display', () => {
    const build = toFlipRequest(DEFAULT_FLIP_SETTINGS, ctx);
    expect(build.ok).toBe(true);
    if (!build.ok) return;
    expect(build.request).toMatchObject({ search: 'pgd', norm: 'linf', maxEps: null, options: {}, limit: 24, seed: 4, batchSize: 8, binCount: FLIP_BINS });
    // Closed form: within L∞ 0.5 every pixel can reach mid-grey; half a grey level is 1/510.
    expect(build.maxEps).toBe(0.5);
    expect(build.tol).toBe(1 / 510);
    // L2: a change of 0.5 on each of the 768 values has length 0.5·√768.
    expect(resolvedMaxEps({ ...DEFAULT_FLIP_SETTINGS, norm: 'l2' }, ctx.pixelsPerImage)).toBeCloseTo(0.5 * Math.sqrt(768), 12);
  });

  it('reads typed budgets like the budget editor and passes iterations to the bisecting searches only', () => {
    const typed = toFlipRequest({ ...DEFAULT_FLIP_SETTINGS, maxEps: '64/255', tol: '0.5/255', steps: 5, limit: null }, ctx);
    expect(typed.ok && typed.request).toMatchObject({ maxEps: 64 / 255, tol: 0.5 / 255, options: { steps: 5 }, limit: null });
    const deepfool = toFlipRequest({ ...DEFAULT_FLIP_SETTINGS, search: 'deepfool', steps: 5 }, ctx);
    expect(deepfool.ok && deepfool.request.options).toEqual({});
    // The options the form sends are accepted by the core's own validation of each search.
    if (typed.ok) expect(validateFlipOptions('pgd', typed.request.options)).toMatchObject({ steps: 5, loss: 'margin' });
    if (deepfool.ok) expect(() => validateFlipOptions('deepfool', deepfool.request.options)).not.toThrow();
  });

  it('says what is wrong', () => {
    const bad = (change: Partial<typeof DEFAULT_FLIP_SETTINGS>): string => {
      const b = toFlipRequest({ ...DEFAULT_FLIP_SETTINGS, ...change }, ctx);
      return b.ok ? '' : b.error;
    };
    expect(bad({ maxEps: 'big' })).toContain('big');
    expect(bad({ maxEps: '2' })).toContain('above 1');
    expect(bad({ norm: 'l2', maxEps: '2' })).toBe('');
    expect(bad({ maxEps: '0.01', tol: '0.02' })).toContain('smaller than the largest budget');
    expect(bad({ tol: '0' })).toContain('tolerance');
    expect(bad({ limit: 0 })).toContain('whole number');
  });

  it('reads stored settings back, replacing anything unusable by the default', () => {
    expect(flipSettingsFrom({ search: 'apgd-ce', norm: 'l2', maxEps: '3', tol: '', limit: null, steps: 7 })).toEqual({ search: 'apgd-ce', norm: 'l2', maxEps: '3', tol: '', limit: null, steps: 7 });
    expect(flipSettingsFrom({ search: 'square', norm: 'l1', limit: -3, steps: 'many' })).toEqual(DEFAULT_FLIP_SETTINGS);
    expect(flipSettingsFrom(undefined)).toBe(DEFAULT_FLIP_SETTINGS);
  });
});
