/**
 * Relative-path helpers for sample files. The core never sees a file system: every file is a
 * NamedBytes whose name is a relative path with '/' separators, so these work on strings only.
 */

const IMAGE_EXTENSIONS = ['.png', '.jpg', '.jpeg'] as const;

/** File names (compared case-insensitively) that are read as a class-names list. */
export const CLASS_NAMES_FILE_NAMES: readonly string[] = ['classes.txt', 'class_names.txt', 'class-names.txt', 'labels.txt'];

/** True for .png, .jpg and .jpeg names, in any letter case. */
export function isImageName(name: string): boolean {
  const lower = name.toLowerCase();
  return IMAGE_EXTENSIONS.some((ext) => lower.endsWith(ext));
}

/** True for a .csv name (a manifest), in any letter case. */
export function isManifestName(name: string): boolean {
  return name.toLowerCase().endsWith('.csv');
}

/** True when the file's last path component is one of CLASS_NAMES_FILE_NAMES. */
export function isClassNamesName(name: string): boolean {
  return CLASS_NAMES_FILE_NAMES.includes(baseName(name).toLowerCase());
}

/** True for every file buildSampleSet may read: images, manifests and class-names files. */
export function isSampleRelevantName(name: string): boolean {
  return isImageName(name) || isManifestName(name) || isClassNamesName(name);
}

/**
 * True for paths that a file manager or an archiver adds and the user never meant as samples:
 * any component starting with '.' (e.g. .DS_Store, AppleDouble '._1.png') or named __MACOSX.
 */
export function isHiddenPath(path: string): boolean {
  return path.split('/').some((part) => (part.startsWith('.') && part !== '.' && part !== '..') || part === '__MACOSX');
}

/**
 * Normalises a relative path: '\\' becomes '/', empty and '.' components go, 'a/..' collapses.
 * Leading '..' components are kept (a manifest may point above its own folder).
 */
export function normalizePath(path: string): string {
  const out: string[] = [];
  for (const part of path.replace(/\\/g, '/').split('/')) {
    if (part === '' || part === '.') continue;
    if (part === '..' && out.length > 0 && out[out.length - 1] !== '..') out.pop();
    else out.push(part);
  }
  return out.join('/');
}

/** The folder part of a normalised path ('' at the top level). */
export function dirName(path: string): string {
  const cut = path.lastIndexOf('/');
  return cut < 0 ? '' : path.slice(0, cut);
}

/** The last component of a path. */
export function baseName(path: string): string {
  return path.slice(path.lastIndexOf('/') + 1);
}

/** Joins a folder and a relative path and normalises the result. */
export function joinPath(folder: string, relative: string): string {
  return normalizePath(folder === '' ? relative : `${folder}/${relative}`);
}

/** Path components of a folder ('' → none). */
export function folderParts(folder: string): string[] {
  return folder === '' ? [] : folder.split('/');
}

/** Code-unit order: the same on every platform and locale, unlike localeCompare. */
export function comparePaths(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
