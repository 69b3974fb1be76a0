/**
 * Vite configuration of the workbench. Two things matter beyond the React plugin:
 * - the tfjs WASM binaries are served under /wasm/ in development and copied into the build, so
 *   initBackend can point setWasmPaths at one folder on every host;
 * - the dev and preview servers send the cross-origin isolation headers (COOP same-origin, COEP
 *   require-corp) without which browsers withhold SharedArrayBuffer and the threaded SIMD build.
 */
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { defineConfig, type Plugin } from 'vite';
import react from '@vitejs/plugin-react';

const WASM_SOURCE = path.resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist');
/** Folder (below the app's base URL) that holds the .wasm files; the app asks initBackend for it. */
const WASM_FOLDER = 'wasm';

/** Headers a static host must send for the threaded build; the README lists them too. */
export const ISOLATION_HEADERS = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
} as const;

function wasmFileNames(): string[] {
  return readdirSync(WASM_SOURCE).filter((name) => name.endsWith('.wasm'));
}

/** Serves node_modules' tfjs-backend-wasm binaries under /wasm/ in dev and emits them into the build. */
function tfjsWasmAssets(): Plugin {
  const names = wasmFileNames();
  return {
    name: 'brink-tfjs-wasm-assets',
    configureServer(server) {
      server.middlewares.use((req, res, next) => {
        const url = (req.url ?? '').split('?')[0] ?? '';
        const prefix = `${server.config.base}${WASM_FOLDER}/`;
        const name = url.startsWith(prefix) ? url.slice(prefix.length) : '';
        if (!names.includes(name)) return next();
        res.setHeader('Content-Type', 'application/wasm');
        res.setHeader('Cache-Control', 'no-cache');
        res.end(readFileSync(path.join(WASM_SOURCE, name)));
      });
    },
    generateBundle() {
      for (const name of names) {
        this.emitFile({ type: 'asset', fileName: `${WASM_FOLDER}/${name}`, source: readFileSync(path.join(WASM_SOURCE, name)) });
      }
    },
  };
}

/**
 * The threaded WASM build starts its helper threads from the source text of its own factory
 * function (Function.prototype.toString), so that function must survive bundling verbatim: renamed
 * identifiers, or a compressor dropping its `typeof _scriptDir` guard, break the helper threads.
 * The worker bundle is therefore not minified.
 */
function keepWorkerNames(): Plugin {
  return {
    name: 'brink-worker-keep-names',
    outputOptions(options) {
      return { ...options, minify: false };
    },
  };
}

export default defineConfig({
  base: './',
  plugins: [react(), tfjsWasmAssets()],
  server: { headers: ISOLATION_HEADERS },
  preview: { headers: ISOLATION_HEADERS },
  worker: { format: 'es', plugins: () => [keepWorkerNames()] },
  build: {
    target: 'es2022',
    // tfjs and Plotly are large by nature; they load once and are cached.
    chunkSizeWarningLimit: 6000,
  },
});
