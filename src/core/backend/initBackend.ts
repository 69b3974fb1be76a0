/**
 * Starts the tfjs WASM backend (or, only when it cannot start, the cpu backend) and reports
 * which flavour loaded so the UI and the CLI can show it.
 */
import * as tf from '@tensorflow/tfjs';
import { setWasmPaths, setThreadsCount } from '@tensorflow/tfjs-backend-wasm';
import { registerBrinkWasmKernels } from './kernels/registerKernels.ts';

export interface BackendInfo {
  readonly name: 'wasm' | 'cpu';
  readonly simd: boolean;
  readonly threads: boolean;
  readonly threadCount: number;
  /** Set when Brink had to fall back, in words for the user. */
  readonly notice: string | null;
}

export interface BackendOptions {
  /** Folder (URL or file path) holding the tfjs-backend-wasm *.wasm files; a trailing slash is added. */
  readonly wasmPath: string;
  /** Force a backend (tests compare both). Default: wasm with a cpu fallback. */
  readonly backend?: 'wasm' | 'cpu';
  /** Worker threads for the threaded build (ignored without cross-origin isolation). */
  readonly threads?: number;
}

let wasmPathSet: string | null = null;

/**
 * Start (or switch to) the requested backend; idempotent. On wasm, Brink's replacement gradient
 * kernels (kernels/registerKernels.ts) are registered as well.
 */
export async function initBackend(options: BackendOptions): Promise<BackendInfo> {
  const wanted = options.backend ?? 'wasm';
  if (wanted === 'wasm') {
    const path = options.wasmPath.endsWith('/') ? options.wasmPath : `${options.wasmPath}/`;
    if (wasmPathSet === null) {
      setWasmPaths(path);
      wasmPathSet = path;
    }
    if (options.threads !== undefined) setThreadsCount(options.threads);
    let started = false;
    let failure = '';
    try {
      started = await tf.setBackend('wasm');
    } catch (err) {
      failure = err instanceof Error ? err.message : String(err);
    }
    if (started) {
      await tf.ready();
      registerBrinkWasmKernels();
      return describeCurrentBackend(null);
    }
    await tf.setBackend('cpu');
    await tf.ready();
    return describeCurrentBackend(
      `The WebAssembly backend could not start${failure ? ` (${failure})` : ''}; running on the much slower plain JavaScript backend.`,
    );
  }
  await tf.setBackend('cpu');
  await tf.ready();
  return describeCurrentBackend(null);
}

function describeCurrentBackend(notice: string | null): BackendInfo {
  const name = tf.getBackend() === 'wasm' ? 'wasm' : 'cpu';
  if (name === 'cpu') return { name, simd: false, threads: false, threadCount: 1, notice };
  const simd = tf.env().getBool('WASM_HAS_SIMD_SUPPORT');
  const threads = tf.env().getBool('WASM_HAS_MULTITHREAD_SUPPORT');
  return { name, simd, threads, threadCount: threads ? navigatorThreads() : 1, notice };
}

function navigatorThreads(): number {
  const g = globalThis as { navigator?: { hardwareConcurrency?: number } };
  return g.navigator?.hardwareConcurrency ?? 1;
}

/** A one-line description such as "WebAssembly (SIMD, 1 thread)". */
export function formatBackend(info: BackendInfo): string {
  if (info.name === 'cpu') return 'plain JavaScript (cpu)';
  const parts = [info.simd ? 'SIMD' : 'no SIMD', `${info.threadCount} thread${info.threadCount === 1 ? '' : 's'}`];
  return `WebAssembly (${parts.join(', ')})`;
}
