/**
 * .zip handling for dropped files: archives are opened in the worker (fflate) and their entries
 * join the other files under their own relative paths, so a zipped folder reads like the folder.
 */
import { unzipSync, zipSync, type Zippable } from 'fflate';
import type { NamedBytes } from '../core/types.ts';

/** True for a name ending in .zip (any letter case). */
export function isZipName(name: string): boolean {
  return name.toLowerCase().endsWith('.zip');
}

/**
 * Replaces every .zip among the files by its entries (folders skipped). Entry names are the paths
 * inside the archive. Throws, naming the archive, when one cannot be read.
 */
export function expandArchives(files: readonly NamedBytes[]): NamedBytes[] {
  const out: NamedBytes[] = [];
  for (const file of files) {
    if (!isZipName(file.name)) {
      out.push(file);
      continue;
    }
    let entries: Record<string, Uint8Array>;
    try {
      entries = unzipSync(file.bytes);
    } catch (err) {
      throw new Error(`${file.name} could not be opened as a .zip archive (${err instanceof Error ? err.message : String(err)}).`);
    }
    const names = Object.keys(entries).filter((name) => !name.endsWith('/'));
    if (names.length === 0) throw new Error(`${file.name} is an empty .zip archive.`);
    for (const name of names) out.push({ name, bytes: entries[name]! });
  }
  return out;
}

/** Packs the files into a .zip archive under their names. */
export function zipEntries(files: readonly NamedBytes[]): Uint8Array {
  const tree: Zippable = {};
  // Stored, not deflated: the entries are PNG files, already compressed.
  for (const f of files) tree[f.name] = [f.bytes, { level: 0 }];
  return zipSync(tree);
}
