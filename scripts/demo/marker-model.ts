/**
 * The demo classifier for the floor-marker images: a small CNN whose last layer gives logits,
 * seeded initialisation, and saving/loading as a tfjs LayersModel folder (model.json + weights.bin).
 */
import fs from 'node:fs';
import path from 'node:path';
import * as tf from '@tensorflow/tfjs';
import type { Rng } from '../../src/core/random/rng.ts';
import { MARKER_SIZE } from './markers.ts';

/** File names inside a model folder. */
export const MODEL_JSON = 'model.json';
export const WEIGHTS_BIN = 'weights.bin';

/**
 * conv 16 3×3 relu → max-pool 2 → conv 32 3×3 relu → max-pool 2 → dense 64 relu → dense K (linear:
 * logits). Input: pixels in [0,1], NHWC 32×32×3. Weights are drawn from `rng` (Glorot uniform
 * kernels, zero biases), so the same seed gives the same starting model.
 */
export function buildMarkerModel(numClasses: number, rng: Rng): tf.Sequential {
  const model = tf.sequential({
    name: 'floor_markers',
    layers: [
      tf.layers.conv2d({ name: 'conv1', inputShape: [MARKER_SIZE, MARKER_SIZE, 3], filters: 16, kernelSize: 3, activation: 'relu' }),
      tf.layers.maxPooling2d({ name: 'pool1', poolSize: 2 }),
      tf.layers.conv2d({ name: 'conv2', filters: 32, kernelSize: 3, activation: 'relu' }),
      tf.layers.maxPooling2d({ name: 'pool2', poolSize: 2 }),
      tf.layers.flatten({ name: 'flatten' }),
      tf.layers.dense({ name: 'dense1', units: 64, activation: 'relu' }),
      tf.layers.dense({ name: 'logits', units: numClasses }),
    ],
  });
  model.setWeights(model.getWeights().map((w) => seededInitial(w.shape, rng)));
  return model;
}

/** Glorot-uniform values for a kernel (rank ≥ 2), zeros for a bias. */
function seededInitial(shape: number[], rng: Rng): tf.Tensor {
  if (shape.length < 2) return tf.zeros(shape);
  const receptive = shape.slice(0, -2).reduce((a, b) => a * b, 1);
  const fanIn = shape[shape.length - 2]! * receptive;
  const fanOut = shape[shape.length - 1]! * receptive;
  const limit = Math.sqrt(6 / (fanIn + fanOut));
  const size = shape.reduce((a, b) => a * b, 1);
  return tf.tensor(rng.uniformArray(size, -limit, limit), shape);
}

/** A second model with the same architecture and a copy of `source`'s weights. */
export function copyMarkerModel(source: tf.LayersModel, numClasses: number, rng: Rng): tf.Sequential {
  const copy = buildMarkerModel(numClasses, rng);
  copy.setWeights(source.getWeights());
  return copy;
}

/** Write `model` as dir/model.json + dir/weights.bin; returns the total size in bytes. */
export async function saveMarkerModel(model: tf.LayersModel, dir: string): Promise<number> {
  let written = 0;
  await model.save(
    tf.io.withSaveHandler(async (artifacts) => {
      if (artifacts.weightData === undefined || artifacts.weightSpecs === undefined) throw new Error('model has no weights to save');
      const weights = new Uint8Array(tf.io.CompositeArrayBuffer.join(artifacts.weightData));
      const json = {
        format: 'layers-model',
        generatedBy: `TensorFlow.js tfjs-layers v${tf.version.tfjs}`,
        convertedBy: null,
        modelTopology: artifacts.modelTopology,
        weightsManifest: [{ paths: [WEIGHTS_BIN], weights: artifacts.weightSpecs }],
      };
      const text = `${JSON.stringify(json)}\n`;
      fs.mkdirSync(dir, { recursive: true });
      fs.writeFileSync(path.join(dir, MODEL_JSON), text);
      fs.writeFileSync(path.join(dir, WEIGHTS_BIN), weights);
      written = Buffer.byteLength(text) + weights.byteLength;
      return { modelArtifactsInfo: tf.io.getModelArtifactsInfoForJSON(artifacts) };
    }),
  );
  return written;
}

/** Load a model folder written by saveMarkerModel (model.json with a single weights file). */
export async function loadMarkerModel(dir: string): Promise<tf.LayersModel> {
  const json = JSON.parse(fs.readFileSync(path.join(dir, MODEL_JSON), 'utf8')) as {
    modelTopology: tf.io.ModelJSON['modelTopology'];
    weightsManifest: tf.io.WeightsManifestConfig;
  };
  const group = json.weightsManifest[0];
  if (group === undefined || group.paths.length !== 1) throw new Error(`${dir}: expected one weights file`);
  const bytes = fs.readFileSync(path.join(dir, group.paths[0]!));
  const weightData = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength);
  return tf.loadLayersModel(tf.io.fromMemory({ modelTopology: json.modelTopology, weightSpecs: group.weights, weightData }));
}
