/**
 * Access to the ONNX fixtures written by scripts/fixtures/onnx/export_fixtures.py (PyTorch 1.13
 * exports + PyTorch's own logits, gradients, FGSM and PGD points), and an onnxruntime-web session
 * runner (WASM execution provider, one thread) used as the independent forward reference.
 */
import fs from 'node:fs';
import path from 'node:path';
import * as ort from 'onnxruntime-web';
import type { NamedBytes } from '../../src/core/types.ts';

export const FIXTURE_DIR = path.resolve('test/fixtures/onnx');

interface ArrayRef {
  readonly offset: number;
  readonly shape: number[];
}

export interface ModelReference {
  readonly probabilities: boolean;
  readonly output: ArrayRef;
  readonly logits: ArrayRef;
  readonly gradient: ArrayRef;
  readonly fgsm: ArrayRef;
  readonly pgd: ArrayRef;
  readonly pgdChosenStep: number[];
  readonly pgdFlipped: boolean[];
  readonly pgdMinAbsGradient: ArrayRef;
}

export interface FixtureFile {
  readonly file: string;
  readonly model: string | null;
  readonly opset: number;
  readonly dynamicBatch: boolean;
  /** Node count per op type as the onnx Python package reads the file. */
  readonly ops: Record<string, number>;
  /** producer_name (and producer_version) as the onnx Python package reads them. */
  readonly producer: string;
  readonly layout: 'nchw' | 'nhwc';
}

export interface FixtureIndex {
  readonly torch: string;
  readonly eps: number;
  readonly pgdSteps: number;
  readonly pgdStepSize: number;
  readonly images: ArrayRef;
  readonly labels: number[];
  readonly models: Record<string, ModelReference>;
  readonly files: FixtureFile[];
}

let cached: { index: FixtureIndex; blob: Float32Array } | null = null;

function load(): { index: FixtureIndex; blob: Float32Array } {
  if (cached === null) {
    const index = JSON.parse(fs.readFileSync(path.join(FIXTURE_DIR, 'index.json'), 'utf8')) as FixtureIndex;
    const bytes = fs.readFileSync(path.join(FIXTURE_DIR, 'reference.bin'));
    const blob = new Float32Array(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
    cached = { index, blob };
  }
  return cached;
}

export function fixtureIndex(): FixtureIndex {
  return load().index;
}

/** One stored float32 array (NHWC for images, gradients and adversarial points). */
export function referenceArray(ref: ArrayRef): Float32Array {
  const size = ref.shape.reduce((a, b) => a * b, 1);
  return load().blob.slice(ref.offset, ref.offset + size);
}

export function readFixture(file: string): NamedBytes {
  return { name: file, bytes: new Uint8Array(fs.readFileSync(path.join(FIXTURE_DIR, file))) };
}

/** The PyTorch-exported fixtures (each has stored PyTorch results). */
export function exportedFixtures(): FixtureFile[] {
  return fixtureIndex().files.filter((f) => f.model !== null);
}

let ortReady = false;

/** Run a model with onnxruntime-web (WASM EP, 1 thread) on an input in the model's own layout. */
export async function runOnnxRuntime(file: string, input: Float32Array, dims: readonly number[]): Promise<Float32Array> {
  if (!ortReady) {
    ort.env.wasm.numThreads = 1;
    ort.env.wasm.wasmPaths = `${path.resolve('node_modules/onnxruntime-web/dist')}/`;
    ortReady = true;
  }
  const session = await ort.InferenceSession.create(readFixture(file).bytes, { executionProviders: ['wasm'] });
  try {
    const feeds = { [session.inputNames[0]!]: new ort.Tensor('float32', input, dims) };
    const results = await session.run(feeds);
    return results[session.outputNames[0]!]!.data as Float32Array;
  } finally {
    await session.release();
  }
}

/** NHWC → NCHW for a [N, H, W, C] batch. */
export function toNchw(data: Float32Array, [n, h, w, c]: readonly number[]): Float32Array {
  const out = new Float32Array(data.length);
  for (let i = 0; i < n!; i++)
    for (let y = 0; y < h!; y++)
      for (let x = 0; x < w!; x++)
        for (let k = 0; k < c!; k++) out[((i * c! + k) * h! + y) * w! + x] = data[((i * h! + y) * w! + x) * c! + k]!;
  return out;
}

/** Deterministic pseudo-random inputs in [0, 1) (a linear congruential sequence) for models without stored images. */
export function seededInputs(count: number, seed: number): Float32Array {
  const out = new Float32Array(count);
  let s = seed >>> 0;
  for (let i = 0; i < count; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = s / 4294967296;
  }
  return out;
}

/** Norm-wise relative difference ‖a − e‖∞ / ‖e‖∞ and the largest absolute difference. */
export function relativeDifference(actual: ArrayLike<number>, expected: ArrayLike<number>): { rel: number; abs: number } {
  if (actual.length !== expected.length) throw new Error(`length ${actual.length} ≠ ${expected.length}`);
  let abs = 0;
  let scale = 0;
  for (let i = 0; i < expected.length; i++) {
    const d = Math.abs(actual[i]! - expected[i]!);
    abs = Number.isNaN(d) ? Infinity : Math.max(abs, d);
    scale = Math.max(scale, Math.abs(expected[i]!));
  }
  return { rel: abs / Math.max(scale, 1e-30), abs };
}

/** Largest differences seen per check, printed at the end of a suite for the report. */
export class DifferenceLog {
  private readonly rows: string[] = [];
  add(what: string, d: { rel: number; abs: number }): void {
    this.rows.push(`${what}: rel ${d.rel.toExponential(2)}, abs ${d.abs.toExponential(2)}`);
  }
  print(title: string): void {
    console.log(`${title}\n  ${this.rows.join('\n  ')}`);
  }
}
