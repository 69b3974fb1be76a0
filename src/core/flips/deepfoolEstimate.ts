/** DeepFool's flip-budget estimate (pending the DeepFool search). */
import type { BisectionRows } from './bisect.ts';
import type { EstimateInput } from './searches.ts';

/** Placeholder until attacks/deepfool.ts lands. */
export async function deepfoolEstimate(_input: EstimateInput, _options: Readonly<Record<string, unknown>>): Promise<BisectionRows> {
  throw new Error('deepfool is not available yet');
}
