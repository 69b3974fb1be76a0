/**
 * The workspace store (zustand). The plan, the flip-budget settings, the preprocessing chosen
 * per model and the resize mode persist in localStorage; loaded data, results and images do not (they live in the worker and in memory).
 */
import { create } from 'zustand';
import { createJSONStorage, persist } from 'zustand/middleware';
import type { Preprocessing } from '../../core/types.ts';
import { DEFAULT_RESIZE, isResizeMode } from '../../core/samples/crop.ts';
import type { PlanSettings } from '../lib/plan.ts';
import { DEMO_PLAN } from '../lib/plan.ts';
import { healthSettingsFrom } from '../lib/health.ts';
import { flipSettingsFrom, type FlipSettings } from '../lib/flipPlan.ts';
import { initialState, type ScreenId, type WorkspaceState } from './state.ts';

/** The store's plain setters; effects (worker calls) live in actions.ts. */
export interface WorkspaceSetters {
  goTo(screen: ScreenId): void;
  updatePlan(change: Partial<PlanSettings>): void;
  setPreprocessing(pre: Preprocessing): void;
  updateFlipSettings(change: Partial<FlipSettings>): void;
}

export type Workspace = WorkspaceState & WorkspaceSetters;

/** Key of the persisted settings in localStorage. */
export const STORAGE_KEY = 'brink.workspace';

type Persisted = Pick<WorkspaceState, 'plan' | 'preprocessingByModel' | 'flipSettings' | 'resize'>;

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Persisted settings read back, completed with defaults for fields an older version did not write. */
export function mergePersisted(persisted: unknown, current: Workspace): Workspace {
  if (persisted === null || typeof persisted !== 'object') return current;
  const p = persisted as Partial<Persisted>;
  return {
    ...current,
    plan: { ...DEMO_PLAN, ...(p.plan ?? {}), options: isRecord(p.plan?.options) ? p.plan.options : {}, health: healthSettingsFrom(p.plan?.health) },
    preprocessingByModel: { ...(p.preprocessingByModel ?? {}) },
    flipSettings: flipSettingsFrom(p.flipSettings),
    resize: isResizeMode(p.resize) ? p.resize : DEFAULT_RESIZE,
  };
}

export const useWorkspace = create<Workspace>()(
  persist(
    (set) => ({
      ...initialState(),
      goTo: (screen) => set({ screen }),
      updatePlan: (change) => set((s) => ({ plan: { ...s.plan, ...change } })),
      updateFlipSettings: (change) => set((s) => ({ flipSettings: { ...s.flipSettings, ...change } })),
      setPreprocessing: (pre) =>
        set((s) => {
          const key = s.model.value?.key;
          return {
            preprocessing: pre,
            ...(key === undefined ? {} : { preprocessingByModel: { ...s.preprocessingByModel, [key]: pre } }),
          };
        }),
    }),
    {
      name: STORAGE_KEY,
      version: 2,
      storage: createJSONStorage(() => localStorage),
      partialize: (s): Persisted => ({ plan: s.plan, preprocessingByModel: s.preprocessingByModel, flipSettings: s.flipSettings, resize: s.resize }),
      merge: mergePersisted,
    },
  ),
);
