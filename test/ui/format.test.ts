import { describe, expect, it } from 'vitest';
import { count, duration, parseChannelList, percent, runFigures } from '../../src/ui/lib/format.ts';

// Expected strings follow from the definitions (closed form): 60 s to the minute, 3-digit groups.
describe('formatting', () => {
  it('prints durations', () => {
    expect(duration(42.4)).toBe('42 s');
    expect(duration(185)).toBe('3 min 05 s');
    expect(duration(3720)).toBe('1 h 02 min');
    expect(duration(Number.POSITIVE_INFINITY)).toBe('–');
  });

  it('prints percentages and counts', () => {
    expect(percent(0.9312)).toBe('93.1 %');
    expect(percent(Number.NaN)).toBe('–');
    expect(count(1234567)).toBe('1,234,567');
    expect(count(999)).toBe('999');
  });

  it('derives fraction, rate and time left from a progress report', () => {
    expect(runFigures(250, 1000, 50)).toEqual({ fraction: 0.25, rate: 50, secondsLeft: 15 });
    expect(runFigures(5, 0, 0).fraction).toBe(0);
    expect(runFigures(10, 100, 0).secondsLeft).toBe(Number.POSITIVE_INFINITY);
  });

  it('reads per-channel lists', () => {
    expect(parseChannelList('0.485, 0.456 0.406')).toEqual([0.485, 0.456, 0.406]);
    expect(parseChannelList('0.5, x')).toBeNull();
    expect(parseChannelList('')).toBeNull();
  });
});
