/**
 * Flags for the options of the searches beyond PGD's (Square, random noise, DeepFool), and their
 * translation into attack options. Each search keeps the options it declares (attackOptionsFor).
 */
import type { FlagTable, ParsedArgs } from './args.ts';
import { parseNumber } from './args.ts';

export const EXTRA_SEARCH_FLAGS: FlagTable = {
  queries: { kind: 'string', placeholder: '<Q>', description: 'square: forward passes per sample, the start included (default 1000)' },
  'p-init': { kind: 'string', placeholder: '<p>', description: 'square: initial share of the image a square covers, in (0,1] (default 0.8 L∞, 0.3 L2)' },
  draws: { kind: 'string', placeholder: '<D>', description: 'noise: random perturbations tried per sample (default 10)' },
  'top-k': { kind: 'string', placeholder: '<K>', description: 'deepfool: classes linearised, the true class included (default 10)' },
  overshoot: { kind: 'string', placeholder: '<o>', description: 'deepfool: the step is scaled by 1 + o to cross the boundary (default 0.02)' },
  'max-iterations': { kind: 'string', placeholder: '<N>', description: 'deepfool: linearisation steps before giving up (default 50)' },
};

/** Raw options from the flags above, under the option names the searches declare. */
export function extraSearchOptionsFromFlags(args: ParsedArgs): Record<string, unknown> {
  const options: Record<string, unknown> = {};
  const number = (flag: string, option: string, rules: { integer?: boolean; positive?: boolean; min?: number }): void => {
    const text = args.values.get(flag);
    if (text !== undefined) options[option] = parseNumber(text, `--${flag}`, rules);
  };
  number('queries', 'queries', { integer: true, positive: true });
  number('p-init', 'pInit', { positive: true });
  number('draws', 'draws', { integer: true, positive: true });
  number('top-k', 'topK', { integer: true, min: 2 });
  number('overshoot', 'overshoot', { min: 0 });
  number('max-iterations', 'maxIterations', { integer: true, positive: true });
  return options;
}
