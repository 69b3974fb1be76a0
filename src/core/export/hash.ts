/** SHA-256 fingerprints of the inputs, so a run record names exactly which model and samples it used. */
import type { NamedBytes } from '../types.ts';

/** Lower-case hex SHA-256 of the bytes (Web Crypto, available in browsers, workers and Node ≥ 20). */
export async function sha256Hex(bytes: Uint8Array): Promise<string> {
  const digest = await crypto.subtle.digest('SHA-256', bytes as Uint8Array<ArrayBuffer>);
  return Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, '0')).join('');
}

/** One file's name and content hash. */
export interface FileHash {
  readonly name: string;
  readonly sha256: string;
}

/** Content hashes of the files, sorted by name (UTF-16 code unit order, independent of locale). */
export async function hashFiles(files: readonly NamedBytes[]): Promise<FileHash[]> {
  const hashes = await Promise.all(files.map(async (f) => ({ name: f.name, sha256: await sha256Hex(f.bytes) })));
  return hashes.sort((a, b) => compareText(a.name, b.name) || compareText(a.sha256, b.sha256));
}

/**
 * One hash for a set of files, independent of the order they were given in: SHA-256 of the UTF-8
 * text made of one line `<content sha256>  <name>\n` per file, sorted by name (the layout of the
 * sha256sum tool's listing, so the set hash can be recomputed from such a listing).
 */
export async function hashFileSet(files: readonly NamedBytes[]): Promise<string> {
  const listing = fileListing(await hashFiles(files));
  return sha256Hex(new TextEncoder().encode(listing));
}

/** The listing hashFileSet hashes. */
export function fileListing(hashes: readonly FileHash[]): string {
  return hashes.map((h) => `${h.sha256}  ${h.name}\n`).join('');
}

function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
