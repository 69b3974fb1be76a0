/**
 * What the screens can do: every effect (worker calls, fetching the demo) goes through here and
 * ends in a store update. A failed load leaves the rest of the workspace as it was.
 */
import type { AttackId } from '../../core/attacks/types.ts';
import type { NamedBytes } from '../../core/types.ts';
import type { ResizeMode } from '../../core/samples/crop.ts';
import { startEngineWorker } from '../../worker/client.ts';
import type { ModelInfo, SamplesInfo } from '../../worker/protocol.ts';
import { DEMO_PLAN, toSweepConfig } from '../lib/plan.ts';
import { appUrl, fetchDemoModel, fetchDemoSamples } from '../lib/demo.ts';
import { useWorkspace } from './workspace.ts';
import { client, messageOf, setEngine } from './engineHandle.ts';
import { afterSweep } from './analysisActions.ts';
import { preprocessingForModel, workerBusy, runEnded, runFailed, runPointAdded, runProgressed, runStarted, type DemoModelId } from './state.ts';

let controller: AbortController | null = null;
/** Gallery images already asked of the worker, for one run. */
let requested: { runId: number; keys: Set<string> } = { runId: 0, keys: new Set() };

const set = useWorkspace.setState;
const get = useWorkspace.getState;

/** Start the worker and its backend (threads only with cross-origin isolation). */
export async function startEngine(): Promise<void> {
  const engine = startEngineWorker();
  setEngine(engine);
  const threads = window.crossOriginIsolated ? Math.max(1, Math.min(navigator.hardwareConcurrency || 1, 4)) : null;
  try {
    const info = await engine.call('init', { wasmPath: appUrl('wasm/'), threads });
    // The remembered resize mode, before any samples are read.
    await engine.call('setResize', { resize: get().resize });
    set({ engine: { busy: false, value: info, error: null } });
  } catch (err) {
    set({ engine: { busy: false, value: null, error: messageOf(err) } });
    throw err;
  }
}

function applySamples(info: SamplesInfo, label: string, demo: boolean): void {
  set({ samples: { busy: false, value: { ...info, label, demo }, error: null } });
}

/** Load model files (a drop, a picker, a .zip, or the demo). */
export async function loadModel(files: NamedBytes[], source: { key: string; label: string; demo: DemoModelId | null; card: Record<string, unknown> | null }): Promise<boolean> {
  set((s) => ({ model: { ...s.model, busy: true, error: null } }));
  let reply: ModelInfo & { samples: SamplesInfo | null; samplesError: string | null };
  try {
    reply = await client().loadModel(files);
  } catch (err) {
    set((s) => ({ model: { ...s.model, busy: false, error: messageOf(err) } }));
    return false;
  }
  const { samples, samplesError, ...info } = reply;
  const pre = preprocessingForModel(get().preprocessingByModel, source.key, info.suggestedPreprocessing);
  set({ model: { busy: false, value: { ...info, ...source }, error: null }, preprocessing: pre, preview: { busy: false, value: null, error: null } });
  const current = get().samples.value;
  if (samples !== null && current !== null) applySamples(samples, current.label, current.demo);
  if (samplesError !== null) set({ samples: { busy: false, value: null, error: `The samples could not be read for this model: ${samplesError}` } });
  await refreshClean();
  return true;
}

/** Load sample files and an optional class-names file. */
export async function loadSamples(files: NamedBytes[], classNamesFile: NamedBytes | null, label: string, demo = false): Promise<boolean> {
  set((s) => ({ samples: { ...s.samples, busy: true, error: null } }));
  try {
    const info = await client().loadSamples(files, classNamesFile);
    applySamples(info, label, demo);
  } catch (err) {
    set((s) => ({ samples: { ...s.samples, busy: false, error: messageOf(err) } }));
    return false;
  }
  set({ preview: { busy: false, value: null, error: null } });
  await refreshClean();
  return true;
}

/**
 * Change how sample images are brought to the model's size: the worker reads the loaded samples
 * again (the preview and clean accuracy follow). On failure the previous mode stays.
 */
export async function setResizeMode(mode: ResizeMode): Promise<boolean> {
  const previous = get().resize;
  if (mode === previous) return true;
  set((s) => ({ resize: mode, samples: { ...s.samples, busy: true, error: null } }));
  try {
    const info = await client().call('setResize', { resize: mode });
    const current = get().samples.value;
    if (info !== null && current !== null) applySamples(info, current.label, current.demo);
    else set((s) => ({ samples: { ...s.samples, busy: false } }));
  } catch (err) {
    set((s) => ({ resize: previous, samples: { ...s.samples, busy: false, error: messageOf(err) } }));
    return false;
  }
  set({ preview: { busy: false, value: null, error: null } });
  await refreshClean();
  return true;
}

/** Recompute clean accuracy when both model and samples are there and fit together. */
export async function refreshClean(): Promise<void> {
  const s = get();
  if (s.model.value === null || s.samples.value === null || s.samples.value.mismatch !== null) {
    set({ clean: { busy: false, value: null, error: null } });
    return;
  }
  const pre = s.preprocessing;
  set((st) => ({ clean: { ...st.clean, busy: true, error: null } }));
  try {
    const reply = await client().call('clean', { preprocessing: pre });
    if (get().preprocessing === pre) set({ clean: { busy: false, value: reply, error: null } });
  } catch (err) {
    set({ clean: { busy: false, value: null, error: messageOf(err) } });
  }
}

/** Ask the worker for a few samples as the model receives them. */
export async function refreshPreview(count = 6): Promise<void> {
  const s = get();
  if (s.model.value === null || s.samples.value === null || s.samples.value.mismatch !== null) return;
  const pre = s.preprocessing;
  set((st) => ({ preview: { ...st.preview, busy: true, error: null } }));
  try {
    const reply = await client().call('preview', { count, preprocessing: pre });
    if (get().preprocessing === pre) set({ preview: { busy: false, value: reply, error: null } });
  } catch (err) {
    set({ preview: { busy: false, value: null, error: messageOf(err) } });
  }
}

/** Load one of the demo models. */
export async function loadDemoModel(id: DemoModelId): Promise<boolean> {
  try {
    const { files, card, label } = await fetchDemoModel(id);
    return await loadModel(files, { key: `demo:${id}`, label, demo: id, card });
  } catch (err) {
    set((s) => ({ model: { ...s.model, busy: false, error: messageOf(err) } }));
    return false;
  }
}

/** Load the demo samples. */
export async function loadDemoSamples(): Promise<boolean> {
  try {
    const { files, label } = await fetchDemoSamples();
    return await loadSamples(files, null, label, true);
  } catch (err) {
    set((s) => ({ samples: { ...s.samples, busy: false, error: messageOf(err) } }));
    return false;
  }
}

/** The demo workspace: the standard demo model (unless a demo model is loaded) and the demo samples. */
export async function loadDemoWorkspace(model: DemoModelId = 'standard'): Promise<void> {
  if (get().model.value?.demo == null) await loadDemoModel(model);
  if (!(get().samples.value?.demo ?? false)) await loadDemoSamples();
}

/** Start a sweep with the current plan. */
export async function startRun(fromDemo = false): Promise<void> {
  const s = get();
  if (workerBusy(s)) return;
  const classCount = s.model.value?.description.numClasses ?? null;
  const build = toSweepConfig(s.plan, classCount);
  if (!build.ok) {
    set({ run: { ...s.run, status: 'failed', error: build.error } });
    return;
  }
  controller = new AbortController();
  const run = runStarted(s.run, Date.now(), fromDemo, s.samples.value?.classNames ?? []);
  set({ run, gallery: { runId: run.id, size: null, images: {} } });
  try {
    const result = await client().sweep(
      { config: build.config, preprocessing: s.preprocessing },
      {
        signal: controller.signal,
        onProgress: (p) => set((st) => ({ run: runProgressed(st.run, run.id, p, Date.now()) })),
        onPoint: (_point, partial) => set((st) => ({ run: runPointAdded(st.run, run.id, partial, Date.now()) })),
      },
    );
    set((st) => ({ run: runEnded(st.run, run.id, result, Date.now()) }));
    await loadGallery(run.id);
    await afterSweep(run.id, result.complete);
    if (fromDemo && result.complete) set({ screen: 'results' });
  } catch (err) {
    set((st) => ({ run: runFailed(st.run, run.id, messageOf(err), Date.now()) }));
  } finally {
    controller = null;
  }
}

/** Ask the running sweep to stop; it resolves with the points that finished. */
export function cancelRun(): void {
  controller?.abort();
}

/** The demo button: demo workspace, demo plan, run. */
export async function runDemo(): Promise<void> {
  await loadDemoWorkspace(get().model.value?.demo ?? 'standard');
  // The demo plan, keeping the user's choice about the health checks.
  set((s) => ({ plan: { ...DEMO_PLAN, health: s.plan.health }, screen: 'run' }));
  await startRun(true);
}

/** Flipped samples whose images are fetched right after a run, per attack (the rest on demand). */
export const GALLERY_PAGE = 240;

/** After a run: the images of the first page of flipped samples of each attack. */
async function loadGallery(runId: number): Promise<void> {
  const result = get().run.result;
  if (result === null) return;
  const perAttack = new Map<AttackId, { index: number; attack: AttackId }[]>();
  for (const r of result.records) {
    for (const [attack, eps] of Object.entries(r.minFlipEps)) {
      if (typeof eps !== 'number' || eps <= 0) continue;
      const list = perAttack.get(attack as AttackId) ?? [];
      if (list.length < GALLERY_PAGE) list.push({ index: r.index, attack: attack as AttackId });
      perAttack.set(attack as AttackId, list);
    }
  }
  await loadGalleryImages(runId, [...perAttack.values()].flat());
}

/** Fetch original and adversarial pixels of flipped samples not fetched yet (for run `runId`). */
export async function loadGalleryImages(runId: number, items: readonly { index: number; attack: AttackId }[]): Promise<void> {
  if (requested.runId !== runId) requested = { runId, keys: new Set() };
  const keys = requested.keys;
  // Each image is asked for once per run: one the worker does not hold is not asked for again.
  const missing = items.filter((i) => !keys.has(`${i.attack}|${i.index}`));
  if (missing.length === 0 || get().run.status === 'running') return;
  for (const i of missing) keys.add(`${i.attack}|${i.index}`);
  const reply = await client().call('flipImages', { items: missing });
  if (get().run.id !== runId) return;
  set((s) => ({
    gallery: {
      runId,
      size: { height: reply.height, width: reply.width, channels: reply.channels },
      images: { ...(s.gallery.runId === runId ? s.gallery.images : {}), ...Object.fromEntries(reply.images.map((img) => [`${img.attack}|${img.index}`, img])) },
    },
  }));
}

/** Build an export file in the worker and hand it to the browser's download. */
export async function downloadExport(kind: 'curve-csv' | 'samples-csv' | 'run-json' | 'adversarial-zip'): Promise<void> {
  const file = await client().call('exportFile', { kind });
  saveBytes(file.bytes, file.fileName, file.mimeType);
}

/** Save bytes as a download. */
export function saveBytes(bytes: Uint8Array | string, fileName: string, mimeType: string): void {
  const blob = new Blob([typeof bytes === 'string' ? bytes : (bytes.slice() as Uint8Array<ArrayBuffer>)], { type: mimeType });
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
