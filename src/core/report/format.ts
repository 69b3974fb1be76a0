/** How the report and the comparison print numbers and budgets. */
import { epsLabeller } from '../export/epsLabels.ts';
import type { SweepConfig } from '../sweep/types.ts';
import type { Norm } from '../types.ts';

/** A budget in grey levels of an 8-bit image: "8/255", or "12.75/255" when not a whole number of levels. */
export function greyLevels(eps: number): string {
  const k = eps * 255;
  const whole = Math.round(k);
  if (Math.abs(k - whole) < 1e-6) return `${whole}/255`;
  return `${Number(k.toFixed(2))}/255`;
}

/** "L∞" or "L2". */
export function normName(norm: Norm): string {
  return norm === 'linf' ? 'L∞' : 'L2';
}

/** A share as a percentage with one decimal, e.g. "65.0 %". */
export function percent(value: number): string {
  return `${(value * 100).toFixed(1)} %`;
}

/** The budget labels of a configuration (the user's own spelling where recorded). */
export function budgetLabel(config: SweepConfig): (eps: number) => string {
  return epsLabeller(config);
}

/** A signed number with six decimals (differences), "+0.050000" or "-0.050000". */
export function signed6(value: number): string {
  const text = value.toFixed(6);
  return value > 0 || (value === 0 && !text.startsWith('-')) ? `+${text}` : text;
}

/** The first 12 hex digits of a SHA-256, for tables (the full value is printed elsewhere). */
export function shortHash(sha256: string): string {
  return sha256.slice(0, 12);
}
