/**
 * Checks shared by the attacks' validate(): options arrive from JSON, the command line or the UI,
 * so every value is checked at run time and an error names the attack, the option and the value.
 */
import type { LossKind, TargetMode } from './types.ts';

/** Throws unless every key of `options` is one of `known`. */
export function rejectUnknownOptions(attack: string, options: object, known: readonly string[]): void {
  for (const key of Object.keys(options)) {
    if (!known.includes(key)) throw new Error(`${attack}: unknown option "${key}" (known: ${known.join(', ')})`);
  }
}

/** A positive integer option. */
export function checkPositiveInteger(attack: string, name: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 1) {
    throw new Error(`${attack}: ${name} must be a positive integer (got ${describe(value)})`);
  }
  return value;
}

/** A finite number > 0, or null when the option allows an automatic value. */
export function checkPositiveOrNull(attack: string, name: string, value: unknown): number | null {
  if (value === null) return null;
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new Error(`${attack}: ${name} must be a finite number > 0 or null (got ${describe(value)})`);
  }
  return value;
}

/** A boolean option. */
export function checkBoolean(attack: string, name: string, value: unknown): boolean {
  if (typeof value !== 'boolean') throw new Error(`${attack}: ${name} must be true or false (got ${describe(value)})`);
  return value;
}

/** The loss option: 'ce' or 'margin'. */
export function checkLoss(attack: string, value: unknown): LossKind {
  if (value !== 'ce' && value !== 'margin') throw new Error(`${attack}: loss must be "ce" or "margin" (got ${describe(value)})`);
  return value;
}

/** The target option (the class index is checked against the model's class count at run time). */
export function checkTarget(attack: string, value: unknown): TargetMode {
  const kind = typeof value === 'object' && value !== null ? (value as { kind?: unknown }).kind : undefined;
  if (kind === 'untargeted' || kind === 'least-likely') return { kind };
  if (kind === 'class') {
    const classIndex = (value as { classIndex?: unknown }).classIndex;
    if (typeof classIndex !== 'number' || !Number.isInteger(classIndex) || classIndex < 0) {
      throw new Error(`${attack}: target.classIndex must be an integer ≥ 0 (got ${describe(classIndex)})`);
    }
    return { kind, classIndex };
  }
  throw new Error(`${attack}: target must be { kind: "untargeted" | "least-likely" } or { kind: "class", classIndex } (got ${describe(value)})`);
}

function describe(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'object' && value !== null) return JSON.stringify(value);
  return String(value);
}
