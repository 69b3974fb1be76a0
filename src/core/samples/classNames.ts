/**
 * Class-names files (one name per line, line i − 1 is class index i) and the mapping of sample
 * labels (folder names or manifest labels) to class indices.
 */
import type { NamedBytes } from '../types.ts';
import { comparePaths } from './paths.ts';
import { decodeText } from './manifest.ts';

/**
 * Reads a class-names file: one name per line, trimmed; empty lines at the end are skipped.
 * Throws on an empty file, an empty line before the last name, or a duplicate name.
 */
export function parseClassNames(file: NamedBytes): string[] {
  const lines = decodeText(file)
    .split(/\r\n|\n|\r/)
    .map((line) => line.trim());
  while (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  if (lines.length === 0) throw new Error(`${file.name} lists no class names`);
  const lineOf = new Map<string, number>();
  lines.forEach((name, i) => {
    if (name === '') throw new Error(`${file.name} line ${i + 1} is empty (class index ${i} would have no name)`);
    const earlier = lineOf.get(name);
    if (earlier !== undefined) throw new Error(`${file.name}: class name "${name}" appears twice (lines ${earlier} and ${i + 1})`);
    lineOf.set(name, i + 1);
  });
  return lines;
}

/** A label as found in the data, with where it was found (for error messages). */
export interface RawLabel {
  readonly label: string;
  /** e.g. "manifest.csv row 4" or "folder samples/cat". */
  readonly where: string;
}

/** The class names in index order and the class index of every raw label. */
export interface ClassResolution {
  readonly classNames: readonly string[];
  readonly indices: Int32Array;
}

const INTEGER = /^[+-]?\d+$/;

/**
 * Maps labels to class indices. With class names, a label equal to a name takes that name's
 * index, otherwise an integer label is an index in [0, K−1]. Without class names, integer labels
 * are indices (names "0" … "max") and name labels are numbered in sorted order; a mix is refused.
 */
export function resolveClasses(labels: readonly RawLabel[], classNames?: readonly string[]): ClassResolution {
  if (classNames !== undefined) return resolveWithNames(labels, classNames);
  const integers = labels.filter((l) => INTEGER.test(l.label));
  const names = labels.filter((l) => !INTEGER.test(l.label));
  const firstInteger = integers[0];
  const firstName = names[0];
  if (firstInteger !== undefined && firstName !== undefined) {
    throw new Error(
      `labels mix class indices (${firstInteger.where}: ${firstInteger.label}) and class names (${firstName.where}: ${firstName.label}); give a class-names file`,
    );
  }
  if (firstName === undefined) return resolveIndicesOnly(labels);
  const sorted = [...new Set(labels.map((l) => l.label))].sort(comparePaths);
  return resolveWithNames(labels, sorted);
}

function resolveWithNames(labels: readonly RawLabel[], classNames: readonly string[]): ClassResolution {
  const indexOf = new Map(classNames.map((name, i) => [name, i] as const));
  const indices = new Int32Array(labels.length);
  labels.forEach((l, i) => {
    const byName = indexOf.get(l.label);
    if (byName !== undefined) indices[i] = byName;
    else if (INTEGER.test(l.label)) indices[i] = checkIndex(l, classNames.length);
    else throw new Error(`${l.where}: unknown class name "${l.label}" (known: ${listSome(classNames)})`);
  });
  return { classNames, indices };
}

function resolveIndicesOnly(labels: readonly RawLabel[]): ClassResolution {
  const indices = new Int32Array(labels.length);
  labels.forEach((l, i) => {
    indices[i] = checkIndex(l, Infinity);
  });
  const count = indices.reduce((max, v) => Math.max(max, v + 1), 0);
  return { classNames: Array.from({ length: count }, (_, i) => String(i)), indices };
}

function checkIndex(l: RawLabel, classCount: number): number {
  const value = Number(l.label);
  const range = classCount === Infinity ? 'must be ≥ 0' : `allowed 0–${classCount - 1}`;
  if (!Number.isSafeInteger(value) || value < 0 || value >= classCount) {
    throw new Error(`${l.where}: label ${l.label} is out of range (${range})`);
  }
  return value;
}

function listSome(names: readonly string[]): string {
  const shown = names.slice(0, 10).map((n) => `"${n}"`).join(', ');
  return names.length > 10 ? `${shown}, … ${names.length} in all` : shown;
}
