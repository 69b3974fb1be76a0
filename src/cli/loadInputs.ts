/**
 * Reads a model and a sample set from disk into the core, turning every problem with the
 * user's files into a UsageError (exit code 2) with a one-line message.
 */
import { readFile } from 'node:fs/promises';
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, parseChoice, requireValue } from './args.ts';
import { preprocessingFromFlags } from './sweepFlags.ts';
import { readModelFiles } from './nodeModelFiles.ts';
import { readSampleFiles } from './nodeSampleFiles.ts';
import { decodeImageNode } from './decodeImageNode.ts';
import { loadModelFromFiles } from '../core/models/loadModel.ts';
import { preprocessingFor, validatePreprocessing } from '../core/models/pipeline.ts';
import { DEFAULT_RESIZE, RESIZE_MODES, buildSampleSet, parseClassNames, type ResizeMode } from '../core/samples/buildSampleSet.ts';
import type { LoadedModel, ModelDescription, NamedBytes, Preprocessing, SampleSet } from '../core/types.ts';

export interface LoadedInputs {
  readonly model: LoadedModel;
  readonly modelFiles: readonly NamedBytes[];
  readonly samples: SampleSet;
  readonly sampleFiles: readonly NamedBytes[];
  readonly preprocessing: Preprocessing;
  /** How the sample images were brought to the model's size. */
  readonly resize: ResizeMode;
}

export interface InputPaths {
  readonly modelPath: string;
  readonly samplesPath: string;
  readonly classesPath: string | undefined;
  readonly limit: number | undefined;
  /** How sample images are brought to the model's size (default 'stretch'). */
  readonly resize?: ResizeMode;
  /** Final preprocessing from the model's defaults (flags applied by the caller). */
  readonly preprocessing: (base: Preprocessing, description: ModelDescription) => Preprocessing;
}

/** The flags naming the model, the samples and the class names. */
export const INPUT_FLAGS: FlagTable = {
  model: { kind: 'string', placeholder: '<model.json|model.onnx>', description: 'the model to evaluate' },
  samples: { kind: 'string', placeholder: '<folder|manifest.csv>', description: 'labelled samples: a folder per class or a file,label manifest' },
  classes: { kind: 'string', placeholder: '<file>', description: 'class names, one per line, in index order' },
  resize: { kind: 'string', placeholder: RESIZE_MODES.join('|'), description: "stretch: whole image to the model's size (default); crop: centre crop to the model's proportions, then resize" },
};

/** --resize (default stretch); any other value is a usage error. */
export function resizeFromFlags(args: ParsedArgs): ResizeMode {
  const text = args.values.get('resize');
  return text === undefined ? DEFAULT_RESIZE : parseChoice(text, '--resize', RESIZE_MODES);
}

/**
 * Load the inputs INPUT_FLAGS name (--model and --samples are required), keeping the first `limit`
 * samples and applying the preprocessing flags; the caller disposes `model`.
 */
export function loadInputsFromFlags(args: ParsedArgs, limit: number | undefined): Promise<LoadedInputs> {
  return loadInputs({
    modelPath: requireValue(args, 'model'),
    samplesPath: requireValue(args, 'samples'),
    classesPath: args.values.get('classes'),
    limit,
    resize: resizeFromFlags(args),
    preprocessing: (base, description) => preprocessingFromFlags(args, base, description),
  });
}

/** Load model and samples; the caller disposes `model`. */
export async function loadInputs(paths: InputPaths): Promise<LoadedInputs> {
  const modelFiles = await asInputError(() => readModelFiles(paths.modelPath));
  const model = await asInputError(() => loadModelFromFiles(modelFiles));
  try {
    const description = model.description;
    const preprocessing = paths.preprocessing(preprocessingFor(description), description);
    const problem = validatePreprocessing(preprocessing, description);
    if (problem) throw new UsageError(problem);
    const classNames = paths.classesPath === undefined ? undefined : await readClassNames(paths.classesPath);
    const resize = paths.resize ?? DEFAULT_RESIZE;
    const sampleFiles = await asInputError(() => readSampleFiles(paths.samplesPath));
    const built = await asInputError(() =>
      buildSampleSet(sampleFiles, {
        height: description.height,
        width: description.width,
        channels: description.channels === 1 ? 1 : 3,
        decoder: decodeImageNode,
        resize,
        ...(classNames ? { classNames } : {}),
      }),
    );
    const samples = paths.limit === undefined ? built.set : limitSamples(built.set, paths.limit);
    const maxLabel = Math.max(...samples.labels);
    if (maxLabel >= description.numClasses) {
      throw new UsageError(`label ${maxLabel} is out of range: the model has ${description.numClasses} classes (0..${description.numClasses - 1})`);
    }
    return { model, modelFiles, samples, sampleFiles, preprocessing, resize };
  } catch (err) {
    model.dispose();
    throw err;
  }
}

async function readClassNames(file: string): Promise<string[]> {
  const bytes = await asInputError(() => readFile(file));
  return asInputError(async () => parseClassNames({ name: file, bytes: new Uint8Array(bytes) }));
}

/** The first `limit` samples (in the set's deterministic order). */
export function limitSamples(set: SampleSet, limit: number): SampleSet {
  if (limit >= set.files.length) return set;
  const per = set.height * set.width * set.channels;
  return {
    ...set,
    files: set.files.slice(0, limit),
    labels: set.labels.slice(0, limit),
    pixels: set.pixels.slice(0, limit * per),
  };
}

async function asInputError<T>(load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (err) {
    if (err instanceof UsageError) throw err;
    const message = err instanceof Error ? err.message : String(err);
    throw new UsageError(message.split('\n')[0] ?? message);
  }
}
