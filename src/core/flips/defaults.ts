/**
 * Default settings of a flip-budget run, and the checks on user-given ones.
 */
import type { Norm } from '../types.ts';

/**
 * Default bisection tolerance, for both norms: half a grey level (1/510). The smallest change an 8-bit
 * image can carry is one grey level on one pixel, 1/255 in L∞ and in L2 alike, so a flip budget known
 * to within half of that is as fine as the images themselves resolve it.
 */
export const DEFAULT_TOL = 1 / 510;

/**
 * Default largest budget: the radius within which every image of this size can be turned into a flat
 * mid-grey image (every pixel 0.5), which no classifier can keep classifying correctly for all classes.
 * L∞: 0.5. L2: 0.5·√(H·W·C), the L2 size of a change of 0.5 on every pixel.
 */
export function defaultMaxEps(norm: Norm, pixelsPerImage: number): number {
  return norm === 'linf' ? 0.5 : 0.5 * Math.sqrt(pixelsPerImage);
}

/** Throws an Error naming the setting unless maxEps and tol make a usable bisection. */
export function checkBisectionSettings(maxEps: number, tol: number): void {
  if (!Number.isFinite(maxEps) || maxEps <= 0) throw new Error(`maxEps must be a finite number > 0 (got ${maxEps})`);
  if (!Number.isFinite(tol) || tol <= 0) throw new Error(`tol must be a finite number > 0 (got ${tol})`);
  if (tol >= maxEps) throw new Error(`tol (${tol}) must be smaller than maxEps (${maxEps})`);
}
