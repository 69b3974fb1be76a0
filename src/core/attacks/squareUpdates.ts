/**
 * The random proposals of the Square attack (Andriushchenko, Croce, Flammarion & Hein, "Square
 * Attack: a query-efficient black-box adversarial attack via random search", ECCV 2020), on plain
 * arrays of one image each, NHWC order (pixel (r, c), channel k at (r·W + c)·C + k).
 *
 * L∞ (the paper's Algorithm 2): start from vertical stripes (every column and channel ±ε); a proposal
 * sets one random h×h window, per channel, to x ± ε (x̂ + ρ·2ε projected back onto the ball).
 * L2 (Algorithm 3): start from a grid of centre-weighted tiles with random signs scaled to norm ε;
 * a proposal moves the perturbation mass of a second random window, and any unused budget, into a
 * first window, adding there a fresh centre-weighted pattern of random sign. The details of the L2
 * start (tile side ⌊min(H, W)/5⌋) and the odd side ≥ 3 of L2 windows are from memory.
 */
import type { Rng } from '../random/rng.ts';

/** Image geometry. */
export interface Geometry {
  readonly height: number;
  readonly width: number;
  readonly channels: number;
}

/**
 * Iterations (on a 10,000-iteration scale) after which p halves. From memory of the paper: p is
 * halved at i ∈ {10, 50, 200, 500, 1000, 2000, 4000, 6000, 8000} for 10,000 queries; other query
 * budgets stretch the schedule proportionally.
 */
const HALVING_POINTS = [10, 50, 200, 500, 1000, 2000, 4000, 6000, 8000];

/** p(i): the share of the image a window covers at iteration i (1-based) of `iterations`. */
export function squareFraction(pInit: number, iteration: number, iterations: number): number {
  const scaled = Math.floor((iteration * 10000) / iterations);
  const halvings = HALVING_POINTS.filter((t) => scaled > t).length;
  return pInit / 2 ** halvings;
}

/** Window side h = round(√(p·H·W)), kept within [1, min(H, W)]. */
export function squareSide(p: number, g: Geometry): number {
  return Math.min(Math.min(g.height, g.width), Math.max(1, Math.round(Math.sqrt(p * g.height * g.width))));
}

function sign(rng: Rng): number {
  return rng.next() < 0.5 ? -1 : 1;
}

function clip01(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}

/** L∞ start: δ constant along each column, ±ε per column and channel; x + δ clipped to [0, 1]. */
export function linfStripes(x: Float32Array, eps: number, g: Geometry, rng: Rng): Float32Array {
  const out = new Float32Array(x.length);
  const signs = Array.from({ length: g.width * g.channels }, () => sign(rng));
  for (let r = 0; r < g.height; r++) {
    for (let c = 0; c < g.width; c++) {
      for (let k = 0; k < g.channels; k++) {
        const i = (r * g.width + c) * g.channels + k;
        out[i] = clip01(x[i]! + signs[c * g.channels + k]! * eps);
      }
    }
  }
  return out;
}

/** An L∞ proposal: `best` with one random h×h window changed in place of a copy; returns the copy. */
export function linfProposal(x: Float32Array, best: Float32Array, eps: number, side: number, g: Geometry, rng: Rng): Float32Array {
  const out = best.slice();
  const top = rng.int(g.height - side + 1);
  const left = rng.int(g.width - side + 1);
  const signs = Array.from({ length: g.channels }, () => sign(rng));
  for (let r = top; r < top + side; r++) {
    for (let c = left; c < left + side; c++) {
      for (let k = 0; k < g.channels; k++) {
        const i = (r * g.width + c) * g.channels + k;
        // x̂ + ρ·2ε projected onto the ball and the box: with |x̂ − x| ≤ ε this is x + ρ·ε, clipped.
        const delta = Math.min(eps, Math.max(-eps, best[i]! - x[i]! + signs[k]! * 2 * eps));
        out[i] = clip01(x[i]! + delta);
      }
    }
  }
  return out;
}

/**
 * The paper's centre-weighted h×h pattern with unit L2 norm: at Chebyshev distance d from the centre
 * pixel (⌊h/2⌋, ⌊h/2⌋) the value is Σ_{m=d+1}^{n+1} 1/m² with n = ⌊h/2⌋ (nested squares, each adding 1/m²).
 */
export function centreWeightedPattern(side: number): Float64Array {
  const n = Math.floor(side / 2);
  const out = new Float64Array(side * side);
  let squared = 0;
  for (let r = 0; r < side; r++) {
    for (let c = 0; c < side; c++) {
      const d = Math.max(Math.abs(r - n), Math.abs(c - n));
      let v = 0;
      for (let m = d + 1; m <= n + 1; m++) v += 1 / (m * m);
      out[r * side + c] = v;
      squared += v * v;
    }
  }
  const norm = Math.sqrt(squared);
  return out.map((v) => v / norm);
}

/** Scale δ to L2 norm at most ε and return x + δ clipped to [0, 1]. */
function pointFromDelta(x: Float32Array, delta: Float64Array, eps: number): Float32Array {
  let squared = 0;
  for (const v of delta) squared += v * v;
  const norm = Math.sqrt(squared);
  // Slightly under 1 so that float32 rounding of x + δ cannot push ‖δ‖ above ε.
  const scale = norm > 0 ? Math.min(1, eps / norm) * (1 - 1e-7) : 0;
  return Float32Array.from(x, (v, i) => clip01(v + delta[i]! * scale));
}

/** L2 start: tiles of side ⌊min(H, W)/5⌋, each a centre-weighted pattern of random sign per channel, scaled to norm ε. */
export function l2Tiles(x: Float32Array, eps: number, g: Geometry, rng: Rng): Float32Array {
  const side = Math.max(1, Math.floor(Math.min(g.height, g.width) / 5));
  const pattern = centreWeightedPattern(side);
  const rows = Math.floor(g.height / side);
  const cols = Math.floor(g.width / side);
  const top0 = Math.floor((g.height - rows * side) / 2);
  const left0 = Math.floor((g.width - cols * side) / 2);
  const delta = new Float64Array(x.length);
  for (let tr = 0; tr < rows; tr++) {
    for (let tc = 0; tc < cols; tc++) {
      for (let k = 0; k < g.channels; k++) {
        const s = sign(rng);
        for (let r = 0; r < side; r++) {
          for (let c = 0; c < side; c++) {
            delta[((top0 + tr * side + r) * g.width + left0 + tc * side + c) * g.channels + k] = s * pattern[r * side + c]!;
          }
        }
      }
    }
  }
  const norm = Math.sqrt(delta.reduce((a, v) => a + v * v, 0));
  return pointFromDelta(x, delta.map((v) => (v * eps) / norm), eps);
}

/** Pixel offsets (r·W + c) of an h×h window at a random position. */
function randomWindow(side: number, g: Geometry, rng: Rng): number[] {
  const top = rng.int(g.height - side + 1);
  const left = rng.int(g.width - side + 1);
  const out: number[] = [];
  for (let r = top; r < top + side; r++) for (let c = left; c < left + side; c++) out.push(r * g.width + c);
  return out;
}

/**
 * L2 window side: the L∞ side made odd and at least 3 (as far as the image allows), so that the
 * centre-weighted pattern has a centre pixel and at least one ring around it.
 */
export function l2Side(side: number, g: Geometry): number {
  const limit = Math.min(g.height, g.width);
  const odd = side % 2 === 0 ? side + 1 : side;
  return Math.min(limit, Math.max(3, odd));
}

/** Shrinks the window norms a hair so that float32 rounding of x + δ cannot take ‖δ‖₂ above ε. */
const ROUNDING_MARGIN = 1 - 1e-6;

/** An L2 proposal built from the current best point (see the file comment). */
export function l2Proposal(x: Float32Array, best: Float32Array, eps: number, side: number, g: Geometry, rng: Rng): Float32Array {
  const out = best.slice();
  let total = 0;
  for (let i = 0; i < x.length; i++) total += (best[i]! - x[i]!) ** 2;
  const first = randomWindow(side, g, rng);
  const second = randomWindow(side, g, rng);
  const union = [...new Set([...first, ...second])];
  const pattern = centreWeightedPattern(side);
  const unusedPerChannel = Math.max(eps * eps - total, 0) / g.channels;
  for (let k = 0; k < g.channels; k++) {
    const at = (p: number): number => p * g.channels + k;
    const delta = (p: number): number => best[at(p)]! - x[at(p)]!;
    let oldSquared = 0;
    for (const p of first) oldSquared += delta(p) ** 2;
    let mass = 0;
    for (const p of union) mass += delta(p) ** 2;
    const oldNorm = Math.sqrt(oldSquared);
    const s = sign(rng);
    const fresh = first.map((p, j) => s * pattern[j]! + (oldNorm > 1e-10 ? delta(p) / oldNorm : 0));
    const freshNorm = Math.sqrt(fresh.reduce((a, v) => a + v * v, 0));
    const length = Math.sqrt(mass + unusedPerChannel) * ROUNDING_MARGIN;
    for (const p of second) out[at(p)] = x[at(p)]!;
    first.forEach((p, j) => {
      out[at(p)] = clip01(x[at(p)]! + (freshNorm > 0 ? (fresh[j]! / freshNorm) * length : 0));
    });
  }
  return out;
}
