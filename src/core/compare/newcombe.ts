/**
 * Confidence interval for the difference of two independent proportions by Newcombe's hybrid score
 * method (Newcombe, "Interval estimation for the difference between independent proportions:
 * comparison of eleven methods", Statistics in Medicine 17, 1998; method 10): the two Wilson score
 * intervals combined by "square and add".
 */
import { wilsonInterval, Z95, type Interval } from '../stats/wilson.ts';

/** 95 % interval for p₂ − p₁ with p₁ = successes1 / trials1 and p₂ = successes2 / trials2. */
export function newcombeDifference(successes1: number, trials1: number, successes2: number, trials2: number, z: number = Z95): Interval {
  if (trials1 <= 0 || trials2 <= 0) return { low: -1, high: 1 };
  const p1 = successes1 / trials1;
  const p2 = successes2 / trials2;
  const w1 = wilsonInterval(successes1, trials1, z);
  const w2 = wilsonInterval(successes2, trials2, z);
  const d = p2 - p1;
  const low = d - Math.sqrt((p2 - w2.low) ** 2 + (w1.high - p1) ** 2);
  const high = d + Math.sqrt((w2.high - p2) ** 2 + (p1 - w1.low) ** 2);
  return { low: Math.max(-1, low), high: Math.min(1, high) };
}
