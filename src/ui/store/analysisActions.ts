/**
 * Actions of the second look at an evaluation: per-class statistics after every sweep, the health
 * checks (on request, or after a complete sweep when the plan asks for them) and flip budgets. The
 * work runs in the worker; each action ends in a store update, and each long one can be cancelled.
 */
import { healthRequest } from '../lib/health.ts';
import { toFlipRequest } from '../lib/flipPlan.ts';
import { useWorkspace } from './workspace.ts';
import { workerBusy } from './state.ts';
import { client, messageOf } from './engineHandle.ts';
import { flipsEnded, flipsFailed, flipsProgressed, flipsStarted, healthEnded, healthStarted, healthStepped, healthStopped } from './analysis.ts';

const set = useWorkspace.setState;
const get = useWorkspace.getState;

let healthController: AbortController | null = null;
let flipsController: AbortController | null = null;

/** After sweep `runId` has resolved: its statistics, then the health checks if the plan asks for them. */
export async function afterSweep(runId: number, complete: boolean): Promise<void> {
  await loadStatistics(runId);
  if (complete && get().plan.health.after) void runHealth();
}

/** Fetch the per-class table, flip matrices and median flip budgets of sweep `runId`. */
export async function loadStatistics(runId: number): Promise<void> {
  try {
    const value = await client().call('statistics', {});
    if (get().run.id === runId) set({ stats: { runId, value, error: null } });
  } catch (err) {
    if (get().run.id === runId) set({ stats: { runId, value: null, error: messageOf(err) } });
  }
}

/** Run the health checks of the last sweep (nothing happens while the worker is busy or before a sweep). */
export async function runHealth(): Promise<void> {
  const s = get();
  if (workerBusy(s) || s.run.result === null || s.run.result.curve.length === 0) return;
  const runId = s.run.id;
  const controller = new AbortController();
  healthController = controller;
  set({ health: healthStarted(runId) });
  try {
    const report = await client().health(healthRequest(s.plan.health), {
      signal: controller.signal,
      onStep: (what) => set((st) => ({ health: healthStepped(st.health, runId, what) })),
    });
    set((st) => ({ health: healthEnded(st.health, runId, report) }));
  } catch (err) {
    set((st) => ({ health: healthStopped(st.health, runId, controller.signal.aborted, messageOf(err)) }));
  } finally {
    if (healthController === controller) healthController = null;
  }
}

/** Ask the running health checks to stop. */
export function cancelHealth(): void {
  healthController?.abort();
}

/** Measure flip budgets with the current form, model, samples and preprocessing. */
export async function runFlips(): Promise<void> {
  const s = get();
  const model = s.model.value;
  const samples = s.samples.value;
  if (workerBusy(s) || model === null || samples === null || samples.mismatch !== null) return;
  const build = toFlipRequest(s.flipSettings, {
    pixelsPerImage: samples.height * samples.width * samples.channels,
    seed: s.plan.seed,
    batchSize: s.plan.batchSize,
    preprocessing: s.preprocessing,
  });
  if (!build.ok) return;
  const controller = new AbortController();
  flipsController = controller;
  const started = flipsStarted(s.flips, `model ${model.label}; images ${samples.label}`);
  set({ flips: started });
  try {
    const reply = await client().flipBudgets(build.request, {
      signal: controller.signal,
      onProgress: (p) => set((st) => ({ flips: flipsProgressed(st.flips, started.id, p) })),
    });
    set((st) => ({ flips: flipsEnded(st.flips, started.id, reply) }));
  } catch (err) {
    set((st) => ({ flips: flipsFailed(st.flips, started.id, messageOf(err)) }));
  } finally {
    if (flipsController === controller) flipsController = null;
  }
}

/** Ask the running flip-budget measurement to stop; it resolves with the images that finished. */
export function cancelFlips(): void {
  flipsController?.abort();
}
