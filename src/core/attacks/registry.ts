/**
 * The searches Brink offers, listed by hand (no discovery), in menu order. Adding one: see README.md.
 */
import type { AttackId, AttackMethod } from './types.ts';
import { fgsm, type FgsmOptions } from './fgsm.ts';
import { pgd, type PgdOptions } from './pgd.ts';
import { apgdCe, apgdDlr, type ApgdOptions } from './apgd.ts';
import { square, type SquareOptions } from './square.ts';
import { deepfool, type DeepFoolOptions } from './deepfool.ts';
import { noise, type NoiseOptions } from './noise.ts';

/** Every attack, in the order menus and the CLI list them. */
export const ATTACKS: readonly AttackMethod<unknown>[] = [fgsm, pgd, apgdCe, apgdDlr, square, deepfool, noise];

/** Options type of each attack id (for typed use, import the attack itself from its file). */
export interface AttackOptionsById {
  fgsm: FgsmOptions;
  pgd: PgdOptions;
  'apgd-ce': ApgdOptions;
  'apgd-dlr': ApgdOptions;
  square: SquareOptions;
  deepfool: DeepFoolOptions;
  noise: NoiseOptions;
}

/**
 * The attack with this id (throws for an unknown id, e.g. one read from a file). Options are
 * `unknown` here: pass them through the attack's own meta.validate() before run().
 */
export function getAttack(id: AttackId): AttackMethod<unknown> {
  const found = ATTACKS.find((a) => a.meta.id === id);
  if (!found) throw new Error(`Unknown attack "${String(id)}" (known: ${attackIds().join(', ')})`);
  return found;
}

/** The ids of all attacks, in registry order. */
export function attackIds(): AttackId[] {
  return ATTACKS.map((a) => a.meta.id);
}

/** Type guard for ids coming from configuration files or the command line. */
export function isAttackId(value: string): value is AttackId {
  return ATTACKS.some((a) => a.meta.id === value);
}
