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
  if (onnxFiles[0] !== undefined) return requireClassScores(await loadOnnx(onnxFiles[0]), onnxFiles[0].name);
  const model = findModelJson(files);
  const format = detectTfjsFormat(model);
  const weights = assembleWeights(model, files);
  const artifacts = tf.io.getModelArtifactsForJSONSync(model.json, weights.specs, weights.data);
  const loaded = format === 'layers' ? await openLayersModel(artifacts, weights.specs) : await openGraphModel(artifacts, weights.specs);
  return requireClassScores(loaded, model.file.name);
}

/**
 * Refuses a model that does not give one score per class (e.g. a single regression output):
 * robust accuracy and every loss need at least two classes. 0 means "unknown until the input
 * size is set" and passes.
 */
function requireClassScores(model: LoadedModel, name: string): LoadedModel {
  const classes = model.description.numClasses;
  if (classes !== 1) return model;
  model.dispose();
  throw new Error(`${name} gives a single output score per image, not one score per class; Brink needs a classifier with at least two classes.`);
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
