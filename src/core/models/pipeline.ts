/**
 * The differentiable pixel-space classifier: pixels x ∈ [0,1] (NHWC) → range scaling →
 * (v − mean)/std → the model's layout → forward → logits (log-probabilities for a probability output).
 */
import * as tf from '@tensorflow/tfjs';
import type { InputRange, LoadedModel, LogitsFn, ModelDescription, OutputKind, Preprocessing } from '../types.ts';
import { inputDimensions } from './describeModel.ts';

/** v = scale·x + offset maps pixels in [0,1] onto the model's expected range. */
const RANGE_MAPS: Readonly<Record<InputRange, { readonly scale: number; readonly offset: number }>> = {
  '0,1': { scale: 1, offset: 0 },
  '0,255': { scale: 255, offset: 0 },
  '-1,1': { scale: 2, offset: -1 },
};

/**
 * Floor under probabilities before the log. Why: once a softmax saturates in float32 the losing
 * classes' probabilities underflow to 0 (and the winner's rounds to 1), and nothing applied
 * afterwards can bring their gradient back: the search sees a flat loss (starved gradients) and
 * robustness can look better than it is, which is why logit outputs are preferred. The floor only
 * keeps log(0) = −∞ and its NaN gradient out of the losses. Rows are not renormalised: they sum to
 * one up to rounding already, and dividing by the sum would add a gradient term the model lacks.
 */
const PROBABILITY_FLOOR = 1e-30;

/** The default preprocessing for a model: identity scaling in the layout that was detected. */
export function preprocessingFor(description: ModelDescription): Preprocessing {
  return { inputRange: '0,1', mean: [0], std: [1], layout: description.layout };
}

/** Channels of the model input when read in the given layout (falls back to the description). */
function channelsFor(pre: Preprocessing, description: ModelDescription): number {
  return inputDimensions(description.inputShape, pre.layout).channels ?? description.channels;
}

function checkPerChannel(label: 'mean' | 'std', values: readonly number[], channels: number): string | null {
  if (values.length === 0) return `The ${label} is empty; give one value or one per channel.`;
  if (values.length !== 1 && channels > 0 && values.length !== channels) {
    return `The ${label} has ${values.length} values but the model input has ${channels} channel(s); give one value or ${channels}.`;
  }
  if (values.some((v) => !Number.isFinite(v))) return `Every ${label} value must be a finite number.`;
  if (label === 'std' && values.some((v) => v <= 0)) return 'Every std value must be positive.';
  return null;
}

/** Returns an error message for preprocessing that cannot work with this model, or null when it is usable. */
export function validatePreprocessing(pre: Preprocessing, description: ModelDescription): string | null {
  if (!(pre.inputRange in RANGE_MAPS)) return `Unknown input range "${pre.inputRange}"; use 0,1 or 0,255 or -1,1.`;
  if (pre.layout !== 'nhwc' && pre.layout !== 'nchw') return `Unknown layout "${String(pre.layout)}"; use nhwc or nchw.`;
  const channels = channelsFor(pre, description);
  if (channels > 0 && channels !== 1 && channels !== 3 && channels !== 4) {
    return `Read as ${pre.layout.toUpperCase()}, the model input [${description.inputShape.map((d) => d ?? '?').join(', ')}] has ${channels} channels; images have 1, 3 or 4, so try the other layout.`;
  }
  return checkPerChannel('mean', pre.mean, channels) ?? checkPerChannel('std', pre.std, channels);
}

/** Per-channel a, b with input = a·x + b, folding range scaling and (v − mean)/std into one affine map. */
function affineCoefficients(pre: Preprocessing): { a: number[]; b: number[] } {
  const { scale, offset } = RANGE_MAPS[pre.inputRange];
  const n = Math.max(pre.mean.length, pre.std.length);
  const a: number[] = [];
  const b: number[] = [];
  for (let c = 0; c < n; c++) {
    const mean = pre.mean.length === 1 ? pre.mean[0]! : pre.mean[c]!;
    const std = pre.std.length === 1 ? pre.std[0]! : pre.std[c]!;
    a.push(scale / std);
    b.push((offset - mean) / std);
  }
  return { a, b };
}

/**
 * Builds the pixel-space classifier the attacks differentiate. Throws when the preprocessing does not
 * fit the model. `outputKind` overrides the detected kind (e.g. the user knows better).
 */
export function makeLogitsFn(model: LoadedModel, pre: Preprocessing, outputKind?: OutputKind): LogitsFn {
  const problem = validatePreprocessing(pre, model.description);
  if (problem !== null) throw new Error(problem);
  const kind = outputKind ?? model.description.outputKind;
  const { a, b } = affineCoefficients(pre);
  return (pixels: tf.Tensor4D): tf.Tensor2D =>
    tf.tidy(() => {
      const channels = pixels.shape[3];
      if (a.length > 1 && a.length !== channels) {
        throw new Error(`The preprocessing has ${a.length} per-channel values but the pixels have ${channels} channels.`);
      }
      const scaled = a.length === 1 ? tf.add(tf.mul(pixels, a[0]!), b[0]!) : tf.add(tf.mul(pixels, tf.tensor1d(a)), tf.tensor1d(b));
      const input = (pre.layout === 'nchw' ? tf.transpose(scaled, [0, 3, 1, 2]) : scaled) as tf.Tensor4D;
      const out = model.forward(input);
      return kind === 'probabilities' ? tf.log(tf.maximum(out, PROBABILITY_FLOOR)) : out;
    });
}
