/**
 * How the plan screen shows a search option: words for the options Brink's searches declare
 * today, and a widget guessed from the default's type for any option added later.
 */

export type FieldKind = 'integer' | 'number' | 'number-or-auto' | 'boolean' | 'loss' | 'target' | 'unsupported';

export interface FieldSpec {
  readonly label: string;
  readonly kind: FieldKind;
  /** Shown under the field. */
  readonly help?: string;
  /** For number-or-auto: what "automatic" means. */
  readonly autoLabel?: string;
  /** Smallest allowed value for numbers. */
  readonly min?: number;
}

const KNOWN: Readonly<Record<string, FieldSpec>> = {
  steps: { label: 'Iterations per restart', kind: 'integer', min: 1 },
  stepSize: { label: 'Step size, in pixel units', kind: 'number-or-auto', autoLabel: 'automatic (2.5·ε / iterations)', min: 0 },
  restarts: { label: 'Restarts', kind: 'integer', min: 1, help: 'later runs attack only the images still standing' },
  randomStart: { label: 'Start at a random point of the ε-ball', kind: 'boolean', help: 'without it a search starts at the clean image' },
  loss: { label: 'Loss the search pushes up', kind: 'loss' },
  target: { label: 'Aim', kind: 'target' },
  queries: { label: 'Model queries per image', kind: 'integer', min: 1, help: 'forward passes, no gradients' },
  pInit: { label: 'Initial square size, as a share of the image', kind: 'number-or-auto', autoLabel: 'automatic for the norm', min: 0 },
  topK: { label: 'Classes considered', kind: 'integer', min: 2, help: 'the true class and the highest-scoring others' },
  overshoot: { label: 'Overshoot past the boundary', kind: 'number', min: 0 },
  maxIterations: { label: 'Iterations at most', kind: 'integer', min: 1 },
  draws: { label: 'Random draws per image', kind: 'integer', min: 1 },
};

/** Words and widget for an option; unknown options get a widget from their default value. */
export function fieldSpec(key: string, fallback: unknown): FieldSpec {
  const known = KNOWN[key];
  if (known !== undefined) return known;
  const label = key.replace(/([A-Z])/g, ' $1').toLowerCase();
  if (typeof fallback === 'boolean') return { label, kind: 'boolean' };
  if (typeof fallback === 'number') return { label, kind: Number.isInteger(fallback) ? 'integer' : 'number' };
  if (fallback === null) return { label, kind: 'number-or-auto', autoLabel: 'automatic' };
  return { label, kind: 'unsupported', help: 'set from the command line' };
}

/** A typed-in number for a field, or null when it is not acceptable. */
export function readNumber(text: string, spec: FieldSpec): number | null {
  if (text.trim() === '') return null;
  const value = Number(text);
  if (!Number.isFinite(value)) return null;
  if (spec.kind === 'integer' && !Number.isInteger(value)) return null;
  if (spec.min !== undefined && value < spec.min) return null;
  return value;
}
