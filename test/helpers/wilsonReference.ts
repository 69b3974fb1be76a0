/**
 * Wilson 95 % score intervals (Wilson 1927) as a reference statistics library computes them:
 * statsmodels proportion_confint(method="wilson") values quoted in issue 5, to 4 decimals.
 */
export interface WilsonReference {
  readonly successes: number;
  readonly trials: number;
  readonly low: number;
  readonly high: number;
}

export const WILSON_REFERENCE: readonly WilsonReference[] = [
  { successes: 7, trials: 50, low: 0.0695, high: 0.2619 },
  { successes: 900, trials: 1000, low: 0.8798, high: 0.9171 },
];
