/**
 * Shared vocabulary of the core. Everything here is plain data or a tensor function type,
 * so the worker, the CLI and the UI can all speak it.
 */
import type * as tf from '@tensorflow/tfjs';

/** Threat-model norm of the perturbation δ = x' − x, measured in pixel space x ∈ [0,1]. */
export type Norm = 'linf' | 'l2';

/** Memory layout of the model's own input tensor. Brink's pixel batches are always NHWC. */
export type Layout = 'nhwc' | 'nchw';

/** The value range the model expects before mean/std normalisation. */
export type InputRange = '0,1' | '0,255' | '-1,1';

/** Whether the model's last layer gives raw class scores or a probability vector. */
export type OutputKind = 'logits' | 'probabilities';

/** A file as the core sees it: a name (a relative path with '/' separators) and its bytes. */
export interface NamedBytes {
  readonly name: string;
  readonly bytes: Uint8Array;
}

/** How pixels x ∈ [0,1] (NHWC) become the model's input; part of the differentiable function. */
export interface Preprocessing {
  readonly inputRange: InputRange;
  /** Per-channel mean, applied after range scaling: (v − mean) / std. One value or one per channel. */
  readonly mean: readonly number[];
  readonly std: readonly number[];
  readonly layout: Layout;
}

export const DEFAULT_PREPROCESSING: Preprocessing = {
  inputRange: '0,1',
  mean: [0],
  std: [1],
  layout: 'nhwc',
};

/** What Brink found out about a loaded model. */
export interface ModelDescription {
  readonly format: 'layers' | 'graph' | 'onnx';
  /** The model's declared input shape, batch dimension included (null = free). */
  readonly inputShape: readonly (number | null)[];
  /** Layout detected from the input shape; the user may override it in Preprocessing. */
  readonly layout: Layout;
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly numClasses: number;
  /** Detected from the graph (a final softmax) or from a probe forward pass. */
  readonly outputKind: OutputKind;
  readonly parameterCount: number;
  /** Anything odd found while loading (e.g. a layout guess), one sentence each. */
  readonly notes: readonly string[];
  /** Present for ONNX models. */
  readonly onnx?: OnnxDetails;
}

/** What the ONNX loader reports about the file it read. */
export interface OnnxDetails {
  readonly opset: number;
  readonly inputName: string;
  readonly outputName: string;
  /** Node count per op type, e.g. { Conv: 3, Relu: 3 }. */
  readonly opHistogram: Readonly<Record<string, number>>;
  readonly producer: string;
}

/**
 * A classifier as the attacks see it: pixels x ∈ [0,1] in NHWC → logits [N, K].
 * Preprocessing and (for probability outputs) the log are inside, so gradients are taken
 * with respect to pixels. Must be differentiable with tf.grad; never called outside tf.tidy.
 */
export type LogitsFn = (pixels: tf.Tensor4D) => tf.Tensor2D;

/** A labelled set of images, already decoded and resized to the model's input size. */
export interface SampleSet {
  /** One name per sample (relative path as given). */
  readonly files: readonly string[];
  /** Class index per sample. */
  readonly labels: Int32Array;
  readonly classNames: readonly string[];
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  /** N·H·W·C floats in [0,1], NHWC order. */
  readonly pixels: Float32Array;
}

/**
 * A model loaded by any of the loaders (tfjs layers, tfjs graph, ONNX). `forward` is the model's
 * own function on its own input (already preprocessed, in its own layout); differentiable.
 * Pixel-space functions are built from it with makeLogitsFn (models/pipeline.ts).
 */
export interface LoadedModel {
  readonly description: ModelDescription;
  /** Raw model output [N, K] (logits or probabilities, see description.outputKind). */
  forward(input: tf.Tensor4D): tf.Tensor2D;
  dispose(): void;
}

/** Decodes one image file to RGBA bytes; the CLI uses a pure-JS decoder, the browser its own. */
export type ImageDecoder = (file: NamedBytes) => Promise<DecodedImage>;

export interface DecodedImage {
  readonly width: number;
  readonly height: number;
  /** width·height·4 bytes, RGBA, row-major. */
  readonly rgba: Uint8Array;
}
