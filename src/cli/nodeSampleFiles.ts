/**
 * Reads a sample set from disk for the CLI: a folder (every image, manifest and class-names file
 * below it) or a .csv manifest (the manifest, the files it lists and a class-names file beside it).
 */
import { readdir, readFile, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import type { NamedBytes } from '../core/types.ts';
import { parseManifest } from '../core/samples/manifest.ts';
import { comparePaths, isClassNamesName, isHiddenPath, isManifestName, isSampleRelevantName } from '../core/samples/paths.ts';

/**
 * Files for buildSampleSet. For a folder, names are relative to it with '/' separators (hidden
 * entries such as .DS_Store and other file types are skipped); for a manifest, names are relative
 * to the manifest's folder. Errors name the missing path.
 */
export async function readSampleFiles(samplesPath: string): Promise<NamedBytes[]> {
  const info = await stat(samplesPath).catch(() => null);
  if (info === null) throw new Error(`sample path not found: ${samplesPath}`);
  if (info.isDirectory()) return readFolder(samplesPath);
  if (info.isFile() && isManifestName(samplesPath)) return readManifestFiles(samplesPath);
  throw new Error(`samples must be a folder or a .csv manifest: ${samplesPath}`);
}

async function readFolder(root: string): Promise<NamedBytes[]> {
  const names = await listFiles(root, '', new Set());
  names.sort(comparePaths);
  return mapLimited(names, async (name) => ({ name, bytes: await readBytes(path.join(root, name)) }));
}

/** Relative names of the relevant files below `dir`, following symbolic links but never in a loop. */
async function listFiles(root: string, relative: string, seen: Set<string>): Promise<string[]> {
  const dir = path.join(root, relative);
  const real = await realpath(dir);
  if (seen.has(real)) return [];
  seen.add(real);
  const found: string[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const name = relative === '' ? entry.name : `${relative}/${entry.name}`;
    if (isHiddenPath(entry.name)) continue;
    const kind = entry.isSymbolicLink() ? await stat(path.join(dir, entry.name)).catch(() => null) : entry;
    if (kind?.isDirectory()) found.push(...(await listFiles(root, name, seen)));
    else if (kind?.isFile() && isSampleRelevantName(entry.name)) found.push(name);
  }
  return found;
}

async function readManifestFiles(manifestPath: string): Promise<NamedBytes[]> {
  const folder = path.dirname(manifestPath);
  const manifest: NamedBytes = { name: path.basename(manifestPath), bytes: await readBytes(manifestPath) };
  const listed = await mapLimited(parseManifest(manifest), async (entry) => {
    const full = path.join(folder, ...entry.relative.split('/'));
    const bytes = await readBytes(full).catch(() => {
      throw new Error(`${manifest.name} row ${entry.row}: missing file ${entry.listed} (${full})`);
    });
    return { name: entry.relative, bytes };
  });
  return [manifest, ...listed, ...(await readClassNamesBeside(folder))];
}

/** The class-names file next to a manifest, if there is one. */
async function readClassNamesBeside(folder: string): Promise<NamedBytes[]> {
  const names = (await readdir(folder)).filter(isClassNamesName).sort(comparePaths);
  return mapLimited(names, async (name) => ({ name, bytes: await readBytes(path.join(folder, name)) }));
}

/** Like Promise.all over items.map(task), with at most `limit` tasks open at once (file handles are finite). */
async function mapLimited<T, R>(items: readonly T[], task: (item: T) => Promise<R>, limit = 32): Promise<R[]> {
  const results = new Array<R>(items.length);
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < items.length) {
      const i = next++;
      results[i] = await task(items[i]!);
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, worker));
  return results;
}

async function readBytes(file: string): Promise<Uint8Array> {
  const buffer = await readFile(file);
  return new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
}
