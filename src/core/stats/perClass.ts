/**
 * Per-class views of a sweep, computed from its per-sample records: robust accuracy of each true
 * class with its Wilson 95 % interval, and the flip matrix (true class → class after the attack),
 * one of each per attack × budget. Plain data, so the worker can send them and the UI draw them.
 */
import type { AttackId } from '../attacks/types.ts';
import type { SampleRecord, SweepResult } from '../sweep/types.ts';
import { medianFlipBudget } from './curve.ts';
import { robustAccuracyEstimate } from './wilson.ts';

/** Robustness of the samples of one true class at one attack × budget. */
export interface ClassRobustness {
  readonly classIndex: number;
  readonly className: string;
  readonly samples: number;
  readonly cleanCorrect: number;
  /** Correct clean and not flipped by the attack at this budget. */
  readonly robust: number;
  /** robust / samples (0 for a class without samples). */
  readonly robustAccuracy: number;
  readonly ci95Low: number;
  readonly ci95High: number;
}

export interface PerClassPoint {
  readonly attack: AttackId;
  readonly eps: number;
  /** One entry per class index 0..K−1, classes without samples included. */
  readonly classes: readonly ClassRobustness[];
}

/** counts[t][p]: samples of true class t predicted as p at the attack's kept point (clean prediction if never attacked). */
export interface FlipMatrix {
  readonly attack: AttackId;
  readonly eps: number;
  readonly classNames: readonly string[];
  readonly counts: readonly (readonly number[])[];
}

export interface SweepStatistics {
  readonly perClass: readonly PerClassPoint[];
  readonly flipMatrices: readonly FlipMatrix[];
  /** Median smallest flipping budget on the sweep's grid, per attack (see stats/curve.ts medianFlipBudget). */
  readonly medianFlipBudget: Readonly<Partial<Record<AttackId, number | null>>>;
}

/** The (attack, eps) pairs of the sweep in its own order. */
function points(result: SweepResult): { attack: AttackId; eps: number; slot: number }[] {
  const first = result.records[0];
  if (first !== undefined) return first.outcomes.map((o, slot) => ({ attack: o.attack, eps: o.eps, slot }));
  return result.curve.map((p, slot) => ({ attack: p.attack, eps: p.eps, slot }));
}

/**
 * Class names in index order for K classes: the given names, extended with index strings for any
 * label or prediction beyond them.
 */
export function classNamesFor(records: readonly SampleRecord[], names: readonly string[] = []): string[] {
  let k = names.length;
  for (const r of records) {
    k = Math.max(k, r.label + 1, r.cleanPred + 1);
    for (const o of r.outcomes) k = Math.max(k, o.advPred + 1);
  }
  return Array.from({ length: k }, (_, c) => names[c] ?? String(c));
}

/** Robust accuracy per true class at every attack × budget of the sweep. */
export function perClassRobustness(result: SweepResult, names: readonly string[] = []): PerClassPoint[] {
  const classNames = classNamesFor(result.records, names);
  return points(result).map(({ attack, eps, slot }) => {
    const samples = new Array<number>(classNames.length).fill(0);
    const cleanCorrect = new Array<number>(classNames.length).fill(0);
    const robust = new Array<number>(classNames.length).fill(0);
    for (const r of result.records) {
      const correct = r.cleanPred === r.label;
      samples[r.label]!++;
      if (correct) cleanCorrect[r.label]!++;
      if (correct && r.outcomes[slot]?.flipped === false) robust[r.label]!++;
    }
    const classes = classNames.map((className, c) => ({
      classIndex: c,
      className,
      samples: samples[c]!,
      cleanCorrect: cleanCorrect[c]!,
      robust: robust[c]!,
      ...robustAccuracyEstimate(robust[c]!, samples[c]!),
    }));
    return { attack, eps, classes };
  });
}

/** The flip matrix (true class → predicted class after the attack) at every attack × budget. */
export function flipMatrices(result: SweepResult, names: readonly string[] = []): FlipMatrix[] {
  const classNames = classNamesFor(result.records, names);
  return points(result).map(({ attack, eps, slot }) => {
    const counts = classNames.map(() => new Array<number>(classNames.length).fill(0));
    for (const r of result.records) {
      const after = r.outcomes[slot]?.advPred ?? r.cleanPred;
      counts[r.label]![after]!++;
    }
    return { attack, eps, classNames, counts };
  });
}

/** Per-class table, flip matrices and median flip budgets of a sweep, in one object. */
export function sweepStatistics(result: SweepResult, names: readonly string[] = []): SweepStatistics {
  const medians: Partial<Record<AttackId, number | null>> = {};
  for (const p of result.curve) if (!(p.attack in medians)) medians[p.attack] = medianFlipBudget(result.records, p.attack);
  return { perClass: perClassRobustness(result, names), flipMatrices: flipMatrices(result, names), medianFlipBudget: medians };
}
