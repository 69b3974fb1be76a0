/**
 * The one list of Brink's replacement kernels for the tfjs 4.22 wasm backend, and the switch
 * between them and the stock ones (the benchmark runs both side by side).
 */
import * as tf from '@tensorflow/tfjs';
import { conv2DBackpropFilterConfig } from './conv2DBackpropFilter.ts';
import { conv2DBackpropInputConfig } from './conv2DBackpropInput.ts';
import { depthwiseConv2dNativeBackpropFilterConfig } from './depthwiseConv2dNativeBackpropFilter.ts';
import { depthwiseConv2dNativeBackpropInputConfig } from './depthwiseConv2dNativeBackpropInput.ts';
import { maxPoolGradConfig } from './maxPoolGrad.ts';

const WASM = 'wasm';

/**
 * Replacements, each for a kernel the stock wasm backend lacks (DepthwiseConv2dNativeBackpropInput,
 * Conv2DBackpropFilter, DepthwiseConv2dNativeBackpropFilter), gets wrong (MaxPoolGrad) or runs as
 * a slow loop (Conv2DBackpropInput).
 */
export const BRINK_WASM_KERNELS: readonly tf.KernelConfig[] = [
  depthwiseConv2dNativeBackpropInputConfig,
  depthwiseConv2dNativeBackpropFilterConfig,
  conv2DBackpropFilterConfig,
  maxPoolGradConfig,
  conv2DBackpropInputConfig,
];

/** Stock configs displaced by ours (null: the wasm backend had none), by kernel name. */
const displacedStock = new Map<string, tf.KernelConfig | null>();

function isOurs(config: tf.KernelConfig): boolean {
  return tf.getKernel(config.kernelName, WASM)?.kernelFunc === config.kernelFunc;
}

/** Register Brink's replacement wasm kernels (unregistering stock ones first). Idempotent. */
export function registerBrinkWasmKernels(): void {
  for (const config of BRINK_WASM_KERNELS) {
    if (isOurs(config)) continue;
    const current = tf.getKernel(config.kernelName, WASM) ?? null;
    displacedStock.set(config.kernelName, current);
    if (current !== null) tf.unregisterKernel(config.kernelName, WASM);
    tf.registerKernel(config);
  }
}

/** Put the stock wasm kernels back (and drop ours where there was none). Idempotent. */
export function restoreStockWasmKernels(): void {
  for (const config of BRINK_WASM_KERNELS) {
    if (!isOurs(config)) continue;
    tf.unregisterKernel(config.kernelName, WASM);
    const stock = displacedStock.get(config.kernelName) ?? null;
    if (stock === null) continue;
    tf.registerKernel(stock);
    runSetupIfBackendStarted(stock);
  }
}

/** True when every replacement kernel is the one registered for 'wasm'. */
export function brinkWasmKernelsActive(): boolean {
  return BRINK_WASM_KERNELS.every(isOurs);
}

/**
 * A kernel registered after its backend started has not had its setup run (the engine runs
 * setups only when the backend initialises); stock wasm setups just bind the wasm function.
 */
function runSetupIfBackendStarted(config: tf.KernelConfig): void {
  const backend = (tf.engine().registry as Record<string, tf.KernelBackend | undefined>)[WASM];
  if (backend !== undefined && config.setupFunc !== undefined) config.setupFunc(backend);
}
