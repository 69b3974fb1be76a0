/**
 * The typed messages between the page and the engine worker. Every request carries an id; the
 * worker answers it with exactly one `ok` or `error` message, and a sweep also sends `progress`
 * and `point` events with the same id before its answer. Plain data only (structured clone);
 * pixel and file buffers travel in the transfer list, never copied.
 */
import type { BackendInfo } from '../core/backend/initBackend.ts';
import type { CurvePoint, SweepConfig, SweepProgress, SweepResult } from '../core/sweep/types.ts';
import type { AttackId } from '../core/attacks/types.ts';
import type { ModelDescription, NamedBytes, Preprocessing } from '../core/types.ts';

/** What the worker found out when the backend started. */
export interface EngineInfo {
  readonly backend: BackendInfo;
  /** Whether the worker runs cross-origin isolated (needed for the threaded build). */
  readonly isolated: boolean;
}

/** The answer to a model load. */
export interface ModelInfo {
  readonly description: ModelDescription;
  /** The model files as loaded (names only). */
  readonly files: readonly string[];
  /** The preprocessing the core suggests for this model. */
  readonly suggestedPreprocessing: Preprocessing;
}

/** One class of the loaded sample set. */
export interface ClassCount {
  readonly name: string;
  readonly index: number;
  readonly count: number;
}

/** The answer to a sample load (the pixels stay in the worker). */
export interface SamplesInfo {
  readonly count: number;
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly source: 'folders' | 'manifest';
  readonly classes: readonly ClassCount[];
  readonly classNames: readonly string[];
  readonly files: readonly string[];
  readonly labels: readonly number[];
  /** A problem that keeps these samples from being used with the loaded model (else null). */
  readonly mismatch: string | null;
}

/** Pixels of a few samples, as stored (x ∈ [0,1], NHWC) and as the model receives them. */
export interface PreviewImage {
  readonly index: number;
  readonly file: string;
  readonly label: number;
  /** height·width·channels floats in [0,1]. */
  readonly pixels: Float32Array;
  /** The model's input for this sample, in the model's layout (NHWC or NCHW). */
  readonly modelInput: Float32Array;
  readonly inputMin: number;
  readonly inputMax: number;
}

export interface PreviewReply {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly layout: Preprocessing['layout'];
  readonly images: readonly PreviewImage[];
}

/** Clean predictions of the whole sample set under the current preprocessing. */
export interface CleanReply {
  readonly accuracy: number;
  readonly correct: number;
  readonly samples: number;
  readonly predictions: readonly number[];
  readonly confidences: readonly number[];
}

/** Original and adversarial pixels of one flipped sample (both NHWC in [0,1]). */
export interface FlipImage {
  readonly index: number;
  readonly attack: AttackId;
  readonly original: Float32Array;
  readonly adversarial: Float32Array;
}

export interface FlipImagesReply {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
  readonly images: readonly FlipImage[];
}

export type ExportKind = 'curve-csv' | 'samples-csv' | 'run-json' | 'adversarial-zip';

/** A file ready to save. */
export interface ExportFile {
  readonly fileName: string;
  readonly mimeType: string;
  readonly bytes: Uint8Array;
}

/** Every call the worker answers: argument and reply types by method name. */
export interface EngineMethods {
  init: { args: { wasmPath: string; threads: number | null }; reply: EngineInfo };
  /** Samples given earlier are rebuilt for the new model's input size (or fail, with a reason). */
  loadModel: { args: { files: NamedBytes[] }; reply: ModelInfo & { samples: SamplesInfo | null; samplesError: string | null } };
  loadSamples: { args: { files: NamedBytes[]; classNamesFile: NamedBytes | null }; reply: SamplesInfo };
  preview: { args: { count: number; preprocessing: Preprocessing }; reply: PreviewReply };
  clean: { args: { preprocessing: Preprocessing }; reply: CleanReply };
  sweep: { args: { config: SweepConfig; preprocessing: Preprocessing }; reply: SweepResult };
  cancel: { args: { runId: number }; reply: boolean };
  flipImages: { args: { items: readonly { index: number; attack: AttackId }[] }; reply: FlipImagesReply };
  exportFile: { args: { kind: ExportKind }; reply: ExportFile };
}

export type MethodName = keyof EngineMethods;
export type ArgsOf<M extends MethodName> = EngineMethods[M]['args'];
export type ReplyOf<M extends MethodName> = EngineMethods[M]['reply'];

/** A call from the page. */
export type EngineRequest = { [M in MethodName]: { readonly id: number; readonly method: M; readonly args: ArgsOf<M> } }[MethodName];

/** Events a sweep sends before its answer. */
export type EngineEvent =
  | { readonly kind: 'progress'; readonly progress: SweepProgress }
  | { readonly kind: 'point'; readonly point: CurvePoint; readonly partial: SweepResult };

/** A message from the worker. */
export type EngineResponse =
  | { readonly id: number; readonly kind: 'ok'; readonly value: unknown }
  | { readonly id: number; readonly kind: 'error'; readonly message: string }
  | ({ readonly id: number } & EngineEvent);

/** Distinct ArrayBuffers behind the given views, for a transfer list (a buffer may back several views). */
export function buffersOf(views: readonly ArrayBufferView[]): ArrayBuffer[] {
  const seen = new Set<ArrayBuffer>();
  for (const view of views) {
    if (view.buffer instanceof ArrayBuffer && view.buffer.byteLength > 0) seen.add(view.buffer);
  }
  return [...seen];
}
