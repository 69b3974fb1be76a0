/**
 * Saved runs on disk for the CLI: writing run.brink.json at the end of a sweep (with thumbnails of
 * flipped samples and the health checks, when run), and reading it back from a run folder.
 */
import { readFile, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { UsageError } from './args.ts';
import type { LoadedInputs } from './loadInputs.ts';
import type { BackendInfo } from '../core/backend/initBackend.ts';
import { HEALTH_CSV_HEADER } from '../core/export/healthCsv.ts';
import { saveRun, type HealthInput } from '../core/savedRun/saveRun.ts';
import { loadRun, SavedRunError } from '../core/savedRun/loadRun.ts';
import { createFlipCollector } from '../core/savedRun/thumbnails.ts';
import { SAVED_RUN_FILE, type SavedRun } from '../core/savedRun/types.ts';
import { parseCsv } from '../core/samples/csv.ts';
import type { SweepResult } from '../core/sweep/types.ts';
import type { SampleSet } from '../core/types.ts';

/** A collector to pass as runSweep's onAdversarial hook; keeps a few flips per class for thumbnails. */
export function flipCollectorFor(samples: SampleSet): ReturnType<typeof createFlipCollector> {
  return createFlipCollector(samples);
}

export interface SavedRunWrite {
  readonly outDir: string;
  readonly inputs: LoadedInputs;
  readonly result: SweepResult;
  readonly backend: BackendInfo;
  readonly commandLine: readonly string[];
  readonly collector: ReturnType<typeof createFlipCollector>;
  /** Whether health.csv was written by this sweep (then its rows go into the saved run). */
  readonly health: boolean;
}

/** Write run.brink.json into the output folder. */
export async function writeSavedRun(w: SavedRunWrite): Promise<void> {
  const health = w.health ? await readHealthRows(path.join(w.outDir, 'health.csv')) : undefined;
  const text = await saveRun({
    origin: 'cli',
    result: w.result,
    modelFiles: w.inputs.modelFiles,
    sampleFiles: w.inputs.sampleFiles,
    preprocessing: w.inputs.preprocessing,
    resize: w.inputs.resize,
    model: w.inputs.model.description,
    classNames: w.inputs.samples.classNames,
    backend: w.backend,
    commandLine: w.commandLine,
    samples: w.inputs.samples,
    flips: w.collector.kept(),
    ...(health !== undefined ? { health } : {}),
  });
  await writeFile(path.join(w.outDir, SAVED_RUN_FILE), text);
}

/** The rows of a health.csv (`check,status,detail`). */
async function readHealthRows(file: string): Promise<HealthInput[]> {
  const records = parseCsv(await readFile(file, 'utf8'), file);
  const [header, ...rows] = records;
  if (header === undefined || header.fields.join(',') !== HEALTH_CSV_HEADER.join(',')) throw new Error(`${file}: unexpected header`);
  return rows.map((r) => ({ check: r.fields[0] ?? '', status: r.fields[1] ?? '', detail: r.fields[2] ?? '' }));
}

/** A run folder (holding run.brink.json) or the saved-run file itself → its path. */
export async function savedRunPath(target: string): Promise<string> {
  let info;
  try {
    info = await stat(target);
  } catch {
    throw new UsageError(`${target}: no such file or folder`);
  }
  if (!info.isDirectory()) return target;
  const file = path.join(target, SAVED_RUN_FILE);
  try {
    await stat(file);
  } catch {
    throw new UsageError(`${target}: no ${SAVED_RUN_FILE} in this folder (the sweep command writes it beside curve.csv)`);
  }
  return file;
}

/** Read and check a saved run; every problem becomes a one-line UsageError naming the file. */
export async function readSavedRun(target: string): Promise<{ file: string; run: SavedRun }> {
  const file = await savedRunPath(target);
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await readFile(file));
  } catch (err) {
    throw new UsageError(`${file}: cannot read (${err instanceof Error ? err.message : String(err)})`);
  }
  try {
    return { file, run: loadRun(bytes) };
  } catch (err) {
    if (err instanceof SavedRunError) throw new UsageError(`${file}: ${err.message}`);
    throw err;
  }
}
