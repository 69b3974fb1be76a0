/**
 * Seeded random convolution and pooling configurations for the kernel tests: shapes, strides,
 * paddings ('same', 'valid', explicit, a number with a rounding mode), dilations and depth
 * multipliers. Only configurations tfjs accepts (positive output size) are produced.
 */
import * as tf from '@tensorflow/tfjs';
import type { Rng } from '../../src/core/random/rng.ts';

export type Pad = 'same' | 'valid' | number | tf.backend_util.ExplicitPadding;

export interface WindowCase {
  readonly inShape: [number, number, number, number];
  /** Conv: [fh, fw, inC, outC]; depthwise: [fh, fw, inC, mult]; pool: [fh, fw, C, 1]. */
  readonly filterShape: [number, number, number, number];
  readonly strides: [number, number];
  readonly dilations: [number, number];
  readonly pad: Pad;
  readonly dimRoundingMode?: 'floor' | 'round' | 'ceil';
  readonly outShape: [number, number, number, number];
  /** Human-readable summary for failure messages. */
  readonly label: string;
}

export interface CaseOptions {
  readonly kind: 'conv' | 'depthwise' | 'pool';
  /** Allow dilation > 1 (only combined with stride 1, as tfjs requires). */
  readonly dilate: boolean;
}

const between = (rng: Rng, lo: number, hi: number): number => lo + rng.int(hi - lo + 1);

function randomPad(rng: Rng): { pad: Pad; dimRoundingMode?: 'floor' | 'round' | 'ceil' } {
  const pick = rng.int(4);
  if (pick === 0) return { pad: 'same' };
  if (pick === 1) return { pad: 'valid' };
  if (pick === 2) {
    return { pad: [[0, 0], [rng.int(3), rng.int(3)], [rng.int(3), rng.int(3)], [0, 0]] };
  }
  const modes = ['floor', 'round', 'ceil'] as const;
  return { pad: between(rng, 1, 2), dimRoundingMode: modes[rng.int(3)]! };
}

/** One random configuration of the given kind. */
export function randomWindowCase(rng: Rng, options: CaseOptions): WindowCase {
  for (;;) {
    const inShape: [number, number, number, number] = [between(rng, 1, 3), between(rng, 3, 11), between(rng, 3, 11), between(rng, 1, 4)];
    const last = options.kind === 'pool' ? 1 : between(rng, 1, 3);
    const filterShape: [number, number, number, number] = [between(rng, 1, 4), between(rng, 1, 4), inShape[3], last];
    const dilated = options.dilate && rng.next() < 0.5;
    const strides: [number, number] = dilated ? [1, 1] : [between(rng, 1, 3), between(rng, 1, 3)];
    const dilations: [number, number] = dilated ? [between(rng, 1, 3), between(rng, 2, 3)] : [1, 1];
    const { pad, dimRoundingMode } = randomPad(rng);
    const info =
      options.kind === 'pool'
        ? tf.backend_util.computePool2DInfo(inShape, [filterShape[0], filterShape[1]], strides, 1, pad, dimRoundingMode)
        : tf.backend_util.computeConv2DInfo(inShape, filterShape, strides, dilations, pad, dimRoundingMode, options.kind === 'depthwise');
    if (info.outHeight < 1 || info.outWidth < 1) continue;
    const outShape: [number, number, number, number] = [inShape[0], info.outHeight, info.outWidth, info.outChannels];
    const label = `in ${inShape} filter ${filterShape} strides ${strides} dilations ${dilations} pad ${JSON.stringify(pad)}${dimRoundingMode ? ` ${dimRoundingMode}` : ''}`;
    return { inShape, filterShape, strides, dilations, pad, ...(dimRoundingMode ? { dimRoundingMode } : {}), outShape, label };
  }
}

/** The padding-related attributes of a kernel call for a case. */
export function padAttrs(c: WindowCase): Record<string, unknown> {
  return c.dimRoundingMode ? { pad: c.pad, dimRoundingMode: c.dimRoundingMode } : { pad: c.pad };
}
