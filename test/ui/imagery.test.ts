import { describe, expect, it } from 'vitest';
import { DIVERGING, divergingColour, modelInputToRgba, perturbationToRgba, pixelsToRgba } from '../../src/ui/lib/imagery.ts';
import { buffersOf } from '../../src/worker/protocol.ts';
import { spreadIndices } from '../../src/worker/preview.ts';

// Expected bytes follow from the definitions (closed form): v·255 rounded, linear interpolation of colours.
describe('pixel rendering', () => {
  it('writes RGBA from grey and colour pixels', () => {
    expect(Array.from(pixelsToRgba(new Float32Array([0, 0.5, 1]), { height: 1, width: 1, channels: 3 }))).toEqual([0, 128, 255, 255]);
    expect(Array.from(pixelsToRgba(new Float32Array([0.2]), { height: 1, width: 1, channels: 1 }))).toEqual([51, 51, 51, 255]);
  });

  it('reads NCHW model inputs channel-first and stretches their range', () => {
    // 1×2 image, 3 channels, channel-first: R = [−1, 1], G = [0, 0], B = [1, −1]
    const nchw = new Float32Array([-1, 1, 0, 0, 1, -1]);
    const rgba = modelInputToRgba(nchw, { height: 1, width: 2, channels: 3 }, 'nchw', -1, 1);
    expect(Array.from(rgba)).toEqual([0, 128, 255, 255, 255, 128, 0, 255]);
  });

  it('puts zero change at the middle colour and the largest change at an end', () => {
    expect(divergingColour(0)).toEqual([...DIVERGING.middle]);
    expect(divergingColour(1)).toEqual([...DIVERGING.positive]);
    expect(divergingColour(-2)).toEqual([...DIVERGING.negative]);
    const original = new Float32Array([0.5, 0.5, 0.5, 0.5, 0.5, 0.5]);
    const changed = new Float32Array([0.52, 0.52, 0.52, 0.49, 0.49, 0.49]);
    const { rgba, scale } = perturbationToRgba(original, changed, { height: 1, width: 2, channels: 3 });
    expect(scale).toBeCloseTo(0.02, 6);
    expect(Array.from(rgba.subarray(0, 3))).toEqual([...DIVERGING.positive]);
    expect(Array.from(rgba.subarray(4, 7))).toEqual(divergingColour(-0.5));
  });
});

describe('worker helpers', () => {
  it('lists each buffer once for a transfer', () => {
    const a = new Float32Array(4);
    expect(buffersOf([a, new Uint8Array(a.buffer, 4), new Uint8Array(2)])).toHaveLength(2);
  });

  it('spreads preview samples over the classes round-robin', () => {
    expect(spreadIndices(new Int32Array([0, 0, 0, 1, 1, 2]), 4)).toEqual([0, 3, 5, 1]);
    expect(spreadIndices(new Int32Array([1, 1]), 5)).toEqual([0, 1]);
  });
});
