/**
 * Per-sample bookkeeping of an iterative search, kept in plain arrays: the point to return for
 * each sample, whether it was flipped, and the highest loss seen so far for the unflipped ones.
 * Points are copied out of each evaluated iterate, so the search can drop flipped rows from its
 * tensors and never has to scatter into a batch tensor.
 */
export interface SearchState {
  /** N·D floats: the point returned per sample (starts as the clean x). */
  readonly points: Float32Array;
  /** 1 once a sample was seen misclassified; its point is then frozen. */
  readonly flipped: Uint8Array;
  /** Highest loss seen per unflipped sample (−∞ before its first evaluation). */
  readonly bestLoss: Float32Array;
  /** Pixels per sample (H·W·C). */
  readonly dim: number;
  /** Sample rows passed through forward + backward so far. */
  gradientRows: number;
}

/** Fresh state with every point at the clean input. */
export function createSearchState(cleanPixels: Float32Array, count: number): SearchState {
  return {
    points: Float32Array.from(cleanPixels),
    flipped: new Uint8Array(count),
    bestLoss: new Float32Array(count).fill(-Infinity),
    dim: count === 0 ? 0 : cleanPixels.length / count,
    gradientRows: 0,
  };
}

/**
 * Record one evaluated iterate. Row i of the iterate belongs to sample `samples[i]`. A misclassified
 * row is frozen as that sample's point; otherwise the row replaces the kept point when its loss is
 * higher. Returns the local rows that are still unflipped (the ones the search keeps attacking).
 */
export function recordIterate(
  state: SearchState,
  samples: readonly number[],
  iterate: Float32Array,
  loss: ArrayLike<number>,
  misclassifiedRows: ArrayLike<number>,
): number[] {
  const stillActive: number[] = [];
  for (let i = 0; i < samples.length; i++) {
    const sample = samples[i]!;
    const isFlipped = misclassifiedRows[i] !== 0;
    if (isFlipped || loss[i]! > state.bestLoss[sample]!) {
      copyRow(state, sample, iterate, i);
      state.bestLoss[sample] = loss[i]!;
    }
    if (isFlipped) state.flipped[sample] = 1;
    else stillActive.push(i);
  }
  return stillActive;
}

function copyRow(state: SearchState, sample: number, iterate: Float32Array, row: number): void {
  state.points.set(iterate.subarray(row * state.dim, (row + 1) * state.dim), sample * state.dim);
}

/** Samples (ascending) that may still be attacked: attackable and not yet flipped. */
export function activeSamples(state: SearchState, attackable: Uint8Array): number[] {
  const out: number[] = [];
  for (let i = 0; i < state.flipped.length; i++) if (attackable[i] === 1 && state.flipped[i] === 0) out.push(i);
  return out;
}
