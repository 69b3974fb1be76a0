/** Choices offered on the preprocessing screen, with the words the workbench shows for them. */
import type { InputRange, Layout, Preprocessing } from '../../core/types.ts';
import type { ResizeMode } from '../../core/samples/crop.ts';

export interface NormalisationPreset {
  readonly id: 'none' | 'half' | 'photo';
  readonly label: string;
  readonly hint: string;
  readonly mean: readonly number[];
  readonly std: readonly number[];
}

/** Mean/std presets. The per-channel values are the ones most photo-pretrained classifiers expect (common practice). */
export const NORMALISATION_PRESETS: readonly NormalisationPreset[] = [
  { id: 'none', label: 'None', hint: 'values go to the model unchanged', mean: [0], std: [1] },
  { id: 'half', label: 'Centred on one half', hint: 'mean 0.5, std 0.5 for every channel', mean: [0.5], std: [0.5] },
  {
    id: 'photo',
    label: 'Photo-pretrained, per channel',
    hint: 'mean 0.485, 0.456, 0.406 and std 0.229, 0.224, 0.225 (red, green, blue): what most classifiers pretrained on photographs expect, with the 0 to 1 range',
    mean: [0.485, 0.456, 0.406],
    std: [0.229, 0.224, 0.225],
  },
];

export const INPUT_RANGE_LABELS: Readonly<Record<InputRange, string>> = {
  '0,1': '0 to 1',
  '0,255': '0 to 255',
  '-1,1': '−1 to 1',
};

export const LAYOUT_LABELS: Readonly<Record<Layout, string>> = {
  nhwc: 'channels last (N, H, W, C)',
  nchw: 'channels first (N, C, H, W)',
};

/** Plain words for each resize mode (the preprocessing screen's select). */
export const RESIZE_LABELS: Readonly<Record<ResizeMode, string>> = {
  stretch: "stretch to the model's size",
  crop: 'crop the centre, keeping proportions',
};

function sameValues(a: readonly number[], b: readonly number[]): boolean {
  return a.length === b.length && a.every((v, i) => v === b[i]);
}

/** The preset whose mean and std equal these, or 'custom'. */
export function presetOf(pre: Pick<Preprocessing, 'mean' | 'std'>): NormalisationPreset['id'] | 'custom' {
  return NORMALISATION_PRESETS.find((p) => sameValues(p.mean, pre.mean) && sameValues(p.std, pre.std))?.id ?? 'custom';
}

/** The preprocessing with a preset's mean and std. */
export function withPreset(pre: Preprocessing, id: NormalisationPreset['id']): Preprocessing {
  const preset = NORMALISATION_PRESETS.find((p) => p.id === id);
  return preset === undefined ? pre : { ...pre, mean: [...preset.mean], std: [...preset.std] };
}
