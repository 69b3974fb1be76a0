/**
 * What Brink finds out about a loaded model: input layout and size, class count, whether the
 * output is logits or probabilities, and the parameter count. Shared by the tfjs and ONNX loaders.
 */
import * as tf from '@tensorflow/tfjs';
import type { Layout, ModelDescription, OnnxDetails, OutputKind } from '../types.ts';
import { createRng } from '../random/rng.ts';

/** What a loader knows about its model before any detection. */
export interface ModelFacts {
  readonly format: ModelDescription['format'];
  /** Declared input shape, batch included; null for a free dimension. */
  readonly inputShape: readonly (number | null)[];
  /** True when the graph visibly ends in a softmax (activation, layer or op). */
  readonly finalSoftmax: boolean;
  readonly parameterCount: number;
  /** The model's own function, [N, …] → [N, K]; used for the probe pass. */
  readonly forward: (input: tf.Tensor4D) => tf.Tensor2D;
  /** Notes the loader already has (one sentence each). */
  readonly notes?: readonly string[];
  readonly onnx?: OnnxDetails;
}

/** Height, width and channels of a rank-4 input shape read in a given layout (null = free). */
export interface InputDimensions {
  readonly height: number | null;
  readonly width: number | null;
  readonly channels: number | null;
}

/** Seed of the probe input, fixed so that a description is the same on every load. */
const PROBE_SEED = 20240611;
const PROBE_BATCH = 2;
/** Tolerance on row sums for "this output is a probability vector". */
const PROBABILITY_SUM_TOLERANCE = 1e-4;

function looksLikeChannels(v: number | null | undefined): boolean {
  return v === 1 || v === 3 || v === 4;
}

/** Reads height, width and channels from a [N, a, b, c] shape in the given layout. */
export function inputDimensions(inputShape: readonly (number | null)[], layout: Layout): InputDimensions {
  const [, a = null, b = null, c = null] = inputShape;
  return layout === 'nhwc' ? { height: a, width: b, channels: c } : { height: b, width: c, channels: a };
}

function formatShape(shape: readonly (number | null)[]): string {
  return `[${shape.map((d) => (d === null ? '?' : String(d))).join(', ')}]`;
}

/** Guesses NHWC vs NCHW from where a channel count (1, 3 or 4) sits; notes when unsure. */
export function detectLayout(inputShape: readonly (number | null)[]): { layout: Layout; notes: string[] } {
  const first = inputShape[1];
  const last = inputShape[3];
  const shape = formatShape(inputShape);
  if (looksLikeChannels(last) && !looksLikeChannels(first)) return { layout: 'nhwc', notes: [] };
  if (looksLikeChannels(first) && !looksLikeChannels(last)) return { layout: 'nchw', notes: [] };
  if (looksLikeChannels(first) && looksLikeChannels(last)) {
    return { layout: 'nhwc', notes: [`Input shape ${shape} could be NHWC or NCHW; assumed NHWC, change the layout if that is wrong.`] };
  }
  return {
    layout: 'nhwc',
    notes: [`Input shape ${shape} has no 1, 3 or 4 channel dimension in position 1 or 3; assumed NHWC, check the layout.`],
  };
}

/** True when every row of a [N, K] array is non-negative and sums to 1 within the tolerance. */
export function rowsAreProbabilities(values: ArrayLike<number>, rows: number, classes: number): boolean {
  if (rows * classes !== values.length || classes === 0) return false;
  for (let r = 0; r < rows; r++) {
    let sum = 0;
    for (let k = 0; k < classes; k++) {
      const v = values[r * classes + k]!;
      if (!(v >= 0)) return false;
      sum += v;
    }
    if (Math.abs(sum - 1) > PROBABILITY_SUM_TOLERANCE) return false;
  }
  return true;
}

interface ProbeResult {
  readonly numClasses: number;
  readonly probabilities: boolean;
}

/** One forward pass on seeded uniform input in [0,1); reads the class count and the output kind. */
function probe(facts: ModelFacts, shape: readonly number[]): ProbeResult {
  const size = shape.reduce((a, b) => a * b, 1);
  const values = createRng(PROBE_SEED).uniformArray(size, 0, 1);
  let out: { data: Float32Array; shape: number[] };
  try {
    out = tf.tidy(() => {
      const y = facts.forward(tf.tensor4d(values, shape as [number, number, number, number]));
      return { data: y.dataSync() as Float32Array, shape: y.shape.slice() };
    });
  } catch (err) {
    const detail = err instanceof Error ? err.message : String(err);
    throw new Error(`The model failed a test forward pass on an input of shape ${formatShape(shape)}: ${detail}`);
  }
  const rows = out.shape[0] ?? 0;
  const classes = out.shape[out.shape.length - 1] ?? 0;
  return { numClasses: classes, probabilities: rowsAreProbabilities(out.data, rows, classes) };
}

function probeShape(inputShape: readonly (number | null)[]): number[] | null {
  const rest = inputShape.slice(1);
  if (rest.length !== 3 || rest.some((d) => d === null)) return null;
  return [inputShape[0] ?? PROBE_BATCH, ...(rest as number[])];
}

/** Builds the ModelDescription from a loader's facts, running one probe pass when the size is known. */
export function describeModel(facts: ModelFacts): ModelDescription {
  const notes = [...(facts.notes ?? [])];
  const detected = detectLayout(facts.inputShape);
  notes.push(...detected.notes);
  const dims = inputDimensions(facts.inputShape, detected.layout);
  if (dims.height === null || dims.width === null || dims.channels === null) {
    notes.push(`Input shape ${formatShape(facts.inputShape)} has free image dimensions; set the input size to use (height, width and channels).`);
  }
  const shape = probeShape(facts.inputShape);
  let numClasses = 0;
  let outputKind: OutputKind = facts.finalSoftmax ? 'probabilities' : 'logits';
  if (shape !== null) {
    const result = probe(facts, shape);
    numClasses = result.numClasses;
    if (!facts.finalSoftmax && result.probabilities) {
      outputKind = 'probabilities';
      notes.push('The output rows are non-negative and sum to 1 on a test input, so they are treated as probabilities.');
    }
  } else if (!facts.finalSoftmax) {
    notes.push('The output kind could not be probed without a fixed input size; assumed logits.');
  }
  const description: ModelDescription = {
    format: facts.format,
    inputShape: facts.inputShape.slice(),
    layout: detected.layout,
    height: dims.height ?? 0,
    width: dims.width ?? 0,
    channels: dims.channels ?? 0,
    numClasses,
    outputKind,
    parameterCount: facts.parameterCount,
    notes,
  };
  return facts.onnx === undefined ? description : { ...description, onnx: facts.onnx };
}
