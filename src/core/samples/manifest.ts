/**
 * The CSV manifest: rows `file,label` (an optional header row `file,label`), where `file` is a
 * path relative to the manifest's own folder and `label` a class index or a class name.
 */
import type { NamedBytes } from '../types.ts';
import { parseCsv } from './csv.ts';
import { dirName, joinPath } from './paths.ts';

/** One manifest row. */
export interface ManifestEntry {
  /** Spreadsheet row number in the manifest (header included), for error messages. */
  readonly row: number;
  /** The path exactly as written in the manifest. */
  readonly listed: string;
  /** The path relative to the manifest's folder, normalised: the file's name for the CLI. */
  readonly relative: string;
  /** The same path resolved against the manifest's own name: the key among the given files. */
  readonly resolved: string;
  readonly label: string;
}

/** Decodes UTF-8 text, dropping a byte-order mark. */
export function decodeText(file: NamedBytes): string {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(file.bytes);
  } catch {
    throw new Error(`${file.name} is not UTF-8 text`);
  }
  return text.startsWith('\uFEFF') ? text.slice(1) : text;
}

/**
 * Reads the manifest's rows in order. Throws on a row without exactly two fields, an empty field,
 * an absolute path, a file listed twice, or a manifest without rows.
 */
export function parseManifest(file: NamedBytes): ManifestEntry[] {
  const records = parseCsv(decodeText(file), file.name);
  const first = records[0];
  const hasHeader =
    first !== undefined && first.fields.length === 2 && first.fields[0]?.toLowerCase() === 'file' && first.fields[1]?.toLowerCase() === 'label';
  const folder = dirName(file.name);
  const entries: ManifestEntry[] = [];
  const rowOf = new Map<string, number>();
  for (const record of hasHeader ? records.slice(1) : records) {
    const [listed, label] = record.fields;
    if (record.fields.length !== 2 || listed === undefined || label === undefined) {
      throw new Error(`${file.name} row ${record.row}: expected 2 fields (file,label), found ${record.fields.length}`);
    }
    if (listed === '') throw new Error(`${file.name} row ${record.row}: the file field is empty`);
    if (label === '') throw new Error(`${file.name} row ${record.row}: the label field is empty`);
    if (/^([/\\]|[A-Za-z]:[/\\])/.test(listed)) {
      throw new Error(`${file.name} row ${record.row}: ${listed} is an absolute path; paths must be relative to the manifest's folder`);
    }
    const relative = joinPath('', listed);
    const resolved = joinPath(folder, listed);
    const earlier = rowOf.get(resolved);
    if (earlier !== undefined) throw new Error(`${file.name} row ${record.row}: ${listed} is already listed in row ${earlier}`);
    rowOf.set(resolved, record.row);
    entries.push({ row: record.row, listed, relative, resolved, label });
  }
  if (entries.length === 0) throw new Error(`no images found: the manifest ${file.name} lists no rows`);
  return entries;
}
