/**
 * When the WebAssembly binaries cannot be loaded, Brink falls back to the cpu backend and says so
 * (issue 2: "fall back to the cpu backend with a visible notice only when WASM cannot start").
 * Runs in its own vitest worker process, so the broken WASM path does not affect other files.
 */
import { describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { initBackend, formatBackend } from '../src/core/backend/initBackend.ts';

describe('backend fallback', () => {
  it('runs on cpu with a notice when the WASM files are missing', async () => {
    const info = await initBackend({ wasmPath: '/nonexistent/brink-wasm/' });
    expect(info.name).toBe('cpu');
    expect(tf.getBackend()).toBe('cpu');
    expect(info.notice).toMatch(/WebAssembly backend could not start/);
    expect(formatBackend(info)).toBe('plain JavaScript (cpu)');
    // The fallback still computes: a known product (closed form 1·3 + 2·4 = 11).
    const v = tf.tidy(() => tf.dot(tf.tensor1d([1, 2]), tf.tensor1d([3, 4])).dataSync()[0]);
    expect(v).toBe(11);
  });
});
