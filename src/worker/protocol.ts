/**
 * The typed messages between the page and the engine worker. Every request carries an id; the
 * worker answers it with exactly one `ok` or `error` message; long requests (a sweep, the health
 * checks, flip budgets) also send events with the same id before their answer. Plain data only (structured clone);
 * pixel and file buffers travel in the transfer list, never copied.
 */
import type { BackendInfo } from '../core/backend/initBackend.ts';
import type { CurvePoint, SweepConfig, SweepProgress, SweepResult } from '../core/sweep/types.ts';
import type { AttackId } from '../core/attacks/types.ts';
import type { ModelDescription, NamedBytes, Norm, Preprocessing } from '../core/types.ts';
import type { HealthReport } from '../core/health/runHealthChecks.ts';
import type { FlipBudgetResult, FlipCurvePoint, FlipProgress, FlipSearchId } from '../core/flips/types.ts';
import type { FlipHistogram } from '../core/flips/curve.ts';
import type { SweepStatistics } from '../core/stats/perClass.ts';
import type { HealthInput } from '../core/savedRun/saveRun.ts';
import type { SavedRun } from '../core/savedRun/types.ts';
import type { ResizeMode } from '../core/samples/crop.ts';

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

/** Options of the two searches the health checks add when the sweep did not run them. */
export interface HealthRequest {
  readonly squareOptions: Readonly<Record<string, unknown>>;
  readonly noiseOptions: Readonly<Record<string, unknown>>;
}

/** A flip-budget run as the workbench asks for it; the worker fills in defaults and validates. */
export interface FlipRequest {
  readonly search: FlipSearchId;
  readonly norm: Norm;
  /** Largest budget tried; null: the budget within which any image can become flat grey. */
  readonly maxEps: number | null;
  readonly tol: number;
  /** Search options (untargeted); each search completes them with its own defaults. */
  readonly options: Readonly<Record<string, unknown>>;
  /** Use at most this many samples, spread over the classes; null: all of them. */
  readonly limit: number | null;
  readonly seed: number;
  readonly batchSize: number;
  /** Bars of the histogram. */
  readonly binCount: number;
  readonly preprocessing: Preprocessing;
}

/** Flip budgets with the views drawn from them; record indices refer to the whole sample set. */
export interface FlipsReply {
  readonly result: FlipBudgetResult;
  /** The largest budget tried (the default resolved). */
  readonly maxEps: number;
  /** Samples in the whole set (result.samples is the number measured). */
  readonly totalSamples: number;
  readonly histogram: FlipHistogram;
  /** Robust accuracy implied by the flip budgets, from 0 to the histogram's upper edge. */
  readonly curve: readonly FlipCurvePoint[];
}

/** Every call the worker answers: argument and reply types by method name. */
export interface EngineMethods {
  init: { args: { wasmPath: string; threads: number | null }; reply: EngineInfo };
  /** Samples given earlier are rebuilt for the new model's input size (or fail, with a reason). */
  loadModel: { args: { files: NamedBytes[] }; reply: ModelInfo & { samples: SamplesInfo | null; samplesError: string | null } };
  loadSamples: { args: { files: NamedBytes[]; classNamesFile: NamedBytes | null }; reply: SamplesInfo };
  /** Set the resize mode; samples already loaded are read again with it (null when there are none). */
  setResize: { args: { resize: ResizeMode }; reply: SamplesInfo | null };
  preview: { args: { count: number; preprocessing: Preprocessing }; reply: PreviewReply };
  clean: { args: { preprocessing: Preprocessing }; reply: CleanReply };
  sweep: { args: { config: SweepConfig; preprocessing: Preprocessing }; reply: SweepResult };
  /** Stop the cancellable request with this id (a sweep, health checks or flip budgets). */
  cancel: { args: { runId: number }; reply: boolean };
  flipImages: { args: { items: readonly { index: number; attack: AttackId }[] }; reply: FlipImagesReply };
  exportFile: { args: { kind: ExportKind }; reply: ExportFile };
  /** Per-class robust accuracy, flip matrices and median flip budgets of the last sweep. */
  statistics: { args: Record<string, never>; reply: SweepStatistics };
  /** The health checks of the last sweep (extra searches run in the worker; cancellable). */
  health: { args: HealthRequest; reply: HealthReport };
  /** Minimal flip budgets (cancellable: resolves with the finished samples). */
  flipBudgets: { args: FlipRequest; reply: FlipsReply };
  /** The saved run of the last sweep (thumbnails from the kept adversarial points), with the page's health checks. */
  savedRun: { args: { health: readonly HealthInput[] | null }; reply: SavedRun };
}

export type MethodName = keyof EngineMethods;
export type ArgsOf<M extends MethodName> = EngineMethods[M]['args'];
export type ReplyOf<M extends MethodName> = EngineMethods[M]['reply'];

/** A call from the page. */
export type EngineRequest = { [M in MethodName]: { readonly id: number; readonly method: M; readonly args: ArgsOf<M> } }[MethodName];

/** Events a long request sends before its answer. */
export type EngineEvent =
  | { readonly kind: 'progress'; readonly progress: SweepProgress }
  | { readonly kind: 'point'; readonly point: CurvePoint; readonly partial: SweepResult }
  | { readonly kind: 'health-step'; readonly what: string }
  | { readonly kind: 'flip-progress'; readonly progress: FlipProgress };

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
