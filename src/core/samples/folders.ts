/**
 * The folder-per-class layout: every image is `<root>/<class>/<image>`, where `<root>` is the
 * folder all images share (possibly none, e.g. `cat/1.png`, or `samples` in `samples/cat/1.png`).
 */
import type { NamedBytes } from '../types.ts';
import { comparePaths, dirName, folderParts, isImageName } from './paths.ts';

/** One image and the name of the class folder it sits in. */
export interface FolderEntry {
  readonly file: NamedBytes;
  /** Normalised path of the file. */
  readonly path: string;
  readonly folder: string;
}

/** The images in path order and the folder holding the class folders ('' = the top level). */
export interface FolderLayout {
  readonly root: string;
  readonly entries: readonly FolderEntry[];
}

/** A file whose name has already been normalised. */
export interface NormalisedFile {
  readonly path: string;
  readonly file: NamedBytes;
}

/**
 * Finds the class folders. Throws when there are no images, when images sit at the top level
 * with no class folder, when images sit at different depths below their common folder (mixed
 * layout), or when a class folder holds files but no image (empty class).
 */
export function readFolderLayout(files: readonly NormalisedFile[]): FolderLayout {
  const images = files.filter((f) => isImageName(f.path)).sort((a, b) => comparePaths(a.path, b.path));
  if (images.length === 0) {
    throw new Error('no images found: expected .png/.jpg/.jpeg files in one folder per class (e.g. cat/1.png) or a .csv manifest');
  }
  const root = findRoot(images.map((f) => f.path));
  const depth = folderParts(root).length;
  const entries = images.map(({ path, file }) => ({ path, file, folder: folderParts(dirName(path))[depth] ?? '' }));
  checkNoEmptyClassFolder(files, root, new Set(entries.map((e) => e.folder)));
  return { root, entries };
}

function findRoot(imagePaths: readonly string[]): string {
  const dirs = imagePaths.map((p) => folderParts(dirName(p)));
  const common = commonPrefix(dirs);
  const shallowest = imagePaths[indexOfExtreme(dirs, (a, b) => a < b)] ?? '';
  const deepest = imagePaths[indexOfExtreme(dirs, (a, b) => a > b)] ?? '';
  if (dirs.every((d) => d.length === common.length)) {
    if (common.length === 0) {
      throw new Error(
        `no class folders: ${shallowest} sits at the top level; put images in one folder per class (e.g. cat/1.png) or list them in a .csv manifest`,
      );
    }
    return common.slice(0, -1).join('/');
  }
  if (dirs.some((d) => d.length !== common.length + 1)) {
    const where = common.length === 0 ? 'the top level' : common.join('/');
    throw new Error(
      `mixed folder layout: expected every image directly inside one class folder under ${where}, but found ${shallowest} and ${deepest}`,
    );
  }
  return common.join('/');
}

function commonPrefix(lists: readonly (readonly string[])[]): string[] {
  const first = lists[0] ?? [];
  let length = first.length;
  for (const list of lists) {
    let i = 0;
    while (i < length && list[i] === first[i]) i++;
    length = i;
  }
  return first.slice(0, length);
}

function indexOfExtreme(dirs: readonly (readonly string[])[], better: (a: number, b: number) => boolean): number {
  let best = 0;
  dirs.forEach((d, i) => {
    if (better(d.length, dirs[best]?.length ?? 0)) best = i;
  });
  return best;
}

function checkNoEmptyClassFolder(files: readonly NormalisedFile[], root: string, withImages: ReadonlySet<string>): void {
  const depth = folderParts(root).length;
  const prefix = root === '' ? '' : `${root}/`;
  const empty = files
    .filter((f) => f.path.startsWith(prefix) && folderParts(dirName(f.path)).length > depth)
    .map((f) => folderParts(dirName(f.path))[depth] ?? '')
    .filter((folder) => !withImages.has(folder))
    .sort(comparePaths)[0];
  if (empty !== undefined) {
    throw new Error(`empty class: the folder ${prefix}${empty} holds no .png/.jpg/.jpeg images`);
  }
}
