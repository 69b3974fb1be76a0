import { describe, expect, it } from 'vitest';
import { IDLE_FLIPS, IDLE_HEALTH, flipsEnded, flipsFailed, flipsProgressed, flipsStarted, healthEnded, healthStarted, healthStepped, healthStopped } from '../../src/ui/store/analysis.ts';
import type { FlipsReply } from '../../src/worker/protocol.ts';
import type { HealthReport } from '../../src/core/health/runHealthChecks.ts';

const report = { checks: [], evidence: {} } as unknown as HealthReport;
const reply = (complete: boolean): FlipsReply => ({ result: { complete } } as unknown as FlipsReply);

describe('health and flip-budget transitions', () => {
  it('health checks belong to one sweep and ignore reports for another', () => {
    const running = healthStarted(3);
    expect(running).toMatchObject({ status: 'running', runId: 3, steps: [], report: null });
    const stepped = healthStepped(running, 3, 'pgd at the flat-grey budget');
    expect(stepped.steps).toEqual(['pgd at the flat-grey budget']);
    expect(healthStepped(running, 2, 'old')).toBe(running);
    expect(healthEnded(stepped, 3, report)).toMatchObject({ status: 'done', report });
    expect(healthEnded(stepped, 4, report)).toBe(stepped);
    expect(healthStopped(stepped, 3, true, 'Cancelled on request.')).toMatchObject({ status: 'cancelled', error: null });
    expect(healthStopped(stepped, 3, false, 'boom')).toMatchObject({ status: 'failed', error: 'boom' });
    expect(healthEnded(IDLE_HEALTH, 0, report)).toBe(IDLE_HEALTH);
  });

  it('a flip-budget run ends done, or cancelled when the worker sends back a partial result', () => {
    const running = flipsStarted({ ...IDLE_FLIPS, id: 5, error: 'old' }, 'model m; images s');
    expect(running).toMatchObject({ status: 'running', id: 6, error: null, reply: null, subject: 'model m; images s' });
    const p = { done: 2, total: 4, probes: 9 };
    expect(flipsProgressed(running, 6, p).progress).toEqual(p);
    expect(flipsProgressed(running, 5, p)).toBe(running);
    expect(flipsEnded(running, 6, reply(true)).status).toBe('done');
    expect(flipsEnded(running, 6, reply(false)).status).toBe('cancelled');
    expect(flipsFailed(running, 6, 'boom')).toMatchObject({ status: 'failed', error: 'boom' });
    expect(flipsFailed(running, 7, 'boom')).toBe(running);
  });
});
