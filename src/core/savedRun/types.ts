/**
 * The saved-run file: one JSON document holding everything needed to read a sweep again without
 * re-running it — the run record (the same content as run.json: hashes, configuration, curve,
 * versions, backend, times, command line), the per-sample records, health checks when they were
 * run, and small PNG thumbnails of flipped samples. Plain data only.
 */
import type { AttackId } from '../attacks/types.ts';
import type { RunRecord } from '../export/runRecord.ts';
import type { SampleRecord } from '../sweep/types.ts';

/** Value of the `format` field: names the file type. */
export const SAVED_RUN_FORMAT = 'brink-saved-run';
/** The format version this code writes and reads. */
export const SAVED_RUN_VERSION = 1;
/** The file name the CLI writes into --out, next to curve.csv, samples.csv and run.json. */
export const SAVED_RUN_FILE = 'run.brink.json';

/** Where the run was made: the command line or the browser workbench. */
export type RunOrigin = 'cli' | 'workbench';

/**
 * One health check as stored: `check` is its id (health/types.ts HealthCheckId, or any name from
 * another source), `status` pass, warn or skip. Title and numbers are kept when known.
 */
export interface SavedHealthCheck {
  readonly check: string;
  readonly status: string;
  readonly detail: string;
  readonly title?: string;
  readonly numbers?: Readonly<Record<string, number | null>>;
}

/** Original and adversarial image of one flipped sample, at the budget where it first flipped. */
export interface FlipThumbnail {
  readonly attack: AttackId;
  /** The smallest budget of the sweep at which the attack flipped this sample. */
  readonly eps: number;
  readonly index: number;
  readonly file: string;
  readonly label: number;
  readonly cleanPred: number;
  readonly cleanConf: number;
  readonly advPred: number;
  readonly advConf: number;
  /** Base64 PNG (8-bit) of the clean image and of the kept adversarial point. */
  readonly originalPng: string;
  readonly adversarialPng: string;
}

export interface SavedRun {
  readonly format: typeof SAVED_RUN_FORMAT;
  readonly formatVersion: typeof SAVED_RUN_VERSION;
  readonly origin: RunOrigin;
  readonly savedAt: string;
  /** The run record, exactly as run.json holds it. */
  readonly run: RunRecord;
  /** Size of the sample images as the model saw them (after resizing). */
  readonly imageSize: { readonly height: number; readonly width: number; readonly channels: number };
  readonly records: readonly SampleRecord[];
  /** Present when health checks were run. */
  readonly health?: readonly SavedHealthCheck[];
  /** A selection of flipped samples (see savedRun/thumbnails.ts for which ones). */
  readonly flips: readonly FlipThumbnail[];
}
