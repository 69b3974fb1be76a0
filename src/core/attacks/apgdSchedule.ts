/**
 * APGD's step-size schedule (Croce & Hein, ICML 2020, Sec. 3.2), kept in plain per-sample arrays.
 *
 * Checkpoints: p₀ = 0, p₁ = 0.22, p_{j+1} = p_j + max(p_j − p_{j−1} − 0.03, 0.06), w_j = ⌈p_j·N⌉.
 * At checkpoint w_j a sample's step η is halved (and the search restarts from its best point) when
 *   1. fewer than ρ·(w_j − w_{j−1}) of the steps since w_{j−1} increased the loss (ρ = 0.75), or
 *   2. η was not halved at w_{j−1} and the best loss has not changed since w_{j−1}.
 */

/** ρ, the share of loss-increasing steps below which the step is halved. */
export const APGD_RHO = 0.75;

/**
 * Checkpoint iterations w_j for N iterations, ascending and without repeats (for small N two p_j
 * can round to the same iteration; the repeat is dropped). Starts with w₀ = 0 and lists every
 * p_j ≤ 1. The p_j are computed in hundredths with integers, so no rounding error can move a
 * ceiling: p_j = P_j/100 and w_j = ⌈P_j·N/100⌉.
 */
export function apgdCheckpoints(iterations: number): number[] {
  if (!Number.isInteger(iterations) || iterations < 1) throw new Error(`apgdCheckpoints: iterations must be a positive integer (got ${iterations})`);
  const hundredths = [0, 22];
  for (;;) {
    const last = hundredths[hundredths.length - 1]!;
    const before = hundredths[hundredths.length - 2]!;
    const next = last + Math.max(last - before - 3, 6);
    if (next > 100) break;
    hundredths.push(next);
  }
  const out: number[] = [];
  for (const p of hundredths) {
    const w = Math.ceil((p * iterations) / 100);
    if (out[out.length - 1] !== w) out.push(w);
  }
  return out;
}

/** Per-sample state of the schedule during one restart (arrays indexed by sample). */
export class StepSizeSchedule {
  /** Current step η per sample. */
  readonly eta: Float64Array;
  /** Best loss of this restart per sample (f_max). */
  readonly bestLoss: Float64Array;
  private readonly lastLoss: Float64Array;
  private readonly successes: Int32Array;
  private readonly halvedAtLast: Uint8Array;
  private readonly bestAtLast: Float64Array;
  private readonly checkpoints: readonly number[];

  constructor(count: number, iterations: number) {
    this.eta = new Float64Array(count);
    this.bestLoss = new Float64Array(count);
    this.lastLoss = new Float64Array(count);
    this.successes = new Int32Array(count);
    this.halvedAtLast = new Uint8Array(count);
    this.bestAtLast = new Float64Array(count);
    this.checkpoints = apgdCheckpoints(iterations);
  }

  /** A sample's first iterate x(0) with loss f(x(0)) and the initial step η. */
  start(sample: number, eta: number, loss: number): void {
    this.eta[sample] = eta;
    this.bestLoss[sample] = loss;
    this.lastLoss[sample] = loss;
    this.successes[sample] = 0;
    this.halvedAtLast[sample] = 0;
    this.bestAtLast[sample] = loss;
  }

  /** Records f(x(k)) for k ≥ 1; returns true when it is this restart's best so far. */
  observe(sample: number, loss: number): boolean {
    if (loss > this.lastLoss[sample]!) this.successes[sample]! += 1;
    this.lastLoss[sample] = loss;
    if (loss <= this.bestLoss[sample]!) return false;
    this.bestLoss[sample] = loss;
    return true;
  }

  /** The interval w_j − w_{j−1} when iteration k is a checkpoint w_j with j ≥ 1, else null. */
  intervalEndingAt(k: number): number | null {
    const j = this.checkpoints.indexOf(k);
    return j >= 1 ? k - this.checkpoints[j - 1]! : null;
  }

  /**
   * The decision at a checkpoint closing an interval of `interval` iterations: returns true when the
   * sample's step is halved, in which case the caller moves the sample back to its best point.
   */
  decide(sample: number, interval: number): boolean {
    const tooFewSuccesses = this.successes[sample]! < APGD_RHO * interval;
    const stalled = this.halvedAtLast[sample] === 0 && this.bestLoss[sample]! <= this.bestAtLast[sample]!;
    const halve = tooFewSuccesses || stalled;
    if (halve) {
      this.eta[sample] = this.eta[sample]! / 2;
      // The search continues from the best point, so the next comparison is against its loss.
      this.lastLoss[sample] = this.bestLoss[sample]!;
    }
    this.halvedAtLast[sample] = halve ? 1 : 0;
    this.bestAtLast[sample] = this.bestLoss[sample]!;
    this.successes[sample] = 0;
    return halve;
  }
}
