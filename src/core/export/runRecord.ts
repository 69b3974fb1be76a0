/**
 * run.json: what a review needs to reproduce a sweep — which model and samples (SHA-256), the full
 * configuration, seed, software versions, backend — plus the curve.
 *
 * Deterministic: for the same inputs, configuration and environment, two runs give the same bytes
 * except `startedAt` and `endedAt`. Keys are written in a fixed order and attack options with sorted
 * keys, whatever order the caller built its objects in.
 */
import * as tf from '@tensorflow/tfjs';
import type { BackendInfo } from '../backend/initBackend.ts';
import type { ModelDescription, NamedBytes, Preprocessing } from '../types.ts';
import type { CurvePoint, SweepConfig, SweepResult } from '../sweep/types.ts';
import { BRINK_VERSION } from '../version.ts';
import { DEFAULT_RESIZE, type ResizeMode } from '../samples/crop.ts';
import { hashFiles, sha256Hex, fileListing, type FileHash } from './hash.ts';

/** Fingerprints of the model files and the sample files. */
export interface InputHashes {
  readonly model: { readonly sha256: string; readonly files: readonly FileHash[] };
  readonly samples: { readonly sha256: string; readonly files: number };
}

export interface RunRecordInput {
  readonly result: SweepResult;
  /** The model's files as loaded (model.json and weight shards, or the .onnx file). */
  readonly modelFiles: readonly NamedBytes[];
  /** The sample image files (and manifest, if any) the sample set was built from. */
  readonly sampleFiles: readonly NamedBytes[];
  readonly preprocessing: Preprocessing;
  readonly backend: BackendInfo;
  readonly model?: ModelDescription;
  /** Class names in index order (samples.csv holds indices). */
  readonly classNames?: readonly string[];
  /** How the CLI was invoked, when it was. */
  readonly commandLine?: readonly string[];
  /** How the sample images were brought to the model's size (default 'stretch'). */
  readonly resize?: ResizeMode;
}

export interface RunRecord {
  readonly format: 'brink-run';
  readonly formatVersion: 1;
  readonly brinkVersion: string;
  readonly tfjsVersion: string;
  readonly backend: BackendInfo;
  readonly startedAt: string;
  readonly endedAt: string;
  readonly complete: boolean;
  readonly seed: number;
  readonly commandLine?: readonly string[];
  readonly model: InputHashes['model'] & { readonly description?: ModelDescription };
  readonly samples: InputHashes['samples'] & {
    readonly count: number;
    readonly cleanCorrect: number;
    readonly cleanAccuracy: number;
    readonly classNames?: readonly string[];
    /** Present only when not the default 'stretch' (so older records read the same). */
    readonly resize?: ResizeMode;
  };
  readonly preprocessing: Preprocessing;
  readonly config: SweepConfig;
  readonly curve: readonly CurvePoint[];
}

/**
 * Hash the model files (each file and the set) and the sample files (the set only: there may be
 * thousands). Set hashes are order-independent: the same value as hashFileSet.
 */
export async function hashInputs(modelFiles: readonly NamedBytes[], sampleFiles: readonly NamedBytes[]): Promise<InputHashes> {
  const modelHashes = await hashFiles(modelFiles);
  const sampleHashes = await hashFiles(sampleFiles);
  return {
    model: { sha256: await listingHash(modelHashes), files: modelHashes },
    samples: { sha256: await listingHash(sampleHashes), files: sampleHashes.length },
  };
}

async function listingHash(hashes: readonly FileHash[]): Promise<string> {
  return sha256Hex(new TextEncoder().encode(fileListing(hashes)));
}

/** run.json text for a finished (or cancelled) sweep. */
export async function runJson(input: RunRecordInput): Promise<string> {
  return serializeRunRecord(await runRecord(input));
}

/** The record as JSON with two-space indentation and a final newline. */
export function serializeRunRecord(record: RunRecord): string {
  return `${JSON.stringify(record, null, 2)}\n`;
}

/** Hash the inputs and assemble the run record (tfjs version read from the loaded library). */
export async function runRecord(input: RunRecordInput): Promise<RunRecord> {
  const { result, backend } = input;
  const hashes = await hashInputs(input.modelFiles, input.sampleFiles);
  return {
    format: 'brink-run',
    formatVersion: 1,
    brinkVersion: BRINK_VERSION,
    tfjsVersion: tf.version_core,
    backend: {
      name: backend.name,
      simd: backend.simd,
      threads: backend.threads,
      threadCount: backend.threadCount,
      notice: backend.notice,
    },
    startedAt: result.startedAt,
    endedAt: result.endedAt,
    complete: result.complete,
    seed: result.config.seed,
    ...(input.commandLine !== undefined ? { commandLine: [...input.commandLine] } : {}),
    model: { sha256: hashes.model.sha256, files: hashes.model.files.map((f) => ({ name: f.name, sha256: f.sha256 })), ...(input.model !== undefined ? { description: input.model } : {}) },
    samples: {
      sha256: hashes.samples.sha256,
      files: hashes.samples.files,
      count: result.samples,
      cleanCorrect: result.cleanCorrect,
      cleanAccuracy: result.cleanAccuracy,
      ...(input.classNames !== undefined ? { classNames: [...input.classNames] } : {}),
      ...(input.resize !== undefined && input.resize !== DEFAULT_RESIZE ? { resize: input.resize } : {}),
    },
    preprocessing: {
      inputRange: input.preprocessing.inputRange,
      mean: [...input.preprocessing.mean],
      std: [...input.preprocessing.std],
      layout: input.preprocessing.layout,
    },
    config: canonicalConfig(result.config),
    curve: result.curve.map(canonicalPoint),
  };
}

function canonicalConfig(config: SweepConfig): SweepConfig {
  return {
    attacks: config.attacks.map((a) => ({ id: a.id, options: sortKeys(a.options) as Record<string, unknown> })),
    norm: config.norm,
    eps: [...config.eps],
    ...(config.epsLabels !== undefined ? { epsLabels: [...config.epsLabels] } : {}),
    seed: config.seed,
    batchSize: config.batchSize,
  };
}

function canonicalPoint(p: CurvePoint): CurvePoint {
  return {
    attack: p.attack,
    norm: p.norm,
    eps: p.eps,
    samples: p.samples,
    cleanCorrect: p.cleanCorrect,
    robust: p.robust,
    robustAccuracy: p.robustAccuracy,
    ci95Low: p.ci95Low,
    ci95High: p.ci95High,
    attackSuccessRate: p.attackSuccessRate,
  };
}

/** Plain data with object keys sorted at every level (arrays keep their order). */
function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return Object.fromEntries(entries.map(([k, v]) => [k, sortKeys(v)]));
  }
  return value;
}
