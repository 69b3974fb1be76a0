/**
 * Plain-data shapes of a sweep: its plan, its progress and its results. These cross the worker
 * boundary and are written to run.json, so they hold no tensors and no functions.
 */
import type { AttackId } from '../attacks/types.ts';
import type { Norm } from '../types.ts';

/** One search to run at every budget, with its options (completed by the attack's validate()). */
export interface SweepAttackSpec {
  readonly id: AttackId;
  readonly options: Readonly<Record<string, unknown>>;
}

export interface SweepConfig {
  readonly attacks: readonly SweepAttackSpec[];
  readonly norm: Norm;
  /** Budgets in pixel units, in the order given (sorted ascending by the sweep). */
  readonly eps: readonly number[];
  /**
   * Optional: the budgets as the user wrote them (e.g. "8/255" or "0.1"), one per `eps` entry, same
   * order. Exports print these so the user's own spelling survives; without them a budget is printed
   * in the shortest form that reads back to the same number.
   */
  readonly epsLabels?: readonly string[];
  readonly seed: number;
  /** Samples per forward/backward batch. */
  readonly batchSize: number;
}

/** One point of a robustness curve. */
export interface CurvePoint {
  readonly attack: AttackId;
  readonly norm: Norm;
  readonly eps: number;
  readonly samples: number;
  readonly cleanCorrect: number;
  /** Correct clean and at every adversarial point found. */
  readonly robust: number;
  readonly robustAccuracy: number;
  readonly ci95Low: number;
  readonly ci95High: number;
  /** Flips / clean-correct (0 when nothing was clean-correct). */
  readonly attackSuccessRate: number;
}

/** The outcome for one sample under one attack at one budget. */
export interface AdversarialOutcome {
  readonly attack: AttackId;
  readonly eps: number;
  readonly advPred: number;
  readonly advConf: number;
  /** Achieved ‖δ‖∞ and ‖δ‖₂ of the kept point. */
  readonly linf: number;
  readonly l2: number;
  readonly flipped: boolean;
}

export interface SampleRecord {
  readonly index: number;
  readonly file: string;
  readonly label: number;
  readonly cleanPred: number;
  readonly cleanConf: number;
  /** One entry per attack × budget, in sweep order. */
  readonly outcomes: readonly AdversarialOutcome[];
  /** Per attack id: the smallest budget in the sweep that flipped it; 0 if misclassified clean; null if never. */
  readonly minFlipEps: Readonly<Partial<Record<AttackId, number | null>>>;
}

export interface SweepProgress {
  readonly done: number;
  readonly total: number;
  /** Gradient evaluations (sample-steps) per second so far. */
  readonly rate: number;
  readonly attack: AttackId;
  readonly eps: number;
}

export interface SweepResult {
  readonly config: SweepConfig;
  readonly cleanAccuracy: number;
  readonly cleanCorrect: number;
  readonly samples: number;
  readonly curve: readonly CurvePoint[];
  readonly records: readonly SampleRecord[];
  /** False when the sweep was cancelled: the curve holds the points that finished. */
  readonly complete: boolean;
  readonly startedAt: string;
  readonly endedAt: string;
}
