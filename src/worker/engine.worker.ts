/**
 * Entry point of the engine worker: receives typed requests, runs them on the Engine one at a
 * time (except `cancel`, which must get through while a long request runs) and posts typed responses.
 */
import { Engine } from './engine.ts';
import { exportFile } from './exports.ts';
import { flipBudgetsOf, healthOfLastSweep, statisticsOfLastSweep } from './analysis.ts';
import { savedRunOfLastSweep } from './review.ts';
import { buffersOf, type ArgsOf, type EngineRequest, type EngineResponse, type MethodName, type ReplyOf } from './protocol.ts';

/** The parts of the dedicated worker scope this file uses (the project's lib is DOM, not WebWorker). */
interface WorkerScope {
  onmessage: ((event: MessageEvent<EngineRequest>) => void) | null;
  postMessage(message: EngineResponse, transfer: Transferable[]): void;
}

const scope = self as unknown as WorkerScope;
const engine = new Engine();
const runs = new Map<number, AbortController>();
/** Requests run in order; a sweep holds the queue, `cancel` skips it. */
let queue: Promise<void> = Promise.resolve();

/** Run a cancellable request: its AbortSignal is registered under the request id until it settles. */
async function cancellable<T>(id: number, work: (signal: AbortSignal) => Promise<T>): Promise<T> {
  const controller = new AbortController();
  runs.set(id, controller);
  try {
    return await work(controller.signal);
  } finally {
    runs.delete(id);
  }
}

type Handler<M extends MethodName> = (args: ArgsOf<M>, id: number) => Promise<ReplyOf<M>> | ReplyOf<M>;

const handlers: { [M in MethodName]: Handler<M> } = {
  init: (a) => engine.init(a.wasmPath, a.threads),
  loadModel: (a) => engine.loadModel(a.files),
  loadSamples: (a) => engine.loadSamples(a.files, a.classNamesFile),
  setResize: (a) => engine.setResize(a.resize),
  preview: (a) => engine.preview(a.count, a.preprocessing),
  clean: (a) => engine.clean(a.preprocessing),
  sweep: (a, id) =>
    cancellable(id, (signal) =>
      engine.sweep(a.config, a.preprocessing, {
        signal,
        onProgress: (progress) => post({ id, kind: 'progress', progress }),
        onPoint: (point, partial) => post({ id, kind: 'point', point, partial }),
      }),
    ),
  cancel: (a) => {
    const run = runs.get(a.runId);
    run?.abort(new DOMException('Cancelled on request.', 'AbortError'));
    return run !== undefined;
  },
  flipImages: (a) => engine.flipImages(a.items),
  exportFile: (a) => exportFile(a.kind, engine.lastSweep()),
  statistics: () => statisticsOfLastSweep(engine),
  health: (a, id) => cancellable(id, (signal) => healthOfLastSweep(engine, a, { signal, onStep: (what) => post({ id, kind: 'health-step', what }) })),
  flipBudgets: (a, id) => cancellable(id, (signal) => flipBudgetsOf(engine, a, { signal, onProgress: (progress) => post({ id, kind: 'flip-progress', progress }) })),
  savedRun: (a) => savedRunOfLastSweep(engine.lastSweep(), a.health),
};

function post(message: EngineResponse, transfer: Transferable[] = []): void {
  scope.postMessage(message, transfer);
}

/** Buffers of a reply that are worth moving rather than copying (pixels, file bytes). */
function transferablesOf(value: unknown): Transferable[] {
  const views: ArrayBufferView[] = [];
  const visit = (v: unknown, depth: number): void => {
    if (depth > 4 || v === null || typeof v !== 'object') return;
    if (ArrayBuffer.isView(v)) views.push(v);
    else if (Array.isArray(v)) v.forEach((item) => visit(item, depth + 1));
    else Object.values(v).forEach((item) => visit(item, depth + 1));
  };
  visit(value, 0);
  return buffersOf(views);
}

async function handle(request: EngineRequest): Promise<void> {
  try {
    const handler = handlers[request.method] as Handler<MethodName>;
    const value = await handler(request.args, request.id);
    post({ id: request.id, kind: 'ok', value }, transferablesOf(value));
  } catch (err) {
    post({ id: request.id, kind: 'error', message: err instanceof Error ? err.message : String(err) });
  }
}

scope.onmessage = (event) => {
  const request = event.data;
  if (request.method === 'cancel') {
    void handle(request);
    return;
  }
  queue = queue.then(() => handle(request));
};
