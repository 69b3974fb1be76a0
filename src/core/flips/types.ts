/**
 * Plain-data shapes of a flip-budget run: per sample, the smallest budget at which a search flips
 * it. They cross the worker boundary and are written to flips.csv, so they hold no tensors.
 */
import type { Norm } from '../types.ts';

/** Searches that can measure flip budgets: bisection over ε with PGD or APGD-CE, or DeepFool's estimate. */
export type FlipSearchId = 'pgd' | 'apgd-ce' | 'deepfool';

export interface FlipBudgetConfig {
  readonly search: FlipSearchId;
  readonly norm: Norm;
  /** Largest budget tried (pixel units); a sample the search cannot flip there gets null. */
  readonly maxEps: number;
  /** The bisection stops once the flipping budget and the largest failed budget are at most this far apart. */
  readonly tol: number;
  /** Options of the search, completed by its meta.validate() (untargeted). */
  readonly options: Readonly<Record<string, unknown>>;
  readonly seed: number;
  /** Samples per batch. */
  readonly batchSize: number;
}

/** The flip budget of one sample. */
export interface FlipRecord {
  readonly index: number;
  readonly file: string;
  readonly label: number;
  readonly cleanPred: number;
  /**
   * Size (‖δ‖ in the run's norm) of the smallest flipping point the search found: 0 for a sample
   * misclassified clean, null when nothing flipped it up to maxEps.
   */
  readonly flipEps: number | null;
  /**
   * Largest budget at which the search was run and failed to flip the sample (0 if none); the true
   * minimal budget of this search lies in (failedEps, flipEps]. DeepFool gives 0 (no bisection).
   */
  readonly failedEps: number;
  /** Prediction at the kept point: the flipping point, the clean input (flipEps 0) or the best point at maxEps (null). */
  readonly advPred: number;
  /** Searches run for this sample (the probe at maxEps included). */
  readonly probes: number;
}

export interface FlipBudgetResult {
  readonly config: FlipBudgetConfig;
  readonly samples: number;
  readonly cleanCorrect: number;
  readonly records: readonly FlipRecord[];
  /** Median flip budget over the clean-correct samples (null once half never flipped, NaN when none was correct). */
  readonly medianFlipEps: number | null;
  /** False when cancelled: records then hold the samples that finished. */
  readonly complete: boolean;
  readonly startedAt: string;
  readonly endedAt: string;
}

export interface FlipProgress {
  /** Samples whose flip budget is known. */
  readonly done: number;
  readonly total: number;
  /** Searches run so far (each over a batch of rows). */
  readonly probes: number;
}

/** One point of the robust-accuracy curve implied by flip budgets. */
export interface FlipCurvePoint {
  readonly eps: number;
  readonly samples: number;
  /** Samples whose flip budget exceeds eps (never-flipped ones count as robust everywhere). */
  readonly robust: number;
  readonly robustAccuracy: number;
  readonly ci95Low: number;
  readonly ci95High: number;
}
