/**
 * The worker's workspace: the loaded model, the sample files and set, the last sweep and the
 * adversarial points it kept. Every method is a thin call into the core; nothing here computes
 * anything the core already does.
 */
import * as tf from '@tensorflow/tfjs';
import { captureModelInput, extent, spreadIndices } from './preview.ts';
import { initBackend, type BackendInfo } from '../core/backend/initBackend.ts';
import { loadModelFromFiles } from '../core/models/loadModel.ts';
import { makeLogitsFn, preprocessingFor } from '../core/models/pipeline.ts';
import { DEFAULT_RESIZE, buildSampleSet, isResizeMode, parseClassNames, type ResizeMode, type SampleSetBuild } from '../core/samples/buildSampleSet.ts';
import { isImageName } from '../core/samples/paths.ts';
import { runSweep, type SweepHooks } from '../core/sweep/runSweep.ts';
import type { AdversarialBatch } from '../core/sweep/runSweep.ts';
import type { SweepConfig, SweepResult } from '../core/sweep/types.ts';
import type { AttackId } from '../core/attacks/types.ts';
import type { LoadedModel, LogitsFn, NamedBytes, Preprocessing, SampleSet } from '../core/types.ts';
import { decodeImageBrowser } from './decodeImageBrowser.ts';
import { expandArchives } from './archive.ts';
import type { CleanReply, EngineInfo, FlipImagesReply, ModelInfo, PreviewImage, PreviewReply, SamplesInfo } from './protocol.ts';

/** What a finished sweep needs for its exports. */
export interface SweepRecordInputs {
  readonly result: SweepResult;
  readonly modelFiles: readonly NamedBytes[];
  readonly sampleFiles: readonly NamedBytes[];
  readonly preprocessing: Preprocessing;
  /** How the sample images were brought to the model's size (absent: the default, stretch). */
  readonly resize?: ResizeMode;
  readonly model: LoadedModel;
  /** The sample set the sweep ran on (the health checks must run on the very same one). */
  readonly samples: SampleSet;
  readonly classNames: readonly string[];
  readonly backend: BackendInfo;
  /** Adversarial pixels of flipped samples, keyed by flipKey(). */
  readonly flips: ReadonlyMap<string, Float32Array>;
  readonly files: readonly string[];
  readonly sampleSize: { readonly height: number; readonly width: number; readonly channels: number };
}

/** Key of one kept adversarial point. */
export function flipKey(attack: AttackId, index: number): string {
  return `${attack}|${index}`;
}

/** Clean evaluation is the sweep's own clean pass: one budget, ε = 0, which is never attacked. */
const CLEAN_ONLY: Omit<SweepConfig, 'batchSize'> = { attacks: [{ id: 'fgsm', options: {} }], norm: 'linf', eps: [0], seed: 0 };
const CLEAN_BATCH = 64;

export class Engine {
  private backend: BackendInfo | null = null;
  private model: LoadedModel | null = null;
  private modelFiles: NamedBytes[] = [];
  /** The sample files as given (archives expanded), without a separately given class-names file. */
  private baseSampleFiles: NamedBytes[] = [];
  /** What the sample set was built from, for run.json's hash. */
  private sampleFiles: NamedBytes[] = [];
  private givenClassNames: string[] | undefined;
  private samples: SampleSetBuild | null = null;
  /** The resize mode of the next sample build (and of `samples`, which is rebuilt when it changes). */
  private resize: ResizeMode = DEFAULT_RESIZE;
  private last: SweepRecordInputs | null = null;

  /** Start tfjs on WASM (threads only when the worker is cross-origin isolated). */
  async init(wasmPath: string, threads: number | null): Promise<EngineInfo> {
    const isolated = (globalThis as { crossOriginIsolated?: boolean }).crossOriginIsolated === true;
    if (!isolated) tf.env().set('WASM_HAS_MULTITHREAD_SUPPORT', false);
    this.backend = await initBackend({ wasmPath, ...(isolated && threads !== null ? { threads } : {}) });
    return { backend: this.backend, isolated };
  }

  /** Load a model; on failure the previous model stays. Samples already given are rebuilt for its input size. */
  async loadModel(files: NamedBytes[]): Promise<ModelInfo & { samples: SamplesInfo | null; samplesError: string | null }> {
    const expanded = expandArchives(files);
    const model = await loadModelFromFiles(expanded);
    this.model?.dispose();
    this.model = model;
    this.modelFiles = expanded;
    let samples: SamplesInfo | null = null;
    let samplesError: string | null = null;
    if (this.baseSampleFiles.length > 0) {
      try {
        this.samples = await this.build(this.baseSampleFiles, this.givenClassNames);
        samples = this.samplesInfo();
      } catch (err) {
        this.samples = null;
        samplesError = err instanceof Error ? err.message : String(err);
      }
    }
    return { description: model.description, files: expanded.map((f) => f.name), suggestedPreprocessing: preprocessingFor(model.description), samples, samplesError };
  }

  /**
   * Load samples (and an optional class-names file); on failure the previous samples stay. With no
   * files, the previous sample files are read again with the given class-names file.
   */
  async loadSamples(files: NamedBytes[], classNamesFile: NamedBytes | null): Promise<SamplesInfo> {
    if (files.length === 0 && this.baseSampleFiles.length === 0) throw new Error('Load samples first, then their class names.');
    const expanded = files.length === 0 ? this.baseSampleFiles : expandArchives(files);
    const names = classNamesFile === null ? undefined : parseClassNames(classNamesFile);
    const built = await this.build(expanded, names);
    this.samples = built;
    this.baseSampleFiles = expanded;
    this.sampleFiles = classNamesFile === null ? expanded : [...expanded, classNamesFile];
    this.givenClassNames = names;
    return this.samplesInfo();
  }

  /**
   * Set how images are brought to the model's size; samples already given are read again with it
   * (null when there are none yet). On failure the previous mode and samples stay.
   */
  async setResize(mode: ResizeMode): Promise<SamplesInfo | null> {
    if (!isResizeMode(mode)) throw new Error(`Unknown resize mode ${String(mode)}.`);
    if (mode === this.resize) return this.samples === null ? null : this.samplesInfo();
    const previous = this.resize;
    this.resize = mode;
    if (this.baseSampleFiles.length === 0) return null;
    try {
      this.samples = await this.build(this.baseSampleFiles, this.givenClassNames);
    } catch (err) {
      this.resize = previous;
      throw err;
    }
    return this.samplesInfo();
  }

  /**
   * A few samples spread over the classes, as stored and (when a model is loaded and fits) as the
   * model receives them, captured at the model's own input.
   */
  async preview(count: number, preprocessing: Preprocessing): Promise<PreviewReply> {
    if (this.samples === null) throw new Error('Load samples first.');
    const set = this.samples.set;
    const model = this.model !== null && this.mismatch() === null ? this.model : null;
    const size = set.height * set.width * set.channels;
    const images: PreviewImage[] = [];
    for (const index of spreadIndices(set.labels, count)) {
      const pixels = set.pixels.slice(index * size, (index + 1) * size);
      const modelInput =
        model === null ? new Float32Array(0) : await captureModelInput(model, preprocessing, pixels, [1, set.height, set.width, set.channels]);
      const { min, max } = extent(modelInput);
      images.push({ index, file: set.files[index]!, label: set.labels[index]!, pixels, modelInput, inputMin: min, inputMax: max });
    }
    return { height: set.height, width: set.width, channels: set.channels, layout: preprocessing.layout, images };
  }

  /** Clean accuracy and per-sample predictions, from the sweep's clean pass. */
  async clean(preprocessing: Preprocessing): Promise<CleanReply> {
    const { set } = this.ready();
    const result = await runSweep({ logits: this.logits(preprocessing), samples: set, config: { ...CLEAN_ONLY, batchSize: CLEAN_BATCH } });
    return {
      accuracy: result.cleanAccuracy,
      correct: result.cleanCorrect,
      samples: result.samples,
      predictions: result.records.map((r) => r.cleanPred),
      confidences: result.records.map((r) => r.cleanConf),
    };
  }

  /** Run a sweep; flipped samples' adversarial pixels are kept for the gallery and the image export. */
  async sweep(config: SweepConfig, preprocessing: Preprocessing, hooks: SweepHooks): Promise<SweepResult> {
    const { model, set } = this.ready();
    const flips = new Map<string, Float32Array>();
    const size = set.height * set.width * set.channels;
    const keep = (batch: AdversarialBatch): void => {
      batch.indices.forEach((index, row) => {
        if (batch.flipped[row] === 1) flips.set(flipKey(batch.attack, index), batch.pixels.slice(row * size, (row + 1) * size));
      });
    };
    const result = await runSweep({ logits: this.logits(preprocessing), samples: set, config }, { ...hooks, onAdversarial: keep });
    this.last = {
      result,
      modelFiles: this.modelFiles,
      sampleFiles: this.sampleFiles,
      preprocessing,
      resize: this.resize,
      model,
      samples: set,
      classNames: set.classNames,
      backend: this.backend!,
      flips,
      files: set.files,
      sampleSize: { height: set.height, width: set.width, channels: set.channels },
    };
    return result;
  }

  /** Original and adversarial pixels of flipped samples from the last sweep (missing ones skipped). */
  flipImages(items: readonly { index: number; attack: AttackId }[]): FlipImagesReply {
    const last = this.lastSweep();
    const { set } = this.ready();
    const size = set.height * set.width * set.channels;
    const images = items.flatMap(({ index, attack }) => {
      const adversarial = last.flips.get(flipKey(attack, index));
      if (adversarial === undefined) return [];
      return [{ index, attack, original: set.pixels.slice(index * size, (index + 1) * size), adversarial: adversarial.slice() }];
    });
    return { ...last.sampleSize, images };
  }

  /** Everything the exports need from the last sweep (throws before the first one). */
  lastSweep(): SweepRecordInputs {
    if (this.last === null) throw new Error('No sweep has run yet.');
    return this.last;
  }

  /** The loaded model and sample set, when both are there and fit together (else throws, saying what is missing). */
  ready(): { model: LoadedModel; set: SampleSetBuild['set'] } {
    if (this.model === null) throw new Error('Load a model first.');
    if (this.samples === null) throw new Error('Load samples first.');
    const problem = this.mismatch();
    if (problem !== null) throw new Error(problem);
    return { model: this.model, set: this.samples.set };
  }

  private logits(preprocessing: Preprocessing): LogitsFn {
    return makeLogitsFn(this.ready().model, preprocessing);
  }

  private async build(files: readonly NamedBytes[], classNames: readonly string[] | undefined): Promise<SampleSetBuild> {
    const size = this.model !== null ? modelSize(this.model) : await firstImageSize(files);
    return buildSampleSet(files, { ...size, decoder: decodeImageBrowser, resize: this.resize, ...(classNames !== undefined ? { classNames } : {}) });
  }

  private mismatch(): string | null {
    if (this.model === null || this.samples === null) return null;
    const d = this.model.description;
    const maxLabel = this.samples.set.labels.reduce((m, v) => Math.max(m, v), -1);
    if (maxLabel >= d.numClasses) {
      return `The samples use class index ${maxLabel}, but the model has ${d.numClasses} classes (0..${d.numClasses - 1}).`;
    }
    if (this.samples.set.height !== d.height || this.samples.set.width !== d.width) {
      return `The samples were read at ${this.samples.set.height}×${this.samples.set.width}; the model expects ${d.height}×${d.width}.`;
    }
    return null;
  }

  private samplesInfo(): SamplesInfo {
    const built = this.samples!;
    const { set } = built;
    return {
      count: set.files.length,
      height: set.height,
      width: set.width,
      channels: set.channels,
      source: built.source,
      classes: built.classMapping,
      classNames: set.classNames,
      files: set.files,
      labels: Array.from(set.labels),
      mismatch: this.mismatch(),
    };
  }
}

/** Sample size the model wants: its input size, grey or RGB (as the CLI does). */
function modelSize(model: LoadedModel): { height: number; width: number; channels: 1 | 3 } {
  const d = model.description;
  return { height: d.height, width: d.width, channels: d.channels === 1 ? 1 : 3 };
}

/** Without a model, samples are read at the size of the first image, in RGB. */
async function firstImageSize(files: readonly NamedBytes[]): Promise<{ height: number; width: number; channels: 3 }> {
  const first = files.find((f) => isImageName(f.name));
  if (first === undefined) {
    throw new Error('No images found: expected .png/.jpg/.jpeg files in one folder per class, a .zip of such folders, or a .csv manifest with its images.');
  }
  let decoded;
  try {
    decoded = await decodeImageBrowser(first);
  } catch (err) {
    throw new Error(`unreadable image ${first.name}: ${err instanceof Error ? err.message : String(err)}`);
  }
  return { height: decoded.height, width: decoded.width, channels: 3 };
}
