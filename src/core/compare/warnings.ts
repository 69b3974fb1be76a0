/**
 * When two runs are not like for like: differences in samples, preprocessing, threat model or search
 * settings make a difference in robust accuracy mean something other than a difference between
 * models. Differences in software or backend are reported as notes.
 */
import type { SavedRun } from '../savedRun/types.ts';
import type { LabelledRun } from './compareRuns.ts';
import { DEFAULT_RESIZE } from '../samples/crop.ts';

export type WarningKind = 'samples' | 'preprocessing' | 'threat-model' | 'search' | 'incomplete' | 'environment' | 'model';

export interface ComparisonWarning {
  /** 'warning': not like for like; 'note': worth knowing, comparison still fair. */
  readonly level: 'warning' | 'note';
  readonly kind: WarningKind;
  readonly message: string;
}

const short = (sha: string): string => sha.slice(0, 12);

/** Every difference between the baseline and another run that bears on the comparison. */
export function comparisonWarnings(base: LabelledRun, other: LabelledRun): ComparisonWarning[] {
  const a = base.run.run;
  const b = other.run.run;
  const between = `${base.label} and ${other.label}`;
  const out: ComparisonWarning[] = [];
  const warn = (kind: WarningKind, message: string): void => void out.push({ level: 'warning', kind, message });
  const note = (kind: WarningKind, message: string): void => void out.push({ level: 'note', kind, message });

  if (a.samples.sha256 !== b.samples.sha256) warn('samples', `${between} used different samples (sample set SHA-256 ${short(a.samples.sha256)}… vs ${short(b.samples.sha256)}…).`);
  if (a.samples.count !== b.samples.count) warn('samples', `${between} evaluated different numbers of samples (${a.samples.count} vs ${b.samples.count}).`);
  const resizeA = a.samples.resize ?? DEFAULT_RESIZE;
  const resizeB = b.samples.resize ?? DEFAULT_RESIZE;
  if (resizeA !== resizeB) warn('samples', `${between} brought the images to the model's size differently (${resizeA} vs ${resizeB}), so the models saw different pixels.`);
  if (JSON.stringify(a.preprocessing) !== JSON.stringify(b.preprocessing)) warn('preprocessing', `${between} used different preprocessing (${describePre(base.run)} vs ${describePre(other.run)}).`);
  if (a.config.norm !== b.config.norm) warn('threat-model', `${between} used different norms (${a.config.norm} vs ${b.config.norm}); no point is compared.`);
  const budgetsA = new Set(a.config.eps);
  const budgetsB = new Set(b.config.eps);
  const onlyA = [...budgetsA].filter((e) => !budgetsB.has(e));
  const onlyB = [...budgetsB].filter((e) => !budgetsA.has(e));
  if (onlyA.length + onlyB.length > 0) warn('threat-model', `${between} used different budgets${onlyA.length ? `; only in ${base.label}: ${onlyA.join(', ')}` : ''}${onlyB.length ? `; only in ${other.label}: ${onlyB.join(', ')}` : ''}.`);
  searchWarnings(base, other, between, warn, note);
  if (a.config.seed !== b.config.seed) warn('search', `${between} used different seeds (${a.config.seed} vs ${b.config.seed}): randomised searches drew different random starts.`);
  if (a.config.batchSize !== b.config.batchSize) warn('search', `${between} used different batch sizes (${a.config.batchSize} vs ${b.config.batchSize}): random streams are drawn per batch, so randomised searches drew different numbers.`);
  if (!a.complete) warn('incomplete', `${base.label} was cancelled before it finished.`);
  if (!b.complete) warn('incomplete', `${other.label} was cancelled before it finished.`);
  if (a.model.sha256 === b.model.sha256) note('model', `${between} evaluated the same model (SHA-256 ${short(a.model.sha256)}…).`);
  if (a.brinkVersion !== b.brinkVersion || a.tfjsVersion !== b.tfjsVersion) note('environment', `${between} ran different software (Brink ${a.brinkVersion} / tfjs ${a.tfjsVersion} vs Brink ${b.brinkVersion} / tfjs ${b.tfjsVersion}).`);
  if (a.backend.name !== b.backend.name) note('environment', `${between} ran on different backends (${a.backend.name} vs ${b.backend.name}).`);
  return out;
}

function describePre(saved: SavedRun): string {
  const p = saved.run.preprocessing;
  return `range ${p.inputRange}, mean ${p.mean.join('/')}, std ${p.std.join('/')}, ${p.layout}`;
}

function searchWarnings(base: LabelledRun, other: LabelledRun, between: string, warn: (k: 'search', m: string) => void, note: (k: 'search', m: string) => void): void {
  const attacksA = base.run.run.config.attacks;
  const attacksB = other.run.run.config.attacks;
  for (const sa of attacksA) {
    const sb = attacksB.find((x) => x.id === sa.id);
    if (sb === undefined) {
      note('search', `${sa.id} ran only in ${base.label}.`);
      continue;
    }
    const keys = [...new Set([...Object.keys(sa.options), ...Object.keys(sb.options)])].sort();
    const differing = keys.filter((k) => JSON.stringify(sa.options[k]) !== JSON.stringify(sb.options[k]));
    if (differing.length > 0) {
      const detail = differing.map((k) => `${k} ${JSON.stringify(sa.options[k]) ?? 'unset'} vs ${JSON.stringify(sb.options[k]) ?? 'unset'}`).join('; ');
      warn('search', `${sa.id} ran with different settings in ${between}: ${detail}.`);
    }
  }
  for (const sb of attacksB) if (!attacksA.some((x) => x.id === sb.id)) note('search', `${sb.id} ran only in ${other.label}.`);
}
