/**
 * The page's side of the engine worker: one typed async method per request, with the events of
 * long requests (sweep, health checks, flip budgets) delivered to callbacks and cancellation by AbortSignal.
 */
import type { CurvePoint, SweepProgress, SweepResult } from '../core/sweep/types.ts';
import type { FlipProgress } from '../core/flips/types.ts';
import type { NamedBytes } from '../core/types.ts';
import { buffersOf, type ArgsOf, type EngineEvent, type EngineResponse, type MethodName, type ReplyOf } from './protocol.ts';

interface Pending {
  resolve(value: unknown): void;
  reject(error: Error): void;
  onEvent?: (event: EngineEvent) => void;
}

/** Callbacks and cancellation of one sweep. */
export interface SweepCallbacks {
  readonly signal?: AbortSignal;
  readonly onProgress?: (progress: SweepProgress) => void;
  readonly onPoint?: (point: CurvePoint, partial: SweepResult) => void;
}

/** Cancellation and step reports of the health checks. */
export interface HealthCallbacks {
  readonly signal?: AbortSignal;
  readonly onStep?: (what: string) => void;
}

/** Cancellation and progress of a flip-budget run. */
export interface FlipCallbacks {
  readonly signal?: AbortSignal;
  readonly onProgress?: (progress: FlipProgress) => void;
}

/** A typed handle on the engine worker. */
export class EngineClient {
  private nextId = 1;
  private readonly pending = new Map<number, Pending>();

  constructor(private readonly worker: Worker) {
    worker.onmessage = (event: MessageEvent<EngineResponse>) => this.receive(event.data);
    worker.onerror = (event) => this.failAll(new Error(`The engine worker stopped: ${event.message || 'unknown error'}`));
  }

  /** Send one request; file and pixel buffers listed in `transfer` move to the worker. */
  call<M extends MethodName>(method: M, args: ArgsOf<M>, transfer: Transferable[] = [], onEvent?: (e: EngineEvent) => void): Promise<ReplyOf<M>> {
    const id = this.nextId++;
    return new Promise<ReplyOf<M>>((resolve, reject) => {
      this.pending.set(id, { resolve: resolve as (v: unknown) => void, reject, ...(onEvent ? { onEvent } : {}) });
      this.worker.postMessage({ id, method, args }, transfer);
    });
  }

  /** Load model files; their bytes are transferred (the caller must not use them afterwards). */
  loadModel(files: NamedBytes[]): Promise<ReplyOf<'loadModel'>> {
    return this.call('loadModel', { files }, buffersOf(files.map((f) => f.bytes)));
  }

  /** Load sample files and an optional class-names file; bytes are transferred. */
  loadSamples(files: NamedBytes[], classNamesFile: NamedBytes | null): Promise<ReplyOf<'loadSamples'>> {
    const all = classNamesFile === null ? files : [...files, classNamesFile];
    return this.call('loadSamples', { files, classNamesFile }, buffersOf(all.map((f) => f.bytes)));
  }

  /** Run a sweep; aborting `signal` asks the worker to stop and resolves with the finished points. */
  sweep(args: ArgsOf<'sweep'>, callbacks: SweepCallbacks = {}): Promise<SweepResult> {
    return this.cancellable('sweep', args, callbacks.signal, (event) => {
      if (event.kind === 'progress') callbacks.onProgress?.(event.progress);
      else if (event.kind === 'point') callbacks.onPoint?.(event.point, event.partial);
    });
  }

  /** Run the health checks of the last sweep; aborting `signal` stops them (the call then rejects). */
  health(args: ArgsOf<'health'>, callbacks: HealthCallbacks = {}): Promise<ReplyOf<'health'>> {
    return this.cancellable('health', args, callbacks.signal, (event) => {
      if (event.kind === 'health-step') callbacks.onStep?.(event.what);
    });
  }

  /** Measure flip budgets; aborting `signal` stops them and resolves with the finished samples. */
  flipBudgets(args: ArgsOf<'flipBudgets'>, callbacks: FlipCallbacks = {}): Promise<ReplyOf<'flipBudgets'>> {
    return this.cancellable('flipBudgets', args, callbacks.signal, (event) => {
      if (event.kind === 'flip-progress') callbacks.onProgress?.(event.progress);
    });
  }

  /** A request that a `cancel` carrying its id stops when `signal` aborts. */
  private cancellable<M extends MethodName>(method: M, args: ArgsOf<M>, signal: AbortSignal | undefined, onEvent: (e: EngineEvent) => void): Promise<ReplyOf<M>> {
    const id = this.nextId; // the id call() below assigns, needed by the cancel request
    const onAbort = (): void => void this.call('cancel', { runId: id });
    signal?.addEventListener('abort', onAbort, { once: true });
    const done = this.call(method, args, [], onEvent);
    return done.finally(() => signal?.removeEventListener('abort', onAbort));
  }

  /** Stop the worker; pending calls fail. */
  terminate(): void {
    this.worker.terminate();
    this.failAll(new Error('The engine worker was stopped.'));
  }

  private receive(message: EngineResponse): void {
    const pending = this.pending.get(message.id);
    if (pending === undefined) return;
    if (message.kind === 'ok') {
      this.pending.delete(message.id);
      pending.resolve(message.value);
    } else if (message.kind === 'error') {
      this.pending.delete(message.id);
      pending.reject(new Error(message.message));
    } else {
      pending.onEvent?.(message);
    }
  }

  private failAll(error: Error): void {
    for (const pending of this.pending.values()) pending.reject(error);
    this.pending.clear();
  }
}

/** Start the engine worker (an ES module worker bundled by Vite). */
export function startEngineWorker(): EngineClient {
  const worker = new Worker(new URL('./engine.worker.ts', import.meta.url), { type: 'module', name: 'brink-engine' });
  return new EngineClient(worker);
}
