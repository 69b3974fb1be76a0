import { describe, expect, it } from 'vitest';
import { IDLE_RUN, preprocessingForModel, runEnded, runFailed, runPointAdded, runProgressed, runStarted } from '../../src/ui/store/state.ts';
import { mergePersisted } from '../../src/ui/store/workspace.ts';
import type { SweepResult } from '../../src/core/sweep/types.ts';
import { DEMO_PLAN } from '../../src/ui/lib/plan.ts';

const progress = { done: 5, total: 10, rate: 2, attack: 'pgd' as const, eps: 0.01 };

function result(complete: boolean): SweepResult {
  return { config: { attacks: [], norm: 'linf', eps: [0], seed: 0, batchSize: 1 }, cleanAccuracy: 1, cleanCorrect: 1, samples: 1, curve: [], records: [], complete, startedAt: '', endedAt: '' };
}

describe('run transitions', () => {
  it('a run starts clean, takes its own events and ends done or cancelled', () => {
    const running = runStarted({ ...IDLE_RUN, id: 3, error: 'old' }, 1000, true, ['a']);
    expect(running).toMatchObject({ status: 'running', id: 4, startedAt: 1000, error: null, result: null, fromDemo: true });
    const moved = runProgressed(running, 4, progress, 1500);
    expect(moved.progress).toEqual(progress);
    expect(moved.elapsedMs).toBe(500);
    expect(runPointAdded(moved, 4, result(false), 1600).result?.complete).toBe(false);
    expect(runEnded(moved, 4, result(true), 2000).status).toBe('done');
    expect(runEnded(moved, 4, result(false), 2000).status).toBe('cancelled');
    expect(runFailed(moved, 4, 'boom', 2000)).toMatchObject({ status: 'failed', error: 'boom' });
  });

  it('ignores events of an earlier run', () => {
    const running = runStarted(IDLE_RUN, 0, false, []);
    expect(runProgressed(running, running.id - 1, progress, 5)).toBe(running);
    expect(runEnded(running, running.id + 1, result(true), 5)).toBe(running);
  });
});

describe('persisted settings', () => {
  it('fills fields an older version did not store and keeps what was stored', () => {
    const current = { plan: DEMO_PLAN, preprocessingByModel: {} } as unknown as Parameters<typeof mergePersisted>[1];
    const merged = mergePersisted({ plan: { seed: 7 } }, current);
    expect(merged.plan).toEqual({ ...DEMO_PLAN, seed: 7 });
    expect(mergePersisted('garbage', current)).toBe(current);
  });

  it('remembers the preprocessing per model', () => {
    const mine = { inputRange: '0,255' as const, mean: [0], std: [1], layout: 'nhwc' as const };
    const suggested = { inputRange: '0,1' as const, mean: [0], std: [1], layout: 'nhwc' as const };
    expect(preprocessingForModel({ m: mine }, 'm', suggested)).toBe(mine);
    expect(preprocessingForModel({ m: mine }, 'other', suggested)).toBe(suggested);
  });
});
