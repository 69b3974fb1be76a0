/** How exports print a budget: the user's own spelling when the config carries it. */
import type { SweepConfig } from '../sweep/types.ts';
import { formatNumber } from '../sweep/plan.ts';

/** A lookup from budget value to its printed label for this configuration. */
export function epsLabeller(config: SweepConfig): (eps: number) => string {
  const labels = new Map<number, string>();
  config.eps.forEach((eps, i) => {
    const label = config.epsLabels?.[i];
    if (label !== undefined && !labels.has(eps)) labels.set(eps, label);
  });
  return (eps) => labels.get(eps) ?? formatNumber(eps);
}
