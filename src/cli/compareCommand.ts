/** `brink compare <run-dir> <run-dir>... --out <dir>`: comparison.csv and comparison.svg. */
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { FlagTable, ParsedArgs } from './args.ts';
import { UsageError, formatUsage, requireValue } from './args.ts';
import { readSavedRun } from './savedRunFiles.ts';
import { compareRuns, type LabelledRun } from '../core/compare/compareRuns.ts';
import { compareCsv } from '../core/compare/compareCsv.ts';
import { comparisonSvg } from '../core/compare/compareChart.ts';

export const COMPARE_FLAGS: FlagTable = {
  out: { kind: 'string', placeholder: '<dir>', description: 'folder for comparison.csv and comparison.svg' },
  labels: { kind: 'string', placeholder: '<a,b,...>', description: 'names of the runs in tables and the chart (default: folder names)' },
  title: { kind: 'string', placeholder: '<text>', description: 'chart title' },
  help: { kind: 'boolean', description: 'show this text' },
};

export const COMPARE_USAGE = formatUsage('compare', '<run-dir> <run-dir> [...] --out <dir> [options]  (the first run is the baseline)', COMPARE_FLAGS);

/** Run the compare command; warnings go to stderr, the files into --out. */
export async function compareCommand(args: ParsedArgs): Promise<void> {
  if (args.flags.has('help')) {
    process.stdout.write(`${COMPARE_USAGE}\n`);
    return;
  }
  if (args.positional.length < 2) throw new UsageError('compare: give at least two run folders (the first is the baseline)');
  const outDir = requireValue(args, 'out');
  const labels = runLabels(args);
  const runs: LabelledRun[] = [];
  for (const [i, target] of args.positional.entries()) runs.push({ label: labels[i]!, run: (await readSavedRun(target)).run });
  const comparison = compareRuns(runs);
  const title = args.values.get('title');
  await mkdir(outDir, { recursive: true });
  await writeFile(path.join(outDir, 'comparison.csv'), compareCsv(comparison));
  await writeFile(path.join(outDir, 'comparison.svg'), `${comparisonSvg(runs, title !== undefined ? { title } : {})}\n`);
  for (const w of comparison.warnings) process.stderr.write(`brink: ${w.level === 'warning' ? 'not like for like' : 'note'} (${w.kind}): ${w.message}\n`);
  const warnings = comparison.warnings.filter((w) => w.level === 'warning').length;
  process.stderr.write(`brink: compared ${runs.length} runs at ${comparison.rows.length} points (difference intervals: Newcombe hybrid score, independent samples); ${warnings} warning${warnings === 1 ? '' : 's'}; wrote comparison.csv, comparison.svg to ${outDir}\n`);
}

/** --labels, or the folder names made unique. */
function runLabels(args: ParsedArgs): string[] {
  const given = args.values.get('labels');
  if (given !== undefined) {
    const labels = given.split(',').map((s) => s.trim());
    if (labels.length !== args.positional.length || labels.some((l) => l === '')) throw new UsageError(`--labels: give ${args.positional.length} non-empty names, one per run`);
    if (new Set(labels).size !== labels.length) throw new UsageError('--labels: names must differ');
    return labels;
  }
  const seen = new Map<string, number>();
  return args.positional.map((p) => {
    const base = path.basename(path.resolve(p)).replace(/\.brink\.json$/, '') || p;
    const n = (seen.get(base) ?? 0) + 1;
    seen.set(base, n);
    return n === 1 ? base : `${base}#${n}`;
  });
}
