/**
 * Actions of the review screen: save the run in view as run.brink.json, read saved runs back, the
 * HTML report, the comparison files, and the demo comparison (the same plan on the other demo
 * model). The worker builds the current run's saved form (it holds the files, pixels and kept
 * adversarial points); reading files, the report and the comparison are plain data on this thread.
 */
import type { HealthCheck } from '../../core/health/types.ts';
import type { NamedBytes } from '../../core/types.ts';
import { hashFileSet } from '../../core/export/hash.ts';
import { loadRun } from '../../core/savedRun/loadRun.ts';
import { serializeSavedRun } from '../../core/savedRun/saveRun.ts';
import { DEFAULT_RESIZE } from '../../core/samples/crop.ts';
import { SAVED_RUN_FILE, type SavedRun } from '../../core/savedRun/types.ts';
import { renderReport } from '../../core/report/renderReport.ts';
import { compareRuns, type LabelledRun } from '../../core/compare/compareRuns.ts';
import { compareCsv } from '../../core/compare/compareCsv.ts';
import { comparisonSvg } from '../../core/compare/compareChart.ts';
import { fetchDemoModel } from '../lib/demo.ts';
import { demoModelOf, modelFileName, planFromConfig, uniqueLabel } from '../lib/review.ts';
import { useWorkspace } from './workspace.ts';
import { client, messageOf } from './engineHandle.ts';
import { loadDemoModel, loadDemoSamples, saveBytes, setResizeMode, startRun } from './actions.ts';
import { workerBusy, type DemoModelId, type WorkspaceState } from './state.ts';
import { CURRENT_RUN, comparedIds, comparisonChosen, entryAdded, useReview, type ReviewState } from './review.ts';

const setReview = useReview.setState;
const review = useReview.getState;
const workspace = useWorkspace.getState;

/** Short names of the demo models, for legends and tables. */
export const DEMO_SHORT: Readonly<Record<DemoModelId, string>> = { standard: 'standard training', hardened: 'adversarially trained' };

/** What was loaded when each run started (the model may be replaced after the run). */
const subjects = new Map<number, { label: string; demo: DemoModelId | null }>();
useWorkspace.subscribe((s, prev) => {
  if (s.run.id === prev.run.id || s.run.status !== 'running') return;
  subjects.set(s.run.id, { label: s.model.value?.label ?? 'model', demo: s.model.value?.demo ?? null });
  // A new sweep's results are what the results screen should show next, not a loaded file.
  setReview({ viewing: null });
});

/** True when the last run has finished points and no sweep is running. */
export function hasCurrentRun(s: Pick<WorkspaceState, 'run'>): boolean {
  return s.run.result !== null && s.run.result.curve.length > 0 && s.run.status !== 'running';
}

/** The health checks of the last run, when they finished. */
function healthChecksFor(s: WorkspaceState): readonly HealthCheck[] | null {
  return s.health.status === 'done' && s.health.runId === s.run.id && s.health.report !== null ? s.health.report.checks : null;
}

/** Identifies what the current run's saved form holds: the run, and whether its health checks are in. */
export function currentRunKey(s: WorkspaceState): string {
  return `${s.run.id}|${healthChecksFor(s) === null ? 'plain' : 'health'}`;
}

/** The legend name of the current run. */
export function currentRunLabel(runId: number): string {
  const subject = subjects.get(runId);
  const name = subject === undefined ? 'current run' : subject.demo !== null ? DEMO_SHORT[subject.demo] : subject.label;
  return `${name} (run ${runId} of this session)`;
}

/** The current run as a saved run (built by the worker once per run and health state). */
export async function currentSavedRun(): Promise<SavedRun> {
  const s = workspace();
  if (!hasCurrentRun(s)) throw new Error('There is no finished run in this session yet.');
  const key = currentRunKey(s);
  const cached = review().current;
  if (cached !== null && cached.key === key) return cached.saved;
  const saved = await client().call('savedRun', { health: healthChecksFor(s) });
  if (currentRunKey(workspace()) === key) setReview({ current: { key, saved } });
  return saved;
}

/** The run in view: a loaded entry, or the current run. */
async function savedRunInView(): Promise<{ saved: SavedRun; label: string }> {
  const { viewing, entries } = review();
  const entry = entries.find((e) => e.id === viewing);
  if (entry !== undefined) return { saved: entry.saved, label: entry.label };
  return { saved: await currentSavedRun(), label: currentRunLabel(workspace().run.id) };
}

/** Run a review action with a busy note; a failure is kept in `error`. */
async function task(what: string, work: () => Promise<void>): Promise<void> {
  setReview({ busy: what, error: null });
  try {
    await work();
  } catch (err) {
    setReview({ error: messageOf(err) });
  } finally {
    setReview({ busy: null });
  }
}

/** Download the run in view as run.brink.json. */
export function saveRunInView(): Promise<void> {
  return task('Saving the run…', async () => {
    const { saved } = await savedRunInView();
    saveBytes(serializeSavedRun(saved), SAVED_RUN_FILE, 'application/json');
  });
}

/** Download the self-contained HTML report of the run in view as report.html. */
export function exportReport(): Promise<void> {
  return task('Writing the report…', async () => {
    const { saved } = await savedRunInView();
    // Let the busy note paint before the (synchronous) rendering.
    await new Promise((resolve) => setTimeout(resolve, 0));
    saveBytes(renderReport(saved, { generatedAt: new Date().toISOString() }), 'report.html', 'text/html');
  });
}

let demoHashes: Promise<Partial<Record<DemoModelId, string>>> | null = null;

/** SHA-256 of each demo model's files, as run records compute it (fetched once; empty when unreachable). */
function demoModelHashes(): Promise<Partial<Record<DemoModelId, string>>> {
  demoHashes ??= Promise.all(
    (['standard', 'hardened'] as const).map(async (id) => [id, await hashFileSet((await fetchDemoModel(id)).files)] as const),
  ).then(Object.fromEntries, () => ({}));
  return demoHashes;
}

/** A label for a run read from a file: the demo model's short name, else the model file and hash. */
async function labelFor(saved: SavedRun): Promise<string> {
  const demo = demoModelOf(saved, await demoModelHashes());
  const base = demo !== null ? DEMO_SHORT[demo] : `${modelFileName(saved)} ${saved.run.model.sha256.slice(0, 8)}`;
  const taken = [...review().entries.map((e) => e.label), currentRunLabel(workspace().run.id)];
  return uniqueLabel(`${base} (saved ${saved.savedAt.slice(0, 10)})`, taken);
}

/** Keep a saved run as an entry; returns its id. */
function addEntry(saved: SavedRun, fileName: string, source: 'file' | 'session', label: string): string {
  const { state, id } = entryAdded(review(), { saved, fileName, source, label });
  setReview(state);
  return id;
}

/**
 * Read saved-run files (run.brink.json). Each good one becomes an entry; the last one read is put
 * in view and the results screen opens. A bad file is refused with the reason, naming the file.
 */
export function loadSavedRunFiles(files: readonly NamedBytes[]): Promise<void> {
  return task('Reading the saved run…', async () => {
    const problems: string[] = [];
    let last: string | null = null;
    for (const file of files) {
      let saved: SavedRun;
      try {
        saved = loadRun(file.bytes);
      } catch (err) {
        problems.push(`${file.name}: ${messageOf(err)}`);
        continue;
      }
      last = addEntry(saved, file.name, 'file', await labelFor(saved));
    }
    if (last !== null) {
      setReview({ viewing: last });
      workspace().goTo('results');
    }
    if (problems.length > 0) throw new Error(`Not read as a saved run — ${problems.join(' · ')}`);
  });
}

/** Show a run on the results screen (null: the current run). */
export function viewRun(id: string | null): void {
  setReview({ viewing: id });
}

/** What the comparison needs to know of the current run. */
export interface CurrentRunRef {
  readonly present: boolean;
  readonly key: string;
  readonly runId: number;
}

/** The current run's reference in a workspace state. */
export function currentRunRef(s: WorkspaceState): CurrentRunRef {
  return { present: hasCurrentRun(s), key: currentRunKey(s), runId: s.run.id };
}

/** The compared runs with their labels, baseline first (the current run only once it is built). */
export function comparedRuns(state: ReviewState, ref: CurrentRunRef): LabelledRun[] {
  const current = ref.present && state.current?.key === ref.key ? state.current.saved : null;
  const runs: LabelledRun[] = [];
  for (const id of comparedIds(state, ref.present)) {
    const entry = state.entries.find((e) => e.id === id);
    const found = id === CURRENT_RUN ? (current === null ? null : { label: currentRunLabel(ref.runId), run: current }) : entry === undefined ? null : { label: entry.label, run: entry.saved };
    // compareRuns needs distinct labels; a run kept twice gets a number.
    if (found !== null) runs.push({ ...found, label: uniqueLabel(found.label, runs.map((r) => r.label)) });
  }
  return runs;
}

/** Download the comparison table (comparison.csv) or chart (comparison.svg) of the compared runs. */
export function exportComparison(kind: 'csv' | 'svg'): Promise<void> {
  return task('Writing the comparison…', async () => {
    const runs = comparedRuns(review(), currentRunRef(workspace()));
    if (kind === 'csv') saveBytes(compareCsv(compareRuns(runs)), 'comparison.csv', 'text/csv');
    else saveBytes(comparisonSvg(runs), 'comparison.svg', 'image/svg+xml');
  });
}

/**
 * The demo comparison: the run in view was made with one demo model; load the other one and the
 * demo samples, set the run's own plan, preprocessing and resize mode, run it, and compare the two runs.
 */
export function compareWithOtherDemo(): Promise<void> {
  return task('Preparing the comparison run…', async () => {
    if (workerBusy(workspace())) throw new Error('The engine is busy; wait for the running task to end.');
    const inView = review().viewing;
    const baseline = await savedRunInView();
    const demo = demoModelOf(baseline.saved, await demoModelHashes());
    if (demo === null) throw new Error('The run in view was not made with a demo model, so there is no other demo model to compare it with.');
    // A session run is kept as an entry first: the comparison run replaces it as the current run.
    const baselineId = inView ?? addEntry(baseline.saved, `this session, run ${workspace().run.id}`, 'session', baseline.label);
    const other: DemoModelId = demo === 'standard' ? 'hardened' : 'standard';
    setReview({ busy: `Loading the ${DEMO_SHORT[other]} demo model…` });
    if (!(await loadDemoModel(other))) throw new Error(workspace().model.error ?? 'The other demo model did not load.');
    if (!(workspace().samples.value?.demo ?? false) && !(await loadDemoSamples())) throw new Error(workspace().samples.error ?? 'The demo samples did not load.');
    const { setPreprocessing, updatePlan, goTo, plan } = workspace();
    setPreprocessing(baseline.saved.run.preprocessing);
    if (!(await setResizeMode(baseline.saved.run.samples.resize ?? DEFAULT_RESIZE))) throw new Error(workspace().samples.error ?? 'The samples could not be read with the run\'s resize mode.');
    updatePlan(planFromConfig(baseline.saved.run.config, plan.health));
    setReview({ viewing: null, busy: `Running the same plan on the ${DEMO_SHORT[other]} demo model…` });
    goTo('run');
    await startRun(false);
    const after = workspace();
    if (after.run.status !== 'done') throw new Error(after.run.error ?? 'The comparison run did not finish, so there is nothing to compare.');
    await currentSavedRun();
    const all = [...review().entries.map((e) => e.id), CURRENT_RUN];
    setReview(comparisonChosen(review(), [baselineId, CURRENT_RUN], all));
    goTo('review');
  });
}
