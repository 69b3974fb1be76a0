/**
 * Issue 5, test 3: deliberately gradient-masked versions of the MNIST CNN fixture raise the warnings
 * that belong to their kind of masking, and the CNN itself raises none.
 *
 * The masks follow Athalye, Carlini & Wagner, "Obfuscated Gradients Give a False Sense of Security"
 * (ICML 2018): a softmax output whose logits are scaled until float32 probabilities are exact ones
 * and zeros (vanishing gradients), and an 8-bit input quantisation round(255·x)/255 whose gradient is
 * zero everywhere (shattered gradients).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as tf from '@tensorflow/tfjs';
import { readFileSync } from 'node:fs';
import { useBackend } from '../helpers/backend.ts';
import { mnistDigits } from '../helpers/mnist.ts';
import { loadModelFromFiles } from '../../src/core/models/loadModel.ts';
import { makeLogitsFn, preprocessingFor } from '../../src/core/models/pipeline.ts';
import { runSweep } from '../../src/core/sweep/runSweep.ts';
import { runHealthChecks, type HealthReport } from '../../src/core/health/runHealthChecks.ts';
import { healthCsv } from '../../src/core/export/healthCsv.ts';
import type { HealthCheckId } from '../../src/core/health/types.ts';
import type { LoadedModel, LogitsFn, OutputKind, SampleSet } from '../../src/core/types.ts';
import type { SweepConfig } from '../../src/core/sweep/types.ts';

const FIXTURE = 'test/fixtures/mnist-cnn';

/** `perClass` held-out digits per class (indices from 760 on are not in the fixture's training set, see its card.json). */
function digits(perClass: number): SampleSet {
  const d = mnistDigits(perClass, 760);
  return {
    files: Array.from(d.labels, (y, i) => `${y}/${i}.png`),
    labels: d.labels,
    classNames: Array.from({ length: 10 }, (_, k) => String(k)),
    height: 28,
    width: 28,
    channels: 1,
    pixels: d.pixels,
  };
}

/** The sweep the checks judge: FGSM and PGD with `steps` steps of the margin loss. */
const config = (steps: number): SweepConfig => ({
  attacks: [
    { id: 'fgsm', options: {} },
    // The margin loss: where float32 softmax probabilities round to 1 (clean logit margins above ~17
    // on this CNN) cross-entropy loses the true-class term of its gradient; measured here, PGD and
    // APGD with cross-entropy leave 5 of 100 digits robust at ε = 0.2 that the margin loss and Square flip.
    { id: 'pgd', options: { steps, loss: 'margin' } },
  ],
  norm: 'linf',
  eps: [0, 0.1, 0.2],
  seed: 5,
  batchSize: 100,
});

async function health(steps: number, logits: LogitsFn, samples: SampleSet, outputKind: OutputKind, rawOutputs?: LogitsFn): Promise<HealthReport> {
  const sweep = await runSweep({ logits, samples, config: config(steps) });
  const started = performance.now();
  const report = await runHealthChecks({ logits, samples, sweep, outputKind, squareOptions: { queries: 300 }, ...(rawOutputs ? { rawOutputs } : {}) });
  const curve = sweep.curve.map((p) => `${p.attack}@${p.eps}:${p.robust}`).join(' ');
  console.log(`clean ${sweep.cleanCorrect}/${sweep.samples}; ${curve}; checks ${((performance.now() - started) / 1000).toFixed(1)} s\n${healthCsv(report.checks)}`);
  return report;
}

function warned(report: HealthReport): HealthCheckId[] {
  return report.checks.filter((c) => c.status === 'warn').map((c) => c.id);
}

describe('health checks on the MNIST CNN and on masked versions of it (wasm)', () => {
  let cnn: LoadedModel;
  beforeAll(async () => {
    await useBackend('wasm');
    const files = ['model.json', 'weights.bin'].map((name) => ({ name, bytes: new Uint8Array(readFileSync(`${FIXTURE}/${name}`)) }));
    cnn = await loadModelFromFiles(files);
  });
  afterAll(() => cnn.dispose());

  it('the undefended CNN raises no warning', async () => {
    const before = tf.memory().numTensors;
    // 200 digits, so that the 1-point slack of the paired checks is two samples.
    const report = await health(50, makeLogitsFn(cnn, preprocessingFor(cnn.description)), digits(20), 'logits');
    expect(tf.memory().numTensors).toBe(before);
    // A normal model evaluated with a converged search: no check may warn (Carlini et al. 2019, Sec. 4–5).
    expect(warned(report)).toEqual([]);
    expect(report.checks.map((c) => c.status)).not.toContain('skip');
  });

  it('a saturated softmax output raises the saturation and gradient warnings', async () => {
    // Logits ×1000 before the softmax: float32 probabilities become exact ones and zeros.
    const saturated: LoadedModel = {
      description: { ...cnn.description, outputKind: 'probabilities' },
      forward: (input) => tf.softmax(tf.mul(cnn.forward(input), 1000)),
      dispose: () => undefined,
    };
    const pre = preprocessingFor(saturated.description);
    const report = await health(10, makeLogitsFn(saturated, pre), digits(3), 'probabilities', makeLogitsFn(saturated, pre, 'logits'));
    // Vanishing gradients (Athalye et al. 2018, Sec. 3): exact 0/1 probabilities give log-probabilities without gradient.
    expect(warned(report)).toEqual(expect.arrayContaining(['saturation', 'gradients']));
  });

  it('an 8-bit input quantisation raises the gradient, gradient-free and noise warnings', async () => {
    const inner = makeLogitsFn(cnn, preprocessingFor(cnn.description));
    const quantised: LogitsFn = (x) => tf.tidy(() => inner(tf.div(tf.round(tf.mul(x, 255)), 255) as tf.Tensor4D));
    const report = await health(10, quantised, digits(3), 'logits');
    // Shattered gradients (Athalye et al. 2018, Sec. 3): tf.round has a zero gradient, so gradient searches
    // stay where they start while a search without gradients and plain noise still flip samples.
    expect(warned(report)).toEqual(expect.arrayContaining(['gradients', 'gradient-free-vs-gradient', 'noise']));
  });
});
