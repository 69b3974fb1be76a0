/** Node-side setup shared by CLI commands: where the WASM binaries live, and starting the backend. */
import { createRequire } from 'node:module';
import path from 'node:path';
import { initBackend, type BackendInfo } from '../core/backend/initBackend.ts';

/** Folder of the tfjs-backend-wasm binaries inside node_modules, with a trailing slash. */
export function nodeWasmPath(): string {
  const require = createRequire(import.meta.url);
  const pkg = require.resolve('@tensorflow/tfjs-backend-wasm/package.json');
  return path.join(path.dirname(pkg), 'dist') + path.sep;
}

/** Start the WASM backend in Node (cpu only when WASM cannot start, with a notice on stderr). */
export async function startNodeBackend(): Promise<BackendInfo> {
  const info = await initBackend({ wasmPath: nodeWasmPath() });
  if (info.notice) process.stderr.write(`brink: ${info.notice}\n`);
  return info;
}
