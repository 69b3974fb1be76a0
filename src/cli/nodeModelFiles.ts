/**
 * CLI side of model loading: reads a model.json and the shards its manifest lists (or one .onnx
 * file) from disk into NamedBytes, which the core's loadModelFromFiles takes.
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { NamedBytes } from '../core/types.ts';

/** Reads one file; `what` names it in errors, e.g. "Model file /m/model.json". */
async function readNamed(filePath: string, name: string, what: string): Promise<NamedBytes> {
  try {
    const buffer = await readFile(filePath);
    return { name, bytes: new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength) };
  } catch (err) {
    const code = (err as { code?: string }).code;
    if (code === 'ENOENT') throw new Error(`${what} does not exist.`);
    throw new Error(`${what} could not be read: ${err instanceof Error ? err.message : String(err)}`);
  }
}

/** The shard paths listed in a model.json, in manifest order; an unreadable JSON is left for the core to report. */
function manifestPaths(modelJson: NamedBytes): string[] {
  let parsed: unknown;
  try {
    parsed = JSON.parse(new TextDecoder().decode(modelJson.bytes));
  } catch {
    return [];
  }
  const manifest = (parsed as { weightsManifest?: unknown }).weightsManifest;
  if (!Array.isArray(manifest)) return [];
  const paths: string[] = [];
  for (const group of manifest) {
    const groupPaths = (group as { paths?: unknown }).paths;
    if (Array.isArray(groupPaths)) paths.push(...groupPaths.filter((p): p is string => typeof p === 'string'));
  }
  return [...new Set(paths)];
}

/**
 * Reads a model for the CLI: a .onnx path gives that one file; a model.json path gives the JSON
 * plus every shard its weightsManifest lists, read from the same folder. Errors name the missing file.
 */
export async function readModelFiles(modelPath: string): Promise<NamedBytes[]> {
  const fileName = path.basename(modelPath);
  if (fileName.toLowerCase().endsWith('.onnx')) return [await readNamed(modelPath, fileName, `Model file ${modelPath}`)];
  const modelJson = await readNamed(modelPath, fileName, `Model file ${modelPath}`);
  const folder = path.dirname(modelPath);
  const shards = await Promise.all(
    manifestPaths(modelJson).map((p) => {
      const full = path.join(folder, p);
      return readNamed(full, p.replace(/\\/g, '/'), `Weight file ${p} listed in ${fileName} (${full})`);
    }),
  );
  return [modelJson, ...shards];
}
