/**
 * health.csv and flips.csv on the exports screen: when each button is offered, and that the text
 * has the column layout the CLI's files have (headers as the command line documents them).
 */
import { describe, expect, it } from 'vitest';
import type { HealthCheck } from '../../src/core/health/types.ts';
import type { FlipRecord } from '../../src/core/flips/types.ts';
import type { HealthReport } from '../../src/core/health/runHealthChecks.ts';
import type { FlipsReply } from '../../src/worker/protocol.ts';
import { IDLE_RUN } from '../../src/ui/store/state.ts';
import { IDLE_FLIPS, IDLE_HEALTH, flipsStarted, healthStarted } from '../../src/ui/store/analysis.ts';
import { flipsCsvText, flipsCsvUnavailable, flipsCsvWhat, healthCsvText, healthCsvUnavailable } from '../../src/ui/lib/analysisExports.ts';

const checks: HealthCheck[] = [
  { id: 'monotone', title: 'Monotone', status: 'pass', detail: 'no sample resisted at the largest budget (0 of 12)', numbers: {} },
  { id: 'noise', title: 'Noise', status: 'warn', detail: 'noise flips 3, PGD 1, at ε = 0.1', numbers: {} },
];
const sweptRun = { ...IDLE_RUN, status: 'done' as const, id: 2, result: { curve: [] } as never };

describe('health.csv on the exports screen', () => {
  it('is offered only for the finished checks of the current sweep', () => {
    expect(healthCsvUnavailable({ run: IDLE_RUN, health: IDLE_HEALTH })).toBe('needs a sweep and its health checks');
    expect(healthCsvUnavailable({ run: sweptRun, health: IDLE_HEALTH })).toBe('run the health checks first (results screen)');
    expect(healthCsvUnavailable({ run: sweptRun, health: healthStarted(2) })).toBe('the health checks are still running');
    const done = { ...healthStarted(2), status: 'done' as const, report: { checks } as unknown as HealthReport };
    expect(healthCsvUnavailable({ run: sweptRun, health: done })).toBeNull();
    // Checks of an earlier sweep (run 1) do not describe run 2.
    expect(healthCsvUnavailable({ run: sweptRun, health: { ...done, runId: 1 } })).not.toBeNull();
    expect(() => healthCsvText({ run: sweptRun, health: { ...done, runId: 1 } })).toThrow(/No health\.csv/);
    // RFC 4180: the detail with a comma is quoted.
    expect(healthCsvText({ run: sweptRun, health: done })).toBe('check,status,detail\nmonotone,pass,no sample resisted at the largest budget (0 of 12)\nnoise,warn,"noise flips 3, PGD 1, at ε = 0.1"\n');
  });
});

describe('flips.csv on the exports screen', () => {
  const record = (index: number, flipEps: number | null, advPred: number): FlipRecord => ({ index, file: `c/${index}.png`, label: 1, cleanPred: flipEps === 0 ? 0 : 1, flipEps, failedEps: 0, advPred, probes: 3 });
  const records = [record(4, 0.0123456789, 0), record(9, null, 1), record(17, 0, 0)];
  const reply = (complete: boolean) => ({ result: { records, complete }, totalSamples: 204 }) as unknown as FlipsReply;

  it('is offered once a measurement has ended, also when it was stopped early', () => {
    expect(flipsCsvUnavailable({ flips: IDLE_FLIPS })).toBe('measure flip budgets first (results screen)');
    expect(flipsCsvUnavailable({ flips: { ...flipsStarted(IDLE_FLIPS, 's'), reply: reply(true) } })).toBe('flip budgets are still being measured');
    const stopped = { ...IDLE_FLIPS, status: 'cancelled' as const, reply: reply(false) };
    expect(flipsCsvUnavailable({ flips: stopped })).toBeNull();
    expect(flipsCsvWhat({ flips: stopped })).toMatch(/; 3 of 204 images, stopped early$/);
  });

  it('writes one row per image measured: six decimals, 0 for wrong clean, empty for never flipped', () => {
    const text = flipsCsvText({ flips: { ...IDLE_FLIPS, status: 'done', reply: reply(true) } });
    expect(text).toBe('file,label,clean_pred,flip_eps,adv_pred\nc/4.png,1,1,0.012346,0\nc/9.png,1,1,,1\nc/17.png,1,0,0,0\n');
    expect(() => flipsCsvText({ flips: IDLE_FLIPS })).toThrow(/No flips\.csv/);
  });
});
