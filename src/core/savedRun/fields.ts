/**
 * Small readers for checking untrusted JSON field by field; each failure names the field's path
 * (e.g. `run.curve[3].robust`) so a broken or foreign file gets a message saying what is wrong.
 */

/** A saved-run file that cannot be read: wrong format, unsupported version, missing or bad fields. */
export class SavedRunError extends Error {
  override readonly name = 'SavedRunError';
}

export type Json = Record<string, unknown>;

/** The path of a field inside an object at `path` ('' for the top level). */
export function at(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

function describe(value: unknown): string {
  if (value === undefined) return 'missing';
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'a list';
  return typeof value === 'object' ? 'an object' : `${typeof value} ${JSON.stringify(value)?.slice(0, 40) ?? ''}`.trim();
}

/** Throw a SavedRunError saying which field is wrong and what was expected. */
export function fail(path: string, expected: string, value: unknown): never {
  throw new SavedRunError(`${path} is ${describe(value)} (expected ${expected})`);
}

export function objectAt(value: unknown, path: string): Json {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) fail(path, 'an object', value);
  return value as Json;
}

export function listAt(value: unknown, path: string): unknown[] {
  if (!Array.isArray(value)) fail(path, 'a list', value);
  return value;
}

export function stringAt(o: Json, key: string, path: string): string {
  const v = o[key];
  if (typeof v !== 'string') fail(at(path, key), 'text', v);
  return v;
}

export function numberAt(o: Json, key: string, path: string): number {
  const v = o[key];
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(at(path, key), 'a number', v);
  return v;
}

export function booleanAt(o: Json, key: string, path: string): boolean {
  const v = o[key];
  if (typeof v !== 'boolean') fail(at(path, key), 'true or false', v);
  return v;
}

export function choiceAt<T extends string>(o: Json, key: string, path: string, choices: readonly T[]): T {
  const v = o[key];
  if (typeof v !== 'string' || !(choices as readonly string[]).includes(v)) fail(at(path, key), `one of ${choices.join(', ')}`, v);
  return v as T;
}

export function numberListAt(o: Json, key: string, path: string): number[] {
  return listAt(o[key], at(path, key)).map((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) fail(`${at(path, key)}[${i}]`, 'a number', v);
    return v;
  });
}

export function stringListAt(o: Json, key: string, path: string): string[] {
  return listAt(o[key], at(path, key)).map((v, i) => {
    if (typeof v !== 'string') fail(`${at(path, key)}[${i}]`, 'text', v);
    return v;
  });
}

/** Run `read` on each element of the list at `o[key]`, with the element's path. */
export function eachAt<T>(o: Json, key: string, path: string, read: (item: Json, itemPath: string) => T): T[] {
  return listAt(o[key], at(path, key)).map((item, i) => read(objectAt(item, `${at(path, key)}[${i}]`), `${at(path, key)}[${i}]`));
}
