/** Test helper: switch tfjs to the named backend in Node, exactly as the CLI starts it. */
import path from 'node:path';
import { initBackend, type BackendInfo } from '../../src/core/backend/initBackend.ts';

export const NODE_WASM_PATH = path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist') + '/';

/** Backends that every backend-sensitive test runs on. */
export const BACKENDS = ['wasm', 'cpu'] as const;

export async function useBackend(name: 'wasm' | 'cpu'): Promise<BackendInfo> {
  const info = await initBackend({ wasmPath: NODE_WASM_PATH, backend: name });
  if (info.name !== name) throw new Error(`wanted the ${name} backend, got ${info.name}`);
  return info;
}
