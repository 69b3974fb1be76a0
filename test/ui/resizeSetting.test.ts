/** The workbench's resize mode persists with the other settings; an unknown stored value falls back to the default. */
import { describe, expect, it } from 'vitest';
import { mergePersisted } from '../../src/ui/store/workspace.ts';
import { initialState } from '../../src/ui/store/state.ts';
import { RESIZE_LABELS } from '../../src/ui/lib/presets.ts';
import { RESIZE_MODES } from '../../src/core/samples/crop.ts';

type Current = Parameters<typeof mergePersisted>[1];

describe('persisted resize mode', () => {
  const current = initialState() as unknown as Current;

  it('starts as stretch (the behaviour before resize modes existed)', () => {
    expect(initialState().resize).toBe('stretch');
  });

  it('keeps a stored crop, and treats a missing or unknown value as stretch', () => {
    expect(mergePersisted({ resize: 'crop' }, current).resize).toBe('crop');
    expect(mergePersisted({ plan: { seed: 1 } }, current).resize).toBe('stretch');
    expect(mergePersisted({ resize: 'squash' }, current).resize).toBe('stretch');
  });

  it('has plain words for every mode', () => {
    expect(Object.keys(RESIZE_LABELS)).toEqual([...RESIZE_MODES]);
    expect(RESIZE_LABELS).toEqual({ stretch: "stretch to the model's size", crop: 'crop the centre, keeping proportions' });
  });
});
