/**
 * Symbolic dimensions. The batch size N is unknown when the graph is compiled, so a dimension is
 * either a plain number or coef·N^power. That small algebra is enough for the shape arithmetic
 * exporters emit (x.view(x.size(0), -1): Shape → Gather → Unsqueeze → Concat → Reshape) and lets
 * Reshape infer −1 from N·C·H·W / N.
 */

/** coef·N^power with power ≥ 1 and coef ≠ 0. */
export interface BatchTerm {
  readonly coef: number;
  readonly power: number;
}

export type Dim = number | BatchTerm;

/** The batch size itself. */
export const BATCH: Dim = { coef: 1, power: 1 };

/** True for a plain number. */
export function isKnown(d: Dim): d is number {
  return typeof d === 'number';
}

function term(coef: number, power: number): Dim {
  return power === 0 || coef === 0 ? coef : { coef, power };
}

function parts(d: Dim): [number, number] {
  return typeof d === 'number' ? [d, 0] : [d.coef, d.power];
}

/** a·b. */
export function dimMul(a: Dim, b: Dim): Dim {
  const [ca, pa] = parts(a);
  const [cb, pb] = parts(b);
  return term(ca * cb, pa + pb);
}

/** a / b when it is exact (integer coefficient, non-negative power); undefined otherwise. */
export function dimDiv(a: Dim, b: Dim): Dim | undefined {
  const [ca, pa] = parts(a);
  const [cb, pb] = parts(b);
  if (cb === 0 || pa < pb) return undefined;
  const coef = ca / cb;
  if (!Number.isInteger(coef)) return undefined;
  return term(coef, pa - pb);
}

/** a + b when both are of the same power of N; undefined otherwise. */
export function dimAdd(a: Dim, b: Dim): Dim | undefined {
  const [ca, pa] = parts(a);
  const [cb, pb] = parts(b);
  if (ca === 0) return b;
  if (cb === 0) return a;
  if (pa !== pb) return undefined;
  return term(ca + cb, pa);
}

/** a − b (see dimAdd). */
export function dimSub(a: Dim, b: Dim): Dim | undefined {
  const [cb, pb] = parts(b);
  return dimAdd(a, term(-cb, pb));
}

/** Structural equality. */
export function dimEquals(a: Dim, b: Dim): boolean {
  const [ca, pa] = parts(a);
  const [cb, pb] = parts(b);
  return ca === cb && pa === pb;
}

/** Product of a list of dimensions (1 for an empty list). */
export function dimProduct(dims: readonly Dim[]): Dim {
  return dims.reduce<Dim>((acc, d) => dimMul(acc, d), 1);
}

/** The number a dimension stands for at a given batch size. */
export function resolveDim(d: Dim, batch: number): number {
  return typeof d === 'number' ? d : d.coef * batch ** d.power;
}

/** Resolve a whole shape. */
export function resolveShape(dims: readonly Dim[], batch: number): number[] {
  return dims.map((d) => resolveDim(d, batch));
}

/** "N", "4·N", "N^2" or the number. */
export function formatDim(d: Dim): string {
  if (typeof d === 'number') return String(d);
  const n = d.power === 1 ? 'N' : `N^${d.power}`;
  return d.coef === 1 ? n : `${d.coef}·${n}`;
}

/** "[N, 3, 32, 32]". */
export function formatShape(dims: readonly Dim[]): string {
  return `[${dims.map(formatDim).join(', ')}]`;
}
