/**
 * The workspace's state shape and the pure transitions of a run. Kept free of React and of the
 * worker so it can be tested in Node; derived values belong in selectors, not in the state.
 */
import type { CurvePoint, SweepProgress, SweepResult } from '../../core/sweep/types.ts';
import type { Preprocessing } from '../../core/types.ts';
import { DEFAULT_PREPROCESSING } from '../../core/types.ts';
import { DEFAULT_RESIZE, type ResizeMode } from '../../core/samples/crop.ts';
import type { CleanReply, EngineInfo, FlipImage, ModelInfo, PreviewReply, SamplesInfo } from '../../worker/protocol.ts';
import { DEMO_PLAN, type PlanSettings } from '../lib/plan.ts';
import { DEFAULT_FLIP_SETTINGS, type FlipSettings } from '../lib/flipPlan.ts';
import { EMPTY_STATS, IDLE_FLIPS, IDLE_HEALTH, type FlipsState, type HealthState, type StatsState } from './analysis.ts';

export const SCREENS = ['model', 'samples', 'preprocessing', 'plan', 'run', 'results', 'exports', 'review'] as const;
export type ScreenId = (typeof SCREENS)[number];

export type DemoModelId = 'standard' | 'hardened';

/** A slot that loads asynchronously and may fail without losing what it held before. */
export interface Slot<T> {
  readonly busy: boolean;
  readonly value: T | null;
  readonly error: string | null;
}

export function emptySlot<T>(): Slot<T> {
  return { busy: false, value: null, error: null };
}

export interface LoadedModelState extends ModelInfo {
  /** Identifies the model for remembered preprocessing: the demo id or the file names. */
  readonly key: string;
  readonly label: string;
  readonly demo: DemoModelId | null;
  /** The demo model's card (plain data from card.json), when it is a demo model. */
  readonly card: Readonly<Record<string, unknown>> | null;
}

export interface LoadedSamplesState extends SamplesInfo {
  readonly label: string;
  readonly demo: boolean;
}

export type RunStatus = 'idle' | 'running' | 'done' | 'cancelled' | 'failed';

export interface RunState {
  readonly status: RunStatus;
  /** Increases with every run; events of an older run are ignored. */
  readonly id: number;
  readonly progress: SweepProgress | null;
  /** Wall-clock start (Date.now()) of the running or last run. */
  readonly startedAt: number | null;
  readonly elapsedMs: number;
  /** The partial result while running, the final one afterwards. */
  readonly result: SweepResult | null;
  readonly error: string | null;
  readonly fromDemo: boolean;
  /** Class names at the time of the run (for labels in the gallery). */
  readonly classNames: readonly string[];
}

export interface GalleryState {
  readonly runId: number;
  readonly size: { readonly height: number; readonly width: number; readonly channels: number } | null;
  /** Keyed by `${attack}|${index}`. */
  readonly images: Readonly<Record<string, FlipImage>>;
}

export interface WorkspaceState {
  readonly screen: ScreenId;
  readonly engine: Slot<EngineInfo>;
  readonly model: Slot<LoadedModelState>;
  readonly samples: Slot<LoadedSamplesState>;
  readonly preprocessing: Preprocessing;
  readonly clean: Slot<CleanReply>;
  readonly preview: Slot<PreviewReply>;
  readonly run: RunState;
  readonly gallery: GalleryState;
  /** Health checks, per-class statistics (of the last sweep) and flip budgets. */
  readonly health: HealthState;
  readonly stats: StatsState;
  readonly flips: FlipsState;
  /** Persisted: the plan, the flip-budget form, the preprocessing chosen per model and the resize mode. */
  readonly plan: PlanSettings;
  readonly flipSettings: FlipSettings;
  readonly preprocessingByModel: Readonly<Record<string, Preprocessing>>;
  /** Persisted: how sample images are brought to the model's size. */
  readonly resize: ResizeMode;
}

export const IDLE_RUN: RunState = {
  status: 'idle',
  id: 0,
  progress: null,
  startedAt: null,
  elapsedMs: 0,
  result: null,
  error: null,
  fromDemo: false,
  classNames: [],
};

export function initialState(): WorkspaceState {
  return {
    screen: 'model',
    engine: { busy: true, value: null, error: null },
    model: emptySlot(),
    samples: emptySlot(),
    preprocessing: DEFAULT_PREPROCESSING,
    clean: emptySlot(),
    preview: emptySlot(),
    run: IDLE_RUN,
    gallery: { runId: 0, size: null, images: {} },
    health: IDLE_HEALTH,
    stats: EMPTY_STATS,
    flips: IDLE_FLIPS,
    plan: DEMO_PLAN,
    flipSettings: DEFAULT_FLIP_SETTINGS,
    preprocessingByModel: {},
    resize: DEFAULT_RESIZE,
  };
}

/** A new run begins: earlier results are cleared. */
export function runStarted(run: RunState, at: number, fromDemo: boolean, classNames: readonly string[]): RunState {
  return { ...IDLE_RUN, status: 'running', id: run.id + 1, startedAt: at, fromDemo, classNames };
}

/** A progress report of run `id` (ignored when another run has started since). */
export function runProgressed(run: RunState, id: number, progress: SweepProgress, at: number): RunState {
  if (run.id !== id || run.status !== 'running') return run;
  return { ...run, progress, elapsedMs: at - (run.startedAt ?? at) };
}

/** A finished curve point of run `id`, with the result so far. */
export function runPointAdded(run: RunState, id: number, partial: SweepResult, at: number): RunState {
  if (run.id !== id || run.status !== 'running') return run;
  return { ...run, result: partial, elapsedMs: at - (run.startedAt ?? at) };
}

/** Run `id` resolved: complete, or cancelled with the points that finished. */
export function runEnded(run: RunState, id: number, result: SweepResult, at: number): RunState {
  if (run.id !== id) return run;
  return { ...run, status: result.complete ? 'done' : 'cancelled', result, elapsedMs: at - (run.startedAt ?? at) };
}

/** Run `id` failed; the points that finished before stay visible. */
export function runFailed(run: RunState, id: number, message: string, at: number): RunState {
  if (run.id !== id) return run;
  return { ...run, status: 'failed', error: message, elapsedMs: at - (run.startedAt ?? at) };
}

/** True while the worker is busy with a sweep, health checks or flip budgets (one thing at a time). */
export function workerBusy(s: Pick<WorkspaceState, 'run' | 'health' | 'flips'>): boolean {
  return s.run.status === 'running' || s.health.status === 'running' || s.flips.status === 'running';
}

/** The points to draw: the run's result, else nothing. */
export function curvePoints(run: RunState): readonly CurvePoint[] {
  return run.result?.curve ?? [];
}

/** The preprocessing to use for a model: the one chosen for it before, else the core's suggestion. */
export function preprocessingForModel(remembered: Readonly<Record<string, Preprocessing>>, key: string, suggested: Preprocessing): Preprocessing {
  return remembered[key] ?? suggested;
}
