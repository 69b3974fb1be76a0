/**
 * health.csv and flips.csv on the exports screen: whether each can be written now (and if not, why
 * not, in a few words), and its text. The text always comes from the core's writers, the same ones
 * the command line uses, so the bytes are the CLI's.
 */
import { healthCsv } from '../../core/export/healthCsv.ts';
import { flipsCsv } from '../../core/export/flipsCsv.ts';
import type { HealthCheck } from '../../core/health/types.ts';
import type { FlipRecord } from '../../core/flips/types.ts';
import type { WorkspaceState } from '../store/state.ts';

type HealthSide = Pick<WorkspaceState, 'run' | 'health'>;
type FlipsSide = Pick<WorkspaceState, 'flips'>;

/** The checks of the current sweep, once they have all come in (null otherwise). */
function currentChecks(s: HealthSide): readonly HealthCheck[] | null {
  const { health, run } = s;
  return health.status === 'done' && health.runId === run.id && health.report !== null ? health.report.checks : null;
}

/** The flip records of the last measurement, once it has ended (complete or stopped early). */
function finishedFlipRecords(s: FlipsSide): readonly FlipRecord[] | null {
  return s.flips.status === 'running' ? null : (s.flips.reply?.result.records ?? null);
}

/** Why health.csv cannot be downloaded now, or null when it can. */
export function healthCsvUnavailable(s: HealthSide): string | null {
  if (currentChecks(s) !== null) return null;
  if (s.health.status === 'running' && s.health.runId === s.run.id) return 'the health checks are still running';
  return s.run.result === null ? 'needs a sweep and its health checks' : 'run the health checks first (results screen)';
}

/** health.csv of the current sweep's checks, in the order the checks were reported (throws with the reason when there are none). */
export function healthCsvText(s: HealthSide): string {
  const checks = currentChecks(s);
  if (checks === null) throw new Error(`No health.csv: ${healthCsvUnavailable(s) ?? 'no checks'}.`);
  return healthCsv(checks);
}

/** Why flips.csv cannot be downloaded now, or null when it can. */
export function flipsCsvUnavailable(s: FlipsSide): string | null {
  if (finishedFlipRecords(s) !== null) return null;
  return s.flips.status === 'running' ? 'flip budgets are still being measured' : 'measure flip budgets first (results screen)';
}

/** flips.csv of the last flip-budget measurement, one row per image measured (throws with the reason when there is none). */
export function flipsCsvText(s: FlipsSide): string {
  const records = finishedFlipRecords(s);
  if (records === null) throw new Error(`No flips.csv: ${flipsCsvUnavailable(s) ?? 'no flip budgets'}.`);
  return flipsCsv(records);
}

/** The line beside the flips.csv button: what the file holds, with the number of rows when known. */
export function flipsCsvWhat(s: FlipsSide): string {
  const reply = s.flips.status === 'running' ? null : s.flips.reply;
  const base = 'flips.csv: the smallest flipping budget of each image measured (empty: never flipped up to the largest budget tried)';
  if (reply === null) return base;
  const stopped = reply.result.complete ? '' : ', stopped early';
  return `${base}; ${reply.result.records.length} of ${reply.totalSamples} images${stopped}`;
}
