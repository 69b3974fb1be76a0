/** Shared closeness helper: largest absolute and relative differences between two arrays. */
export interface Difference {
  readonly maxAbs: number;
  readonly maxRel: number;
  readonly index: number;
}

export function compareArrays(actual: ArrayLike<number>, expected: ArrayLike<number>, floor = 1e-6): Difference {
  if (actual.length !== expected.length) throw new Error(`length ${actual.length} ≠ ${expected.length}`);
  let maxAbs = 0;
  let maxRel = 0;
  let index = -1;
  for (let i = 0; i < actual.length; i++) {
    const a = actual[i]!;
    const e = expected[i]!;
    if (!Number.isFinite(a) || !Number.isFinite(e)) {
      if (a !== e) return { maxAbs: Infinity, maxRel: Infinity, index: i };
      continue;
    }
    const abs = Math.abs(a - e);
    const rel = abs / Math.max(Math.abs(e), floor);
    if (abs > maxAbs) {
      maxAbs = abs;
      index = i;
    }
    if (rel > maxRel) maxRel = rel;
  }
  return { maxAbs, maxRel, index };
}

/** Throws with a readable message unless every element is within atol + rtol·|expected|. */
export function expectClose(actual: ArrayLike<number>, expected: ArrayLike<number>, atol: number, rtol = 0, what = 'values'): void {
  if (actual.length !== expected.length) throw new Error(`${what}: length ${actual.length} ≠ ${expected.length}`);
  for (let i = 0; i < actual.length; i++) {
    const a = actual[i]!;
    const e = expected[i]!;
    if (!(Math.abs(a - e) <= atol + rtol * Math.abs(e))) {
      throw new Error(`${what}: element ${i} is ${a}, expected ${e} (atol ${atol}, rtol ${rtol})`);
    }
  }
}
