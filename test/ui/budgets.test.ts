import { describe, expect, it } from 'vitest';
import { budgetsToText, describeEps, greyLevels, MAX_BUDGETS, parseBudgets, parseBudgetValue } from '../../src/ui/lib/budgets.ts';

// Expected values are plain arithmetic on the written budgets (closed form): k/255 is k divided by 255.
describe('budget editor parsing', () => {
  it('reads decimals and fractions and sorts them', () => {
    const parsed = parseBudgets('8/255, 0 2/255;0.01', 'linf');
    expect(parsed).toEqual({ ok: true, values: [0, 2 / 255, 0.01, 8 / 255] });
  });

  it('expands start:stop:step with both ends included', () => {
    expect(parseBudgets('0:8/255:2/255', 'linf')).toEqual({ ok: true, values: [0, 2 / 255, 4 / 255, 6 / 255, 8 / 255] });
    // 0.3 / 0.1 is 2.9999999999999996 in binary floating point; the stop must still be included.
    const tenths = parseBudgets('0:0.3:0.1', 'l2');
    expect(tenths.ok && tenths.values.length).toBe(4);
    expect(tenths.ok && tenths.values[3]).toBeCloseTo(0.3, 15);
  });

  it('names the offending token', () => {
    const bad = parseBudgets('0, 2/255, eight', 'linf');
    expect(bad.ok).toBe(false);
    expect(!bad.ok && bad.error).toContain('eight');
    expect(parseBudgets('', 'linf').ok).toBe(false);
    expect(parseBudgetValue('1/0')).toBeNull();
    expect(parseBudgetValue('-1')).toBeNull();
  });

  it('refuses L∞ budgets above the whole pixel range, duplicates, and runaway ranges', () => {
    expect(parseBudgets('1.5', 'linf').ok).toBe(false);
    expect(parseBudgets('1.5', 'l2')).toEqual({ ok: true, values: [1.5] });
    const twice = parseBudgets('2/255, 0.00784313725490196', 'linf');
    expect(!twice.ok && twice.error).toContain('twice');
    expect(parseBudgets('0:1:0.001', 'linf').ok).toBe(false);
    expect(parseBudgets(`0:${MAX_BUDGETS - 1}:1`, 'l2').ok).toBe(true);
  });

  it('writes budgets in grey levels of an 8-bit image', () => {
    expect(greyLevels(8 / 255)).toBe('8/255');
    expect(greyLevels(0.01)).toBe('2.55/255');
    expect(describeEps(8 / 255)).toBe('0.03137 (8/255)');
    expect(budgetsToText([0, 4 / 255, 0.01])).toBe('0, 4/255, 0.01');
    const roundTrip = parseBudgets(budgetsToText([0, 1 / 255, 8 / 255]), 'linf');
    expect(roundTrip).toEqual({ ok: true, values: [0, 1 / 255, 8 / 255] });
  });
});
