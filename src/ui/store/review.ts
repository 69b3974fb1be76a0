/**
 * State of the review screen (not persisted): saved runs read from files or kept from this
 * session, which run is in view, which runs the comparison takes, and the current run's saved form
 * once the worker has built it. Pure transitions beside the store, so they are tested in Node.
 */
import { create } from 'zustand';
import type { SavedRun } from '../../core/savedRun/types.ts';

/** The id that stands for this session's current (last) run in `viewing`, `excluded` and `baseline`. */
export const CURRENT_RUN = 'current';

export interface ReviewEntry {
  readonly id: string;
  /** Name in the chart legend, the table and the warnings (unique among the runs). */
  readonly label: string;
  /** The file it was read from, or a description of the session run it was kept from. */
  readonly fileName: string;
  readonly source: 'file' | 'session';
  readonly saved: SavedRun;
}

export interface ReviewState {
  readonly entries: readonly ReviewEntry[];
  /** The entry shown on the results screen and used by save/report; null: the current run. */
  readonly viewing: string | null;
  /** Runs left out of the comparison (every run is in it unless unticked). */
  readonly excluded: readonly string[];
  /** The run the others are compared with; null or left out: the first run in the list. */
  readonly baseline: string | null;
  /** The current run as a saved run, for the state it was built in (see currentRunKey). */
  readonly current: { readonly key: string; readonly saved: SavedRun } | null;
  /** A review action in progress, in words, and the last problem. */
  readonly busy: string | null;
  readonly error: string | null;
  /** Increases with every entry added (for ids). */
  readonly added: number;
}

export const INITIAL_REVIEW: ReviewState = { entries: [], viewing: null, excluded: [], baseline: null, current: null, busy: null, error: null, added: 0 };

/** The store. */
export const useReview = create<ReviewState>()(() => INITIAL_REVIEW);

/** Add a saved run (it joins the comparison); returns the new state and the entry's id. */
export function entryAdded(state: ReviewState, entry: Omit<ReviewEntry, 'id'>): { state: ReviewState; id: string } {
  const id = `run-${state.added + 1}`;
  return { id, state: { ...state, entries: [...state.entries, { ...entry, id }], added: state.added + 1 } };
}

/** Drop an entry; if it was in view, the current run is shown again. */
export function entryRemoved(state: ReviewState, id: string): ReviewState {
  return {
    ...state,
    entries: state.entries.filter((e) => e.id !== id),
    viewing: state.viewing === id ? null : state.viewing,
    excluded: state.excluded.filter((x) => x !== id),
    baseline: state.baseline === id ? null : state.baseline,
  };
}

/** Tick or untick a run for the comparison. */
export function inclusionToggled(state: ReviewState, id: string): ReviewState {
  const excluded = state.excluded.includes(id) ? state.excluded.filter((x) => x !== id) : [...state.excluded, id];
  return { ...state, excluded };
}

/** Compare exactly these runs, the first one as the baseline. */
export function comparisonChosen(state: ReviewState, ids: readonly string[], all: readonly string[]): ReviewState {
  return { ...state, excluded: all.filter((id) => !ids.includes(id)), baseline: ids[0] ?? null };
}

/**
 * The ids of the compared runs in order, the baseline first: entries in the order they were added,
 * then the current run (when there is one), minus the unticked ones.
 */
export function comparedIds(state: Pick<ReviewState, 'entries' | 'excluded' | 'baseline'>, hasCurrent: boolean): string[] {
  const all = [...state.entries.map((e) => e.id), ...(hasCurrent ? [CURRENT_RUN] : [])];
  const ticked = all.filter((id) => !state.excluded.includes(id));
  const baseline = state.baseline !== null && ticked.includes(state.baseline) ? state.baseline : ticked[0];
  return baseline === undefined ? [] : [baseline, ...ticked.filter((id) => id !== baseline)];
}
