/**
 * Loads a classifier from files as a browser hands them over (a folder drop, a file picker) or as
 * the CLI reads them: a tfjs model.json with its .bin shards, or one .onnx file.
 */
import * as tf from '@tensorflow/tfjs';
import type { LoadedModel, NamedBytes } from '../types.ts';
import { assembleWeights, findModelJson, type ModelJsonFile } from './modelFiles.ts';
import { openGraphModel, openLayersModel } from './tfjsModels.ts';

/** Which tfjs loader a model.json needs. */
export type TfjsFormat = 'layers' | 'graph';

/**
 * Reads the format from model.json: the `format` field when present, otherwise the topology's shape
 * (a TensorFlow GraphDef has `node`; a Keras model has `class_name`/`config` or `model_config`).
 */
export function detectTfjsFormat(model: ModelJsonFile): TfjsFormat {
  const format = model.json.format;
  if (format === 'layers-model') return 'layers';
  if (format === 'graph-model') return 'graph';
  const topology = model.json.modelTopology as Record<string, unknown>;
  if (Array.isArray(topology['node'])) return 'graph';
  if ('class_name' in topology || 'config' in topology || 'model_config' in topology) return 'layers';
  throw new Error(
    `${model.file.name} has a modelTopology that is neither a Keras model nor a TensorFlow graph${format === undefined ? '' : ` (format "${format}")`}.`,
  );
}

/** Loads a LoadedModel from a tfjs model.json plus shards, or delegates a single .onnx file to the ONNX loader. */
export async function loadModelFromFiles(files: readonly NamedBytes[]): Promise<LoadedModel> {
  const onnxFiles = files.filter((f) => f.name.toLowerCase().endsWith('.onnx'));
  if (onnxFiles.length > 1) {
    throw new Error(`More than one .onnx file among the files (${onnxFiles.map((f) => f.name).join(', ')}); drop one model at a time.`);
  }
  if (onnxFiles[0] !== undefined) return loadOnnx(onnxFiles[0]);
  const model = findModelJson(files);
  const format = detectTfjsFormat(model);
  const weights = assembleWeights(model, files);
  const artifacts = tf.io.getModelArtifactsForJSONSync(model.json, weights.specs, weights.data);
  return format === 'layers' ? openLayersModel(artifacts, weights.specs) : openGraphModel(artifacts, weights.specs);
}

/** The ONNX loader is imported on demand so that tfjs-only use never pays for the ONNX parser. */
async function loadOnnx(file: NamedBytes): Promise<LoadedModel> {
  let loader: typeof import('../onnx/loadOnnx.ts');
  try {
    loader = await import('../onnx/loadOnnx.ts');
  } catch (err) {
    throw new Error(`The ONNX loader could not be started for ${file.name}: ${err instanceof Error ? err.message : String(err)}`);
  }
  return loader.loadOnnxModel(file);
}
