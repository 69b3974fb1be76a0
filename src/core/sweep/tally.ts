/**
 * The sweep's bookkeeping in typed arrays: the clean pass, one table per finished curve point, and
 * the conversion of both into CurvePoints and SampleRecords.
 */
import type { AttackId } from '../attacks/types.ts';
import type { Norm, SampleSet } from '../types.ts';
import { robustAccuracyEstimate } from '../stats/wilson.ts';
import type { AdversarialOutcome, CurvePoint, SampleRecord } from './types.ts';

export interface CleanTable {
  readonly pred: Int32Array;
  readonly conf: Float32Array;
  /** 1 where the clean prediction equals the label. */
  readonly correct: Uint8Array;
  readonly correctCount: number;
}

/** Per-sample results of one attack at one budget. */
export interface PointTable {
  readonly attack: AttackId;
  readonly eps: number;
  readonly advPred: Int32Array;
  readonly advConf: Float32Array;
  readonly linf: Float32Array;
  readonly l2: Float32Array;
  /** 1 where the sample was correct clean and its kept point is misclassified. */
  readonly flipped: Uint8Array;
}

/** Build the clean table from predictions. */
export function cleanTable(labels: Int32Array, pred: Int32Array, conf: Float32Array): CleanTable {
  const correct = new Uint8Array(labels.length);
  let correctCount = 0;
  for (let i = 0; i < labels.length; i++) {
    if (pred[i] === labels[i]) {
      correct[i] = 1;
      correctCount++;
    }
  }
  return { pred, conf, correct, correctCount };
}

/**
 * The starting table for a budget: a copy of the previous budget of the same attack, so samples
 * flipped there are carried forward unchanged (the ε-balls are nested); for the first budget, the
 * clean point itself with δ = 0.
 */
export function startPointTable(attack: AttackId, eps: number, clean: CleanTable, previous: PointTable | null): PointTable {
  if (previous !== null) {
    return {
      attack,
      eps,
      advPred: previous.advPred.slice(),
      advConf: previous.advConf.slice(),
      linf: previous.linf.slice(),
      l2: previous.l2.slice(),
      flipped: previous.flipped.slice(),
    };
  }
  const n = clean.pred.length;
  return {
    attack,
    eps,
    advPred: clean.pred.slice(),
    advConf: clean.conf.slice(),
    linf: new Float32Array(n),
    l2: new Float32Array(n),
    flipped: new Uint8Array(n),
  };
}

/** Samples still to attack at the next budget: correct clean and not flipped so far. */
export function stillRobust(clean: CleanTable, table: PointTable | null): number[] {
  const out: number[] = [];
  for (let i = 0; i < clean.correct.length; i++) {
    if (clean.correct[i] === 1 && (table === null || table.flipped[i] === 0)) out.push(i);
  }
  return out;
}

/** Summarise one finished table as a curve point with its Wilson 95 % interval. */
export function curvePoint(table: PointTable, clean: CleanTable, norm: Norm): CurvePoint {
  const samples = clean.correct.length;
  let flips = 0;
  for (let i = 0; i < samples; i++) flips += table.flipped[i]!;
  const robust = clean.correctCount - flips;
  return {
    attack: table.attack,
    norm,
    eps: table.eps,
    samples,
    cleanCorrect: clean.correctCount,
    robust,
    ...robustAccuracyEstimate(robust, samples),
    attackSuccessRate: clean.correctCount === 0 ? 0 : flips / clean.correctCount,
  };
}

/**
 * One record per sample from the finished tables (in sweep order). minFlipEps is taken over the
 * finished budgets of each attack that has at least one finished budget.
 */
export function sampleRecords(samples: SampleSet, clean: CleanTable, tables: readonly PointTable[]): SampleRecord[] {
  const records: SampleRecord[] = [];
  for (let i = 0; i < clean.pred.length; i++) {
    const outcomes: AdversarialOutcome[] = tables.map((t) => ({
      attack: t.attack,
      eps: t.eps,
      advPred: t.advPred[i]!,
      advConf: t.advConf[i]!,
      linf: t.linf[i]!,
      l2: t.l2[i]!,
      flipped: t.flipped[i] === 1,
    }));
    records.push({
      index: i,
      file: samples.files[i] ?? String(i),
      label: samples.labels[i]!,
      cleanPred: clean.pred[i]!,
      cleanConf: clean.conf[i]!,
      outcomes,
      minFlipEps: minFlipBudgets(clean.correct[i] === 1, outcomes),
    });
  }
  return records;
}

function minFlipBudgets(correctClean: boolean, outcomes: readonly AdversarialOutcome[]): Partial<Record<AttackId, number | null>> {
  const result: Partial<Record<AttackId, number | null>> = {};
  for (const o of outcomes) {
    if (!correctClean) {
      result[o.attack] = 0;
    } else if (o.flipped) {
      const seen = result[o.attack];
      if (seen === undefined || seen === null || o.eps < seen) result[o.attack] = o.eps;
    } else if (!(o.attack in result)) {
      result[o.attack] = null;
    }
  }
  return result;
}
