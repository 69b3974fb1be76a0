/**
 * Exact minimal flip budgets of a multiclass affine classifier z = Wᵀx + b, in float64.
 *
 * Closed form (Moosavi-Dezfooli et al., "DeepFool", CVPR 2016, Sec. 3; dual norms): a sample x of class
 * y can be moved to class j within ε iff the margin m_j = z_y − z_j is at most the largest decrease of
 * z_y − z_j over the feasible δ:
 *   L2 (box ignored):  ε·‖w_y − w_j‖₂, so the minimal budget is min_j m_j / ‖w_y − w_j‖₂ (a lower bound
 *                      on the box-aware one, equal to it while the box does not bind);
 *   L∞ with the box:   Σ_i max over δ_i ∈ [max(−ε, −x_i), min(ε, 1 − x_i)] of (w_j − w_y)_i·δ_i, which
 *                      grows monotonically with ε, so the minimal budget is found by bisection.
 */
import { createRng } from '../../src/core/random/rng.ts';

/** z = Wᵀx + b with W as [D, K] row-major (w[i·K + k] is the weight of pixel i for class k). */
export interface AffineWeights {
  readonly w: ArrayLike<number>;
  readonly b: ArrayLike<number>;
  readonly d: number;
  readonly k: number;
}

/** Logits of one image in float64. */
export function logits64(model: AffineWeights, x: ArrayLike<number>): number[] {
  return Array.from({ length: model.k }, (_, c) => {
    let z = model.b[c]!;
    for (let i = 0; i < model.d; i++) z += model.w[i * model.k + c]! * x[i]!;
    return z;
  });
}

/** Column c of W (the weight vector of class c) in float64. */
export function classWeights(model: AffineWeights, c: number): Float64Array {
  return Float64Array.from({ length: model.d }, (_, i) => model.w[i * model.k + c]!);
}

export interface Sample {
  readonly x: Float32Array;
  readonly y: number;
}

/** Largest decrease of z_y − z_j (c = w_j − w_y) reachable in the L∞ ball of radius ε intersected with [0,1]. */
export function linfDecrease(c: Float64Array, x: ArrayLike<number>, eps: number): number {
  let total = 0;
  for (let i = 0; i < c.length; i++) {
    const lo = Math.max(-eps, -x[i]!);
    const hi = Math.min(eps, 1 - x[i]!);
    total += Math.max(c[i]! * lo, c[i]! * hi);
  }
  return total;
}

/** Exact minimal L2 budget (box ignored) of one sample. */
export function minimalL2(model: AffineWeights, s: Sample): number {
  const z = logits64(model, s.x);
  const wy = classWeights(model, s.y);
  let best = Number.POSITIVE_INFINITY;
  for (let j = 0; j < model.k; j++) {
    if (j === s.y) continue;
    const wj = classWeights(model, j);
    const norm = Math.sqrt(wy.reduce((acc, v, i) => acc + (v - wj[i]!) ** 2, 0));
    best = Math.min(best, Math.abs(z[s.y]! - z[j]!) / norm);
  }
  return best;
}

/** Exact minimal box-aware L∞ budget of one sample (bisection to 1e-12 on the monotone closed form). */
export function minimalLinf(model: AffineWeights, s: Sample): number {
  const z = logits64(model, s.x);
  const wy = classWeights(model, s.y);
  const directions = Array.from({ length: model.k }, (_, j) => j)
    .filter((j) => j !== s.y)
    .map((j) => ({ margin: z[s.y]! - z[j]!, c: classWeights(model, j).map((v, i) => v - wy[i]!) }));
  const reachable = (eps: number): boolean => directions.some((d) => linfDecrease(d.c, s.x, eps) >= d.margin);
  if (!reachable(1)) return Number.POSITIVE_INFINITY;
  let lo = 0;
  let hi = 1;
  while (hi - lo > 1e-12) {
    const mid = (lo + hi) / 2;
    if (reachable(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

/** `length` pixel values for the L∞ cases: a third at 0, a fifth at 1 (so the box binds), the rest uniform. */
export function boxBindingImages(seed: number, length: number): Float32Array {
  const rng = createRng(seed);
  return Float32Array.from({ length }, () => {
    const u = rng.next();
    return u < 1 / 3 ? 0 : u < 1 / 3 + 1 / 5 ? 1 : rng.next();
  });
}

/** Clean-correct samples (label = argmax of the clean logits, top margin > 1e-3) from candidate images. */
export function pickSamples(model: AffineWeights, pixels: Float32Array, count: number): Sample[] {
  const out: Sample[] = [];
  for (let n = 0; out.length < count; n++) {
    const x = pixels.slice(n * model.d, (n + 1) * model.d);
    if (x.length < model.d) throw new Error('not enough candidate images');
    const z = logits64(model, x);
    const sorted = [...z].sort((a, b) => b - a);
    if (sorted[0]! - sorted[1]! > 1e-3) out.push({ x, y: z.indexOf(sorted[0]!) });
  }
  return out;
}

/** Sample median (mean of the middle two for an even count). */
export function medianOf(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}
