/**
 * Builds a labelled SampleSet from files: either a CSV manifest (`file,label` rows) or one folder
 * per class. Images are decoded by the platform's ImageDecoder, then converted and resized in
 * plain TypeScript (resize.ts) so every platform gets the same pixels.
 */
import type { ImageDecoder, NamedBytes, SampleSet } from '../types.ts';
import { parseClassNames, resolveClasses, type RawLabel } from './classNames.ts';
import { readFolderLayout, type NormalisedFile } from './folders.ts';
import { parseManifest } from './manifest.ts';
import { dirName, isClassNamesName, isHiddenPath, isImageName, isManifestName, normalizePath } from './paths.ts';
import { prepareImage } from './resize.ts';
import { DEFAULT_RESIZE, isResizeMode, type ResizeMode } from './crop.ts';

export interface SampleSetOptions {
  readonly height: number;
  readonly width: number;
  readonly channels: 1 | 3;
  readonly decoder: ImageDecoder;
  /** Class names in index order; they win over a class-names file among the files. */
  readonly classNames?: readonly string[];
  /**
   * How an image becomes height × width: 'stretch' (default) resizes the whole image, 'crop' its
   * largest centred region with the aspect ratio height : width (see crop.ts centreCropBox).
   */
  readonly resize?: ResizeMode;
}

export interface SampleSetBuild {
  readonly set: SampleSet;
  readonly source: 'folders' | 'manifest';
  /** Every class in index order with its number of samples (0 is possible with given names). */
  readonly classMapping: readonly { readonly name: string; readonly index: number; readonly count: number }[];
}

/** One image to load and its raw label. */
interface Labelled {
  readonly file: NamedBytes;
  readonly raw: RawLabel;
}

/**
 * Reads the files into a sample set at height × width × channels (each image stretched to that
 * size, or centre-cropped to its proportions first with `resize: 'crop'`). With a .csv among the files
 * the manifest decides which images are used, in its row order; otherwise every image belongs to
 * its class folder, in path order. Class names come from `options.classNames`, else from a
 * class-names file (classes.txt, class_names.txt, class-names.txt or labels.txt) beside the
 * manifest or at or above the class folders, else from the labels themselves (see resolveClasses).
 * Errors are single-line and name the file, row or folder concerned.
 */
export async function buildSampleSet(files: readonly NamedBytes[], options: SampleSetOptions): Promise<SampleSetBuild> {
  checkOptions(options);
  const all = files.map((file) => ({ path: normalizePath(file.name), file }));
  const visible = all.filter((f) => !isHiddenPath(f.path));
  const manifests = visible.filter((f) => isManifestName(f.path));
  if (manifests.length > 1) {
    throw new Error(`several .csv manifests found (${manifests.map((m) => m.path).join(', ')}); give exactly one`);
  }
  const manifest = manifests[0];
  const { labelled, classFolder } = manifest !== undefined ? fromManifest(manifest, all) : fromFolders(visible);
  const classNames = options.classNames ?? findClassNames(visible, classFolder);
  const { classNames: names, indices } = resolveClasses(labelled.map((l) => l.raw), classNames);
  const pixels = await decodeAll(labelled, options);
  const counts = new Array<number>(names.length).fill(0);
  for (const index of indices) counts[index] = (counts[index] ?? 0) + 1;
  const set: SampleSet = {
    files: labelled.map((l) => l.file.name),
    labels: indices,
    classNames: [...names],
    height: options.height,
    width: options.width,
    channels: options.channels,
    pixels,
  };
  return {
    set,
    source: manifest !== undefined ? 'manifest' : 'folders',
    classMapping: names.map((name, index) => ({ name, index, count: counts[index] ?? 0 })),
  };
}

function checkOptions(options: SampleSetOptions): void {
  const { height, width, channels } = options;
  if (!(Number.isInteger(height) && Number.isInteger(width) && height > 0 && width > 0)) {
    throw new Error(`sample size must be positive integers, got ${height}×${width}`);
  }
  if (channels !== 1 && channels !== 3) throw new Error(`channels must be 1 or 3, got ${String(channels)}`);
  if (options.resize !== undefined && !isResizeMode(options.resize)) throw new Error(`resize must be stretch or crop, got ${String(options.resize)}`);
  const names = options.classNames;
  if (names !== undefined) {
    if (names.length === 0) throw new Error('the class-names list is empty');
    const duplicate = names.find((name, i) => names.indexOf(name) !== i);
    if (duplicate !== undefined) throw new Error(`class name "${duplicate}" appears twice in the class-names list`);
  }
}

function fromManifest(manifest: NormalisedFile, files: readonly NormalisedFile[]): { labelled: Labelled[]; classFolder: string } {
  const byPath = new Map(files.map((f) => [f.path, f.file] as const));
  const labelled = parseManifest({ name: manifest.path, bytes: manifest.file.bytes }).map((entry) => {
    const where = `${manifest.path} row ${entry.row}`;
    const file = byPath.get(entry.resolved);
    if (file === undefined) throw new Error(`${where}: missing file ${entry.listed}`);
    if (!isImageName(entry.resolved)) throw new Error(`${where}: ${entry.listed} is not a .png/.jpg/.jpeg image`);
    return { file, raw: { label: entry.label, where } };
  });
  return { labelled, classFolder: dirName(manifest.path) };
}

function fromFolders(files: readonly NormalisedFile[]): { labelled: Labelled[]; classFolder: string } {
  const layout = readFolderLayout(files);
  const prefix = layout.root === '' ? '' : `${layout.root}/`;
  const labelled = layout.entries.map((e) => ({ file: e.file, raw: { label: e.folder, where: `folder ${prefix}${e.folder}` } }));
  return { labelled, classFolder: layout.root };
}

/** A class-names file in `folder` or one of its ancestors (the nearest wins; two in one folder is an error). */
function findClassNames(files: readonly NormalisedFile[], folder: string): string[] | undefined {
  const candidates = files.filter((f) => {
    if (!isClassNamesName(f.path)) return false;
    const dir = dirName(f.path);
    return dir === '' || folder === dir || folder.startsWith(`${dir}/`);
  });
  if (candidates.length === 0) return undefined;
  const nearestDepth = Math.max(...candidates.map((f) => f.path.split('/').length));
  const nearest = candidates.filter((f) => f.path.split('/').length === nearestDepth);
  if (nearest.length > 1) throw new Error(`several class-names files found (${nearest.map((f) => f.path).join(', ')}); keep one`);
  const chosen = nearest[0]!;
  return parseClassNames({ name: chosen.path, bytes: chosen.file.bytes });
}

async function decodeAll(labelled: readonly Labelled[], options: SampleSetOptions): Promise<Float32Array> {
  const { height, width, channels } = options;
  const resize = options.resize ?? DEFAULT_RESIZE;
  const size = height * width * channels;
  const pixels = new Float32Array(labelled.length * size);
  for (let i = 0; i < labelled.length; i++) {
    const file = labelled[i]!.file;
    let prepared: Float32Array;
    try {
      prepared = prepareImage(await options.decoder(file), height, width, channels, resize);
    } catch (error) {
      throw new Error(`unreadable image ${file.name}: ${reasonOf(error)}`);
    }
    pixels.set(prepared, i * size);
  }
  return pixels;
}

function reasonOf(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return text.replace(/\s+/g, ' ').trim() || 'no reason given';
}

export { parseClassNames } from './classNames.ts';
export { RESIZE_MODES, DEFAULT_RESIZE, isResizeMode, type ResizeMode } from './crop.ts';
