/**
 * `brink sweep`: load a model and a sample set from disk, run attacks × budgets through the
 * core's sweep, write curve.csv, samples.csv and run.json into --out.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, parseChoice, parseNumberList, requireValue } from './args.ts';
import { PREPROCESSING_FLAGS, RUN_FLAGS, SEARCH_FLAGS, attackOptionsFor, runSettingsFromFlags, searchOptionsFromFlags, targetFromFlag } from './sweepFlags.ts';
import { INPUT_FLAGS, loadInputsFromFlags, resizeFromFlags } from './loadInputs.ts';
import { startNodeBackend } from './nodePlatform.ts';
import { stderrProgress } from './progress.ts';
import { EXTRA_SEARCH_FLAGS, extraSearchOptionsFromFlags } from './searchOptionFlags.ts';
import { HEALTH_FLAGS, writeHealthCsv } from './healthOption.ts';
import { flipCollectorFor, writeSavedRun } from './savedRunFiles.ts';
import { getAttack, attackIds } from '../core/attacks/registry.ts';
import type { AttackId } from '../core/attacks/types.ts';
import { makeLogitsFn } from '../core/models/pipeline.ts';
import { runSweep } from '../core/sweep/runSweep.ts';
import type { SweepConfig } from '../core/sweep/types.ts';
import { curveCsv, samplesCsv } from '../core/export/curveCsv.ts';
import { runJson } from '../core/export/runRecord.ts';
import type { Norm } from '../core/types.ts';

export const SWEEP_FLAGS: FlagTable = {
  ...INPUT_FLAGS,
  attack: { kind: 'string', placeholder: '<id>[,...]', description: `searches to run at every budget: ${attackIds().join(', ')}` },
  norm: { kind: 'string', placeholder: 'linf|l2', description: 'threat model norm, in pixel units on [0,1]' },
  eps: { kind: 'string', placeholder: '<e1,e2,...>', description: 'budgets (e.g. 0,0.0078,0.0157 or 2/255 written as 0.00784)' },
  ...SEARCH_FLAGS,
  ...EXTRA_SEARCH_FLAGS,
  ...PREPROCESSING_FLAGS,
  ...HEALTH_FLAGS,
  ...RUN_FLAGS,
  out: { kind: 'string', placeholder: '<dir>', description: 'folder for curve.csv, samples.csv and run.json' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const SWEEP_USAGE = formatUsage('sweep', '--model <model.json> --samples <dir|csv> --attack fgsm,pgd --norm linf --eps 0.01,0.03 --out <dir> [options]', SWEEP_FLAGS);

const NORMS: readonly Norm[] = ['linf', 'l2'];

/** Run the sweep command; resolves when the files are written. */
export async function sweepCommand(args: ParsedArgs): Promise<void> {
  if (args.flags.has('help')) {
    process.stdout.write(`${SWEEP_USAGE}\n`);
    return;
  }
  if (args.positional.length > 0) throw new UsageError(`unexpected argument "${args.positional[0]}"`);
  const outDir = requireValue(args, 'out');
  const norm = parseChoice(requireValue(args, 'norm'), '--norm', NORMS);
  const epsText = requireValue(args, 'eps');
  const eps = parseNumberList(epsText, '--eps', { min: 0 });
  const attacks = parseAttackList(requireValue(args, 'attack'), norm);
  const { seed, batchSize, limit } = runSettingsFromFlags(args);
  resizeFromFlags(args); // a bad --resize fails before the backend starts

  const backend = await startNodeBackend();
  const inputs = await loadInputsFromFlags(args, limit);
  try {
    const target = targetFromFlag(args.values.get('target'), inputs.samples.classNames);
    const rawOptions = { ...searchOptionsFromFlags(args, target), ...extraSearchOptionsFromFlags(args) };
    const config: SweepConfig = {
      attacks: attacks.map((id) => {
        const attack = getAttack(id);
        return { id, options: attack.meta.validate(attackOptionsFor(attack.meta.defaults as object, rawOptions)) as Record<string, unknown> };
      }),
      norm,
      eps,
      epsLabels: epsText.split(',').map((s) => s.trim()),
      seed,
      batchSize,
    };
    const logits = makeLogitsFn(inputs.model, inputs.preprocessing);
    const collector = flipCollectorFor(inputs.samples);
    const result = await runSweep({ logits, samples: inputs.samples, config }, { onProgress: stderrProgress(), onAdversarial: collector.onAdversarial });
    await mkdir(outDir, { recursive: true });
    await writeFile(path.join(outDir, 'curve.csv'), curveCsv(result));
    await writeFile(path.join(outDir, 'samples.csv'), samplesCsv(result));
    const json = await runJson({
      result,
      modelFiles: inputs.modelFiles,
      sampleFiles: inputs.sampleFiles,
      preprocessing: inputs.preprocessing,
      resize: inputs.resize,
      model: inputs.model.description,
      classNames: inputs.samples.classNames,
      backend,
      commandLine: commandLine(),
    });
    await writeFile(path.join(outDir, 'run.json'), json);
    const health = args.flags.has('health') ? await writeHealthCsv(inputs, logits, result, rawOptions, outDir) : null;
    await writeSavedRun({ outDir, inputs, result, backend, commandLine: commandLine(), collector, health: health !== null });
    const written = health === null ? 'curve.csv, samples.csv, run.json, run.brink.json' : `curve.csv, samples.csv, run.json, run.brink.json, health.csv (${health} warning${health === 1 ? '' : 's'})`;
    process.stderr.write(`brink: clean accuracy ${(result.cleanAccuracy * 100).toFixed(2)} %; wrote ${written} to ${outDir}\n`);
  } finally {
    inputs.model.dispose();
  }
}

/** How this sweep was invoked, as recorded in run.json and the saved run. */
function commandLine(): string[] {
  return ['npm', 'run', '-s', 'cli', '--', 'sweep', ...process.argv.slice(3)];
}

function parseAttackList(text: string, norm: Norm): AttackId[] {
  const known = attackIds();
  const ids = text.split(',').map((s) => s.trim().toLowerCase());
  for (const id of ids) {
    if (!(known as readonly string[]).includes(id)) throw new UsageError(`--attack: unknown search "${id}" (known: ${known.join(', ')})`);
    if (!getAttack(id as AttackId).meta.norms.includes(norm)) throw new UsageError(`--attack: ${id} does not support --norm ${norm}`);
  }
  if (new Set(ids).size !== ids.length) throw new UsageError('--attack: a search is listed twice');
  return ids as AttackId[];
}
