/**
 * State of the second look at an evaluation (health checks, per-class statistics, flip budgets)
 * and its pure transitions. Each task carries the id it was started with, so events of an older
 * task, or of checks that belong to an earlier sweep, are ignored.
 */
import type { HealthReport } from '../../core/health/runHealthChecks.ts';
import type { FlipProgress } from '../../core/flips/types.ts';
import type { SweepStatistics } from '../../core/stats/perClass.ts';
import type { FlipsReply } from '../../worker/protocol.ts';

export type TaskStatus = 'idle' | 'running' | 'done' | 'cancelled' | 'failed';

export interface HealthState {
  readonly status: TaskStatus;
  /** The sweep (RunState.id) these checks judge. */
  readonly runId: number;
  /** The extra searches finished so far, in words. */
  readonly steps: readonly string[];
  readonly report: HealthReport | null;
  readonly error: string | null;
}

export interface FlipsState {
  readonly status: TaskStatus;
  /** Increases with every flip-budget run. */
  readonly id: number;
  readonly progress: FlipProgress | null;
  readonly reply: FlipsReply | null;
  readonly error: string | null;
  /** The model and samples measured, in words (they may be replaced afterwards). */
  readonly subject: string;
}

export interface StatsState {
  /** The sweep the statistics describe. */
  readonly runId: number;
  readonly value: SweepStatistics | null;
  readonly error: string | null;
}

export const IDLE_HEALTH: HealthState = { status: 'idle', runId: 0, steps: [], report: null, error: null };
export const IDLE_FLIPS: FlipsState = { status: 'idle', id: 0, progress: null, reply: null, error: null, subject: '' };
export const EMPTY_STATS: StatsState = { runId: 0, value: null, error: null };

/** Checks of sweep `runId` begin. */
export function healthStarted(runId: number): HealthState {
  return { ...IDLE_HEALTH, status: 'running', runId };
}

/** One more extra search of the running checks of sweep `runId` has finished. */
export function healthStepped(health: HealthState, runId: number, what: string): HealthState {
  if (health.runId !== runId || health.status !== 'running') return health;
  return { ...health, steps: [...health.steps, what] };
}

/** The checks of sweep `runId` are in. */
export function healthEnded(health: HealthState, runId: number, report: HealthReport): HealthState {
  if (health.runId !== runId || health.status !== 'running') return health;
  return { ...health, status: 'done', report, error: null };
}

/** The checks of sweep `runId` stopped: cancelled on request, or failed with a message. */
export function healthStopped(health: HealthState, runId: number, cancelled: boolean, message: string): HealthState {
  if (health.runId !== runId || health.status !== 'running') return health;
  return { ...health, status: cancelled ? 'cancelled' : 'failed', error: cancelled ? null : message };
}

/** A new flip-budget run begins; the previous reply is cleared. */
export function flipsStarted(flips: FlipsState, subject: string): FlipsState {
  return { ...IDLE_FLIPS, status: 'running', id: flips.id + 1, subject };
}

/** Progress of flip-budget run `id`. */
export function flipsProgressed(flips: FlipsState, id: number, progress: FlipProgress): FlipsState {
  if (flips.id !== id || flips.status !== 'running') return flips;
  return { ...flips, progress };
}

/** Flip-budget run `id` resolved: complete, or cancelled with the samples that finished. */
export function flipsEnded(flips: FlipsState, id: number, reply: FlipsReply): FlipsState {
  if (flips.id !== id) return flips;
  return { ...flips, status: reply.result.complete ? 'done' : 'cancelled', reply, error: null };
}

/** Flip-budget run `id` failed. */
export function flipsFailed(flips: FlipsState, id: number, message: string): FlipsState {
  if (flips.id !== id) return flips;
  return { ...flips, status: 'failed', error: message };
}
