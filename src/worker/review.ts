/**
 * The worker's part of the safety-review package: the saved run of the last sweep, built by the
 * core's own writer from what the worker holds (the input files for the hashes, the sample pixels,
 * and the adversarial points kept for the gallery, which become the flip thumbnails).
 */
import { buildSavedRun, type HealthInput, type SavedRunInput } from '../core/savedRun/saveRun.ts';
import { keptFlipsFrom } from '../core/savedRun/thumbnails.ts';
import type { SavedRun } from '../core/savedRun/types.ts';
import { flipKey, type SweepRecordInputs } from './engine.ts';
import { runRecordInputOf } from './exports.ts';

/** What buildSavedRun needs, from the last sweep and the health checks the page holds (if any). */
export function savedRunInputOf(last: SweepRecordInputs, health: readonly HealthInput[] | null, savedAt?: string): SavedRunInput {
  return {
    ...runRecordInputOf(last),
    origin: 'workbench',
    samples: last.samples,
    flips: keptFlipsFrom(last.result.records, (attack, index) => last.flips.get(flipKey(attack, index))),
    ...(health !== null && health.length > 0 ? { health } : {}),
    ...(savedAt !== undefined ? { savedAt } : {}),
  };
}

/** The saved run of the last sweep (run record with hashes, records, health checks, thumbnails). */
export function savedRunOfLastSweep(last: SweepRecordInputs, health: readonly HealthInput[] | null): Promise<SavedRun> {
  return buildSavedRun(savedRunInputOf(last, health));
}
