/**
 * Test models: one small convolutional net (conv 3×3 valid → flatten → dense → dense), built either
 * as a tfjs LayersModel (saved to in-memory artifacts and turned into model.json + .bin bytes) or as
 * a hand-written graph-model model.json. The same seeded weights feed the float64 reference.
 */
import * as tf from '@tensorflow/tfjs';
import type { Layout, NamedBytes } from '../../src/core/types.ts';
import { createRng } from '../../src/core/random/rng.ts';

export interface SmallNetSpec {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly filters: number;
  readonly hidden: number;
  readonly classes: number;
  readonly layout: Layout;
  readonly activation: 'tanh' | 'relu';
  readonly softmax: boolean;
}

export interface SmallNetWeights {
  /** [3, 3, C, F] */
  readonly w1: Float32Array;
  readonly b1: Float32Array;
  /** [D, hidden] with D = (H−2)(W−2)F */
  readonly w2: Float32Array;
  readonly b2: Float32Array;
  /** [hidden, classes] */
  readonly w3: Float32Array;
  readonly b3: Float32Array;
}

/** Flattened feature count after the valid 3×3 convolution. */
export function flatSize(spec: SmallNetSpec): number {
  return (spec.height - 2) * (spec.width - 2) * spec.filters;
}

/** Closed-form parameter count: conv 3·3·C·F + F, dense D·h + h, dense h·K + K. */
export function closedFormParameters(spec: SmallNetSpec): number {
  return 9 * spec.channels * spec.filters + spec.filters + flatSize(spec) * spec.hidden + spec.hidden + spec.hidden * spec.classes + spec.classes;
}

function scaled(rng: ReturnType<typeof createRng>, n: number, scale: number): Float32Array {
  const out = rng.normalArray(n);
  for (let i = 0; i < n; i++) out[i] = out[i]! * scale;
  return out;
}

/** Seeded weights with roughly unit-variance activations (scale 1/√fan-in). */
export function randomWeights(spec: SmallNetSpec, seed: number): SmallNetWeights {
  const rng = createRng(seed);
  const fanConv = 9 * spec.channels;
  const d = flatSize(spec);
  return {
    w1: scaled(rng, fanConv * spec.filters, 1 / Math.sqrt(fanConv)),
    b1: scaled(rng, spec.filters, 0.1),
    w2: scaled(rng, d * spec.hidden, 1 / Math.sqrt(d)),
    b2: scaled(rng, spec.hidden, 0.1),
    w3: scaled(rng, spec.hidden * spec.classes, 1 / Math.sqrt(spec.hidden)),
    b3: scaled(rng, spec.classes, 0.1),
  };
}

/** Splits bytes into `count` shards at uneven cuts (not on weight boundaries), named like tfjs does. */
function shardBytes(bytes: Uint8Array, count: number, prefix: string): NamedBytes[] {
  const shards: NamedBytes[] = [];
  for (let i = 0; i < count; i++) {
    const start = Math.floor((bytes.length * i) / count) + (i === 0 ? 0 : 3);
    const end = i === count - 1 ? bytes.length : Math.floor((bytes.length * (i + 1)) / count) + 3;
    shards.push({ name: `${prefix}group1-shard${i + 1}of${count}.bin`, bytes: bytes.slice(start, end) });
  }
  return shards;
}

function jsonBytes(value: unknown): Uint8Array {
  return new TextEncoder().encode(JSON.stringify(value));
}

export interface FileOptions {
  /** Number of .bin shards (default 1). */
  readonly shards?: number;
  /** Folder prefix put in front of every file name, e.g. 'model/'. */
  readonly prefix?: string;
  /** Name of the model JSON file (default model.json). */
  readonly jsonName?: string;
}

/** Builds the LayersModel for a spec (tfjs layers; the caller disposes it). */
export function buildLayersModel(spec: SmallNetSpec, weights: SmallNetWeights): tf.Sequential {
  const { height: h, width: w, channels: c } = spec;
  const model = tf.sequential();
  if (spec.layout === 'nchw') model.add(tf.layers.permute({ dims: [2, 3, 1], inputShape: [c, h, w] }));
  model.add(
    tf.layers.conv2d({
      filters: spec.filters,
      kernelSize: 3,
      padding: 'valid',
      activation: spec.activation,
      ...(spec.layout === 'nhwc' ? { inputShape: [h, w, c] } : {}),
    }),
  );
  model.add(tf.layers.flatten());
  model.add(tf.layers.dense({ units: spec.hidden, activation: spec.activation }));
  model.add(tf.layers.dense({ units: spec.classes, activation: spec.softmax ? 'softmax' : 'linear' }));
  const d = flatSize(spec);
  model.setWeights([
    tf.tensor4d(weights.w1, [3, 3, c, spec.filters]),
    tf.tensor1d(weights.b1),
    tf.tensor2d(weights.w2, [d, spec.hidden]),
    tf.tensor1d(weights.b2),
    tf.tensor2d(weights.w3, [spec.hidden, spec.classes]),
    tf.tensor1d(weights.b3),
  ]);
  return model;
}

/** Saves a LayersModel through tf.io.withSaveHandler and returns model.json + shards as dropped files. */
export async function layersModelToFiles(model: tf.LayersModel, options: FileOptions = {}): Promise<NamedBytes[]> {
  let saved: tf.io.ModelArtifacts | null = null;
  await model.save(
    tf.io.withSaveHandler(async (artifacts) => {
      saved = artifacts;
      return { modelArtifactsInfo: { dateSaved: new Date(), modelTopologyType: 'JSON' } };
    }),
  );
  const artifacts = saved as tf.io.ModelArtifacts | null;
  if (artifacts === null || artifacts.weightData === undefined) throw new Error('save handler got no artifacts');
  const data = new Uint8Array(tf.io.CompositeArrayBuffer.join(artifacts.weightData));
  const prefix = options.prefix ?? '';
  const shards = shardBytes(data, options.shards ?? 1, prefix);
  const json = {
    format: artifacts.format,
    generatedBy: artifacts.generatedBy,
    convertedBy: artifacts.convertedBy,
    modelTopology: artifacts.modelTopology,
    weightsManifest: [{ paths: shards.map((s) => s.name.slice(prefix.length)), weights: artifacts.weightSpecs }],
  };
  return [{ name: `${prefix}${options.jsonName ?? 'model.json'}`, bytes: jsonBytes(json) }, ...shards];
}

/** Convenience: LayersModel built, saved and disposed; returns its files. */
export async function layersModelFiles(spec: SmallNetSpec, weights: SmallNetWeights, options: FileOptions = {}): Promise<NamedBytes[]> {
  const model = buildLayersModel(spec, weights);
  try {
    return await layersModelToFiles(model, options);
  } finally {
    model.dispose();
  }
}
