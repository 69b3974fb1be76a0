import { describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { useBackend } from './helpers/backend.ts';
import { WILSON_REFERENCE } from './helpers/wilsonReference.ts';
import { wilsonInterval } from '../src/core/stats/wilson.ts';
import { createRng } from '../src/core/random/rng.ts';

describe('project smoke', () => {
  it('starts the WASM backend in Node', async () => {
    const info = await useBackend('wasm');
    expect(tf.getBackend()).toBe('wasm');
    expect(info.simd).toBe(true);
  });
  it('Wilson intervals match a reference statistics library', () => {
    // Reference: statsmodels proportion_confint(method="wilson") values quoted in issue 5 (Wilson 1927), to 4 decimals.
    for (const reference of WILSON_REFERENCE) {
      const { low, high } = wilsonInterval(reference.successes, reference.trials);
      expect(low).toBeCloseTo(reference.low, 4);
      expect(high).toBeCloseTo(reference.high, 4);
    }
  });
  it('seeded generator repeats exactly and streams differ', () => {
    const a = createRng(42).uniformArray(5, 0, 1);
    const b = createRng(42).uniformArray(5, 0, 1);
    const c = createRng(43).uniformArray(5, 0, 1);
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
  });
});
