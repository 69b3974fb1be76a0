/**
 * Finding a tfjs model among dropped files: the model.json (whatever its name) and the weight
 * shards its manifest lists, matched by base name and concatenated in manifest order.
 */
import type * as tf from '@tensorflow/tfjs';
import type { NamedBytes } from '../types.ts';

/** A parsed tfjs model.json together with the file it came from. */
export interface ModelJsonFile {
  readonly file: NamedBytes;
  readonly json: tf.io.ModelJSON;
}

/** The weights of a model as tfjs wants them: specs in manifest order and one buffer. */
export interface AssembledWeights {
  readonly specs: tf.io.WeightsManifestEntry[];
  readonly data: ArrayBuffer;
}

/** The last path component, so that 'model/weights.bin' and './weights.bin' both match 'weights.bin'. */
export function baseName(name: string): string {
  const parts = name.split(/[\\/]/);
  return parts[parts.length - 1] ?? name;
}

function folderOf(name: string): string {
  const cut = name.lastIndexOf('/');
  return cut < 0 ? '' : name.slice(0, cut + 1);
}

function normalisePath(path: string): string {
  return path.replace(/\\/g, '/').replace(/^(\.\/)+/, '');
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function parseJson(file: NamedBytes): { ok: true; value: unknown } | { ok: false; message: string } {
  try {
    return { ok: true, value: JSON.parse(new TextDecoder().decode(file.bytes)) };
  } catch (err) {
    const detail = err instanceof Error ? err.message : String(err);
    return { ok: false, message: `${file.name} is not valid JSON (${detail})` };
  }
}

/**
 * The one JSON file holding a modelTopology. Other JSON files (labels, metadata) are ignored;
 * a JSON that does not parse is reported only when no model JSON was found, since it may be the model.
 */
export function findModelJson(files: readonly NamedBytes[]): ModelJsonFile {
  const jsonFiles = files.filter((f) => f.name.toLowerCase().endsWith('.json'));
  const found: ModelJsonFile[] = [];
  const broken: string[] = [];
  for (const file of jsonFiles) {
    const parsed = parseJson(file);
    if (!parsed.ok) broken.push(parsed.message);
    else if (isRecord(parsed.value) && isRecord(parsed.value['modelTopology'])) {
      found.push({ file, json: parsed.value as unknown as tf.io.ModelJSON });
    }
  }
  if (found.length > 1) {
    throw new Error(`More than one model.json among the files (${found.map((f) => f.file.name).join(', ')}); drop one model at a time.`);
  }
  const only = found[0];
  if (only !== undefined) return only;
  if (broken.length > 0) throw new Error(`No readable model.json: ${broken.join('; ')}.`);
  const names = files.map((f) => f.name).slice(0, 5).join(', ');
  const more = files.length > 5 ? ', …' : '';
  throw new Error(
    `No model.json (a JSON file with a modelTopology) or .onnx file among the ${files.length} file(s) given${files.length > 0 ? ` (${names}${more})` : ''}.`,
  );
}

/** The file a manifest path refers to: same base name, preferring the one beside model.json. */
function findShard(path: string, modelJsonName: string, files: readonly NamedBytes[]): NamedBytes {
  const wanted = normalisePath(path);
  const wantedBase = baseName(wanted);
  const candidates = files.filter((f) => baseName(f.name) === wantedBase);
  if (candidates.length === 0) {
    throw new Error(`Weight file ${wantedBase} listed in ${modelJsonName} is missing; add it to the files.`);
  }
  if (candidates.length === 1) return candidates[0]!;
  const beside = candidates.find((f) => normalisePath(f.name) === normalisePath(folderOf(modelJsonName) + wanted));
  if (beside !== undefined) return beside;
  throw new Error(`Weight file ${wantedBase} is ambiguous: ${candidates.map((f) => f.name).join(', ')}.`);
}

const BYTES_PER_VALUE: Readonly<Record<string, number>> = {
  float32: 4,
  int32: 4,
  bool: 1,
  complex64: 8,
  uint8: 1,
  uint16: 2,
  float16: 2,
};

/** Bytes one manifest entry occupies in the shards; null when it cannot be known up front (strings). */
export function entryByteLength(entry: tf.io.WeightsManifestEntry): number | null {
  const stored = entry.quantization?.dtype ?? entry.dtype;
  const perValue = BYTES_PER_VALUE[stored];
  if (perValue === undefined) return null;
  return elementCount(entry.shape) * perValue;
}

/** Number of values in a tensor of this shape (1 for a scalar). */
export function elementCount(shape: readonly number[]): number {
  return shape.reduce((a, b) => a * b, 1);
}

function concatenate(parts: readonly Uint8Array[]): Uint8Array {
  const total = parts.reduce((n, p) => n + p.byteLength, 0);
  const out = new Uint8Array(total);
  let offset = 0;
  for (const p of parts) {
    out.set(p, offset);
    offset += p.byteLength;
  }
  return out;
}

function groupByteLength(group: tf.io.WeightsManifestConfig[number]): number | null {
  let total = 0;
  for (const entry of group.weights) {
    const n = entryByteLength(entry);
    if (n === null) return null;
    total += n;
  }
  return total;
}

/**
 * Reads every shard of the manifest (in manifest order) and checks each group has the bytes its
 * entries need, so a truncated download fails here and not deep inside tfjs.
 */
export function assembleWeights(model: ModelJsonFile, files: readonly NamedBytes[]): AssembledWeights {
  const manifest = model.json.weightsManifest ?? [];
  if (!Array.isArray(manifest)) throw new Error(`${model.file.name} has a weightsManifest that is not a list.`);
  const specs: tf.io.WeightsManifestEntry[] = [];
  const groups: Uint8Array[] = [];
  for (const group of manifest) {
    const shards = group.paths.map((p) => findShard(p, model.file.name, files).bytes);
    const bytes = concatenate(shards);
    const needed = groupByteLength(group);
    if (needed !== null && bytes.byteLength < needed) {
      throw new Error(
        `Weight file(s) ${group.paths.map(baseName).join(', ')} hold ${bytes.byteLength} bytes but ${model.file.name} needs ${needed}; the files are truncated or belong to another model.`,
      );
    }
    specs.push(...group.weights);
    groups.push(bytes);
  }
  const all = concatenate(groups);
  return { specs, data: all.buffer.slice(all.byteOffset, all.byteOffset + all.byteLength) as ArrayBuffer };
}
