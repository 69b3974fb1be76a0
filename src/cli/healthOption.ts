/**
 * `sweep --health`: after the sweep, run the health checks (adding the searches they need) and
 * write health.csv beside the other outputs.
 */
import { writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { FlagTable } from './args.ts';
import type { LoadedInputs } from './loadInputs.ts';
import { attackOptionsFor } from './sweepFlags.ts';
import { getAttack } from '../core/attacks/registry.ts';
import { makeLogitsFn } from '../core/models/pipeline.ts';
import { runHealthChecks } from '../core/health/runHealthChecks.ts';
import { healthCsv } from '../core/export/healthCsv.ts';
import type { SweepResult } from '../core/sweep/types.ts';
import type { LogitsFn } from '../core/types.ts';

export const HEALTH_FLAGS: FlagTable = {
  health: {
    kind: 'boolean',
    description: 'also run the health checks (extra searches: large budget, more steps and restarts, FGSM, noise, Square) and write health.csv',
  },
};

/** Run the checks on the finished sweep and write health.csv; returns the number of warnings. */
export async function writeHealthCsv(
  inputs: LoadedInputs,
  logits: LogitsFn,
  sweep: SweepResult,
  rawOptions: Readonly<Record<string, unknown>>,
  outDir: string,
): Promise<number> {
  const optionsFor = (id: 'square' | 'noise'): Record<string, unknown> => attackOptionsFor(getAttack(id).meta.defaults as object, rawOptions);
  const report = await runHealthChecks({
    logits,
    samples: inputs.samples,
    sweep,
    outputKind: inputs.model.description.outputKind,
    rawOutputs: makeLogitsFn(inputs.model, inputs.preprocessing, 'logits'),
    squareOptions: optionsFor('square'),
    noiseOptions: optionsFor('noise'),
    onStep: (what) => process.stderr.write(`brink: health: ran ${what}\n`),
  });
  await writeFile(path.join(outDir, 'health.csv'), healthCsv(report.checks));
  const warnings = report.checks.filter((c) => c.status === 'warn');
  for (const c of warnings) process.stderr.write(`brink: health warning (${c.id}): ${c.detail}\n`);
  return warnings.length;
}
