/** A two-sided confidence interval for a proportion. */
export interface Interval {
  readonly low: number;
  readonly high: number;
}

/** z for a two-sided 95 % normal interval. */
export const Z95 = 1.959963984540054;

/**
 * Wilson score interval (Wilson 1927) for `successes` out of `trials`.
 * Returns [0, 1] for zero trials: nothing was measured.
 */
export function wilsonInterval(successes: number, trials: number, z: number = Z95): Interval {
  if (trials <= 0) return { low: 0, high: 1 };
  const p = successes / trials;
  const z2 = z * z;
  const denom = 1 + z2 / trials;
  const centre = (p + z2 / (2 * trials)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / trials + z2 / (4 * trials * trials))) / denom;
  // At p̂ = 0 or 1 one endpoint is exactly 0 or 1 in closed form; rounding would leave it an ulp off.
  const low = successes <= 0 ? 0 : Math.max(0, centre - half);
  const high = successes >= trials ? 1 : Math.min(1, centre + half);
  return { low, high };
}

/** A robust accuracy with its Wilson 95 % interval, as curve points and class tables report it. */
export interface RobustAccuracyEstimate {
  readonly robustAccuracy: number;
  readonly ci95Low: number;
  readonly ci95High: number;
}

/** `robust` out of `samples` (0 when there are no samples) with its Wilson 95 % interval. */
export function robustAccuracyEstimate(robust: number, samples: number): RobustAccuracyEstimate {
  const ci = wilsonInterval(robust, samples);
  return { robustAccuracy: samples === 0 ? 0 : robust / samples, ci95Low: ci.low, ci95High: ci.high };
}
