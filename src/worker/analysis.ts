/**
 * The worker's second look at an evaluation: health checks and per-class statistics of the last
 * sweep, and flip budgets of the loaded model on the loaded samples. Thin calls into the core; the
 * replies are plain data for the page to draw.
 */
import { makeLogitsFn } from '../core/models/pipeline.ts';
import { runHealthChecks, type HealthReport } from '../core/health/runHealthChecks.ts';
import { subsetSamples } from '../core/health/extraRuns.ts';
import { sweepStatistics, type SweepStatistics } from '../core/stats/perClass.ts';
import { runFlipBudgets } from '../core/flips/runFlipBudgets.ts';
import { flipBudgetHistogram, robustAccuracyFromFlips } from '../core/flips/curve.ts';
import { defaultMaxEps } from '../core/flips/defaults.ts';
import type { FlipProgress } from '../core/flips/types.ts';
import type { Engine } from './engine.ts';
import { spreadIndices } from './preview.ts';
import { curveGrid, histogramUpper, remapRecords } from './flipView.ts';
import type { FlipRequest, FlipsReply, HealthRequest } from './protocol.ts';

/** Points of the derived curve (plus the one at 0). */
const CURVE_STEPS = 60;

/** Per-class table, flip matrices and median flip budgets of the last sweep. */
export function statisticsOfLastSweep(engine: Engine): SweepStatistics {
  const last = engine.lastSweep();
  return sweepStatistics(last.result, last.classNames);
}

/**
 * The eight health checks of the last sweep, on the model, preprocessing and samples it ran with.
 * Refuses when the model or the samples were replaced since: the checks would judge another run.
 */
export async function healthOfLastSweep(
  engine: Engine,
  request: HealthRequest,
  hooks: { readonly signal: AbortSignal; readonly onStep: (what: string) => void },
): Promise<HealthReport> {
  const last = engine.lastSweep();
  const { model, set } = engine.ready();
  if (model !== last.model || set !== last.samples) {
    throw new Error('The model or the samples changed since the last sweep; run the sweep again, then check it.');
  }
  return runHealthChecks({
    logits: makeLogitsFn(model, last.preprocessing),
    rawOutputs: makeLogitsFn(model, last.preprocessing, 'logits'),
    samples: set,
    sweep: last.result,
    outputKind: model.description.outputKind,
    squareOptions: request.squareOptions,
    noiseOptions: request.noiseOptions,
    signal: hooks.signal,
    onStep: hooks.onStep,
  });
}

/** Flip budgets of (a class-balanced subset of) the loaded samples, with the histogram and the derived curve. */
export async function flipBudgetsOf(
  engine: Engine,
  request: FlipRequest,
  hooks: { readonly signal: AbortSignal; readonly onProgress: (p: FlipProgress) => void },
): Promise<FlipsReply> {
  const { model, set } = engine.ready();
  const total = set.labels.length;
  const indices = request.limit === null || request.limit >= total ? null : spreadIndices(set.labels, request.limit).sort((a, b) => a - b);
  const samples = indices === null ? set : subsetSamples(set, indices);
  const maxEps = request.maxEps ?? defaultMaxEps(request.norm, set.height * set.width * set.channels);
  const config = {
    search: request.search,
    norm: request.norm,
    maxEps,
    tol: request.tol,
    options: request.options,
    seed: request.seed,
    batchSize: request.batchSize,
  };
  const run = await runFlipBudgets({ logits: makeLogitsFn(model, request.preprocessing), samples, config }, hooks);
  const result = indices === null ? run : { ...run, records: remapRecords(run.records, indices) };
  const upper = histogramUpper(result.records, maxEps);
  return {
    result,
    maxEps,
    totalSamples: total,
    histogram: flipBudgetHistogram(result.records, request.binCount, upper),
    curve: robustAccuracyFromFlips(
      result.records.map((r) => r.flipEps),
      curveGrid(upper, CURVE_STEPS),
    ),
  };
}
