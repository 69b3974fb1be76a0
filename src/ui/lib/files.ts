/**
 * Collecting files the user hands over (a drop, a file picker, a folder picker) into NamedBytes
 * whose names keep the folder structure ("stop-bar/001.png"), which the core's loaders rely on.
 */
import type { NamedBytes } from '../../core/types.ts';

/** The relative name of a picked file: its path inside a picked folder, else its own name. */
export function relativeName(file: File): string {
  const path = (file as File & { webkitRelativePath?: string }).webkitRelativePath;
  return path !== undefined && path !== '' ? path : file.name;
}

/** Read picked files (an <input type=file> list). Each gets its own buffer, so it can be transferred. */
export async function filesFromList(list: FileList | readonly File[]): Promise<NamedBytes[]> {
  const files = Array.from(list);
  return Promise.all(files.map(async (f) => ({ name: relativeName(f), bytes: new Uint8Array(await f.arrayBuffer()) })));
}

function readEntries(reader: FileSystemDirectoryReader): Promise<FileSystemEntry[]> {
  return new Promise((resolve, reject) => reader.readEntries(resolve, reject));
}

function entryFile(entry: FileSystemFileEntry): Promise<File> {
  return new Promise((resolve, reject) => entry.file(resolve, reject));
}

/** Every file below an entry, with its path from the drop's top level. */
async function walk(entry: FileSystemEntry): Promise<{ path: string; file: File }[]> {
  const path = entry.fullPath.replace(/^\/+/, '');
  if (entry.isFile) return [{ path, file: await entryFile(entry as FileSystemFileEntry) }];
  if (!entry.isDirectory) return [];
  const reader = (entry as FileSystemDirectoryEntry).createReader();
  const found: { path: string; file: File }[] = [];
  // readEntries returns at most 100 entries per call in Chromium; call until it returns none.
  for (let batch = await readEntries(reader); batch.length > 0; batch = await readEntries(reader)) {
    for (const child of batch) found.push(...(await walk(child)));
  }
  return found;
}

/**
 * Read a drop: files and whole folders. Entries must be taken from the DataTransfer synchronously,
 * in the event handler, before anything is awaited; this function does that first.
 */
export async function filesFromDrop(data: DataTransfer): Promise<NamedBytes[]> {
  const entries = Array.from(data.items)
    .filter((item) => item.kind === 'file')
    .map((item) => item.webkitGetAsEntry());
  if (entries.some((e) => e === null)) return filesFromList(data.files);
  const found = (await Promise.all(entries.map((e) => walk(e!)))).flat();
  return Promise.all(found.map(async ({ path, file }) => ({ name: path, bytes: new Uint8Array(await file.arrayBuffer()) })));
}
