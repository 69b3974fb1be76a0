/**
 * Writing a saved run: assemble it from a finished sweep (hashing the inputs like run.json does),
 * and turn it into text. Also the way back to a SweepResult, so a loaded run can be shown and
 * analysed like a fresh one.
 */
import type { HealthCheck } from '../health/types.ts';
import { runRecord, type RunRecordInput } from '../export/runRecord.ts';
import type { SweepResult } from '../sweep/types.ts';
import { flipThumbnails, type KeptFlip, type ThumbnailLimits, type ThumbnailSamples } from './thumbnails.ts';
import { SAVED_RUN_FORMAT, SAVED_RUN_VERSION, type RunOrigin, type SavedHealthCheck, type SavedRun } from './types.ts';

/** A health check as the health module makes it, or a plain `{check, status, detail}` row. */
export type HealthInput = HealthCheck | SavedHealthCheck;

export interface SavedRunInput extends RunRecordInput {
  readonly origin: RunOrigin;
  /** The sample set the sweep ran on (labels, size and pixels, for the thumbnails). */
  readonly samples: ThumbnailSamples;
  /** Adversarial points of flipped samples (e.g. from createFlipCollector); may be empty. */
  readonly flips: readonly KeptFlip[];
  readonly health?: readonly HealthInput[];
  readonly thumbnailLimits?: ThumbnailLimits;
  /** ISO time stamp; defaults to now. */
  readonly savedAt?: string;
}

/** Assemble the saved run: the run record (inputs hashed), records, health checks and thumbnails. */
export async function buildSavedRun(input: SavedRunInput): Promise<SavedRun> {
  const run = await runRecord(input);
  const { samples } = input;
  return {
    format: SAVED_RUN_FORMAT,
    formatVersion: SAVED_RUN_VERSION,
    origin: input.origin,
    savedAt: input.savedAt ?? new Date().toISOString(),
    run,
    imageSize: { height: samples.height, width: samples.width, channels: samples.channels },
    records: input.result.records,
    ...(input.health !== undefined ? { health: input.health.map(savedHealthCheck) } : {}),
    flips: flipThumbnails(input.flips, samples, input.result.records, input.thumbnailLimits ?? {}),
  };
}

/** The saved run as text: compact JSON (records can be many) with a final newline. */
export function serializeSavedRun(run: SavedRun): string {
  return `${JSON.stringify(run)}\n`;
}

/** buildSavedRun then serializeSavedRun: the file's text. */
export async function saveRun(input: SavedRunInput): Promise<string> {
  return serializeSavedRun(await buildSavedRun(input));
}

/** A health check in the stored shape. */
export function savedHealthCheck(check: HealthInput): SavedHealthCheck {
  if ('check' in check) return { check: check.check, status: check.status, detail: check.detail, ...(check.title !== undefined ? { title: check.title } : {}), ...(check.numbers !== undefined ? { numbers: { ...check.numbers } } : {}) };
  return { check: check.id, status: check.status, detail: check.detail, title: check.title, numbers: { ...check.numbers } };
}

/** The sweep result a saved run describes (for the per-class statistics, flip matrices, charts). */
export function sweepResultOf(saved: SavedRun): SweepResult {
  const { run } = saved;
  return {
    config: run.config,
    cleanAccuracy: run.samples.cleanAccuracy,
    cleanCorrect: run.samples.cleanCorrect,
    samples: run.samples.count,
    curve: run.curve,
    records: saved.records,
    complete: run.complete,
    startedAt: run.startedAt,
    endedAt: run.endedAt,
  };
}
