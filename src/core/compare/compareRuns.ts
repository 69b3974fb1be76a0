/**
 * Comparison of two or more saved runs: at every (search, norm, budget) present in the first run
 * (the baseline) and in another, the robust accuracies with their Wilson intervals, the difference
 * (other − baseline) with Newcombe's interval, and — when both runs used the same samples — the
 * paired counts of samples robust in only one of them. Warnings say when the runs are not like for
 * like (samples, preprocessing, threat model, search settings).
 */
import type { AttackId } from '../attacks/types.ts';
import { epsLabeller } from '../export/epsLabels.ts';
import type { SavedRun } from '../savedRun/types.ts';
import type { CurvePoint, SampleRecord } from '../sweep/types.ts';
import type { Norm } from '../types.ts';
import { newcombeDifference } from './newcombe.ts';
import { comparisonWarnings, type ComparisonWarning } from './warnings.ts';

export type { ComparisonWarning } from './warnings.ts';

/** A run and the name it goes by in tables, charts and warnings. */
export interface LabelledRun {
  readonly label: string;
  readonly run: SavedRun;
}

/** One run's value at one point. */
export interface RunValue {
  readonly samples: number;
  readonly robust: number;
  readonly robustAccuracy: number;
  readonly ci95Low: number;
  readonly ci95High: number;
}

export interface ComparisonRow {
  readonly baseline: string;
  readonly other: string;
  readonly attack: AttackId;
  readonly norm: Norm;
  readonly eps: number;
  /** The budget as the baseline printed it. */
  readonly epsLabel: string;
  readonly a: RunValue;
  readonly b: RunValue;
  /** b.robustAccuracy − a.robustAccuracy. */
  readonly difference: number;
  /** Newcombe hybrid score 95 % interval of the difference (independent samples). */
  readonly differenceLow: number;
  readonly differenceHigh: number;
  /** Same samples only: robust in the baseline but not in the other run, and the reverse; null otherwise. */
  readonly onlyA: number | null;
  readonly onlyB: number | null;
}

export interface Comparison {
  readonly runs: readonly { readonly label: string; readonly modelSha256: string; readonly samplesSha256: string }[];
  readonly rows: readonly ComparisonRow[];
  readonly warnings: readonly ComparisonWarning[];
}

/** Budgets equal to this tolerance are the same point (runs may spell a budget differently). */
const EPS_TOLERANCE = 1e-9;

/** Compare every run with the first. Throws when fewer than two runs are given or labels repeat. */
export function compareRuns(runs: readonly LabelledRun[]): Comparison {
  if (runs.length < 2) throw new Error('A comparison needs at least two runs.');
  const labels = runs.map((r) => r.label);
  if (new Set(labels).size !== labels.length) throw new Error(`Run labels must differ (got ${labels.join(', ')}).`);
  const baseline = runs[0]!;
  const rows = runs.slice(1).flatMap((other) => pairRows(baseline, other));
  return {
    runs: runs.map((r) => ({ label: r.label, modelSha256: r.run.run.model.sha256, samplesSha256: r.run.run.samples.sha256 })),
    rows,
    warnings: runs.slice(1).flatMap((other) => comparisonWarnings(baseline, other)),
  };
}

function pairRows(a: LabelledRun, b: LabelledRun): ComparisonRow[] {
  const label = epsLabeller(a.run.run.config);
  const paired = sameSamples(a.run, b.run);
  const rows: ComparisonRow[] = [];
  a.run.run.curve.forEach((pa, slotA) => {
    const slotB = b.run.run.curve.findIndex((pb) => pb.attack === pa.attack && pb.norm === pa.norm && Math.abs(pb.eps - pa.eps) <= EPS_TOLERANCE);
    const pb = b.run.run.curve[slotB];
    if (pb === undefined) return;
    const interval = newcombeDifference(pa.robust, pa.samples, pb.robust, pb.samples);
    const discordant = paired ? discordantCounts(a.run.records, b.run.records, slotA, slotB) : null;
    rows.push({
      baseline: a.label,
      other: b.label,
      attack: pa.attack,
      norm: pa.norm,
      eps: pa.eps,
      epsLabel: label(pa.eps),
      a: value(pa),
      b: value(pb),
      difference: pb.robustAccuracy - pa.robustAccuracy,
      differenceLow: interval.low,
      differenceHigh: interval.high,
      onlyA: discordant?.onlyA ?? null,
      onlyB: discordant?.onlyB ?? null,
    });
  });
  return rows;
}

function value(p: CurvePoint): RunValue {
  return { samples: p.samples, robust: p.robust, robustAccuracy: p.robustAccuracy, ci95Low: p.ci95Low, ci95High: p.ci95High };
}

/** The same sample set (hash) and the same files in the same order in the records. */
function sameSamples(a: SavedRun, b: SavedRun): boolean {
  if (a.run.samples.sha256 !== b.run.samples.sha256 || a.records.length !== b.records.length) return false;
  return a.records.every((r, i) => r.file === b.records[i]?.file && r.label === b.records[i]?.label);
}

/** Robust at a point: correct clean and not flipped there. */
function robustAt(r: SampleRecord, slot: number): boolean {
  return r.cleanPred === r.label && r.outcomes[slot]?.flipped === false;
}

function discordantCounts(a: readonly SampleRecord[], b: readonly SampleRecord[], slotA: number, slotB: number): { onlyA: number; onlyB: number } {
  let onlyA = 0;
  let onlyB = 0;
  a.forEach((ra, i) => {
    const rb = b[i]!;
    const ya = robustAt(ra, slotA);
    const yb = robustAt(rb, slotB);
    if (ya && !yb) onlyA++;
    if (yb && !ya) onlyB++;
  });
  return { onlyA, onlyB };
}
