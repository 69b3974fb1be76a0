/**
 * Verdicts of the health checks, computed from the evidence alone (no tensors), so each rule can be
 * read and tested on its own. The checks follow Carlini et al., "On Evaluating Adversarial
 * Robustness" (2019), and Athalye, Carlini & Wagner, "Obfuscated Gradients Give a False Sense of
 * Security" (ICML 2018).
 */
import type { HealthCheck, HealthCheckId, HealthEvidence, HealthStatus, PairedCount } from './types.ts';

/**
 * Differences between two searches on the same samples are tolerated up to one percentage point
 * (the bound for convergence, used for every paired comparison; common practice). One
 * sample more than that is a warning.
 */
export const SLACK_POINTS = 1;

/** Share of samples that must have a finite, non-zero input gradient (issue 5: 99 %). */
export const GRADIENT_SHARE = 0.99;

/** Share of saturated probability rows above which the saturation check warns (common practice: 1 %). */
export const SATURATION_SHARE = 0.01;

const TITLES: Readonly<Record<HealthCheckId, string>> = {
  monotone: 'Accuracy does not rise with ε',
  'large-budget': 'A large budget brings accuracy to chance',
  'iterative-vs-single-step': 'Iterative searches beat single-step ones',
  'gradient-free-vs-gradient': 'The gradient-free search is not stronger',
  convergence: 'More steps or restarts change little',
  gradients: 'Input gradients are finite and non-zero',
  noise: 'Random noise is weaker than the search',
  saturation: 'Probabilities do not saturate',
};

const pct = (count: number, total: number): string => `${total === 0 ? '0.0' : ((100 * count) / total).toFixed(1)} %`;
const beyondSlack = (count: number, total: number): boolean => count > (SLACK_POINTS / 100) * total;

function check(id: HealthCheckId, status: HealthStatus, detail: string, numbers: Record<string, number> = {}): HealthCheck {
  return { id, title: TITLES[id], status, detail, numbers };
}

/** All eight checks, in a fixed order. */
export function evaluateHealth(e: HealthEvidence): HealthCheck[] {
  return [monotone(e), largeBudget(e), singleStep(e), gradientFree(e), convergence(e), gradients(e), noise(e), saturation(e)];
}

function monotone(e: HealthEvidence): HealthCheck {
  const m = e.monotone;
  if (m === null || e.reference === null) return check('monotone', 'skip', 'No positive budget in the sweep.');
  if (m.flippedBefore === 0) return check('monotone', 'pass', `${e.reference} flipped no sample below ε = ${m.eps} that a fresh search at ε = ${m.eps} could miss.`, { eps: m.eps, flippedBefore: 0, resisted: 0 });
  const status = beyondSlack(m.resisted, e.samples) ? 'warn' : 'pass';
  const verdict = status === 'warn' ? 'accuracy would rise with ε (a search that does not use its budget, or masked gradients)' : 'within 1 point';
  return check('monotone', status, `A fresh ${e.reference} at ε = ${m.eps} left ${m.resisted} of the ${m.flippedBefore} samples flipped at smaller budgets unflipped (${pct(m.resisted, e.samples)} of all samples): ${verdict}.`, { eps: m.eps, flippedBefore: m.flippedBefore, resisted: m.resisted });
}

function largeBudget(e: HealthEvidence): HealthCheck {
  const l = e.largeBudget;
  if (l === null || e.reference === null) return check('large-budget', 'skip', 'No positive budget in the sweep.');
  const accuracy = e.samples === 0 ? 0 : l.robust / e.samples;
  const numbers = { eps: l.eps, robustAccuracy: accuracy, chance: e.constantShare };
  const where = `${e.reference} at ε = ${formatBudget(l.eps)} (within which every image can become flat grey)`;
  if (accuracy > e.constantShare) {
    return check('large-budget', 'warn', `${where} leaves ${pct(l.robust, e.samples)} robust, above the ${pct(e.constantShare * e.samples, e.samples)} a constant prediction gets: the search fails where a flat image would succeed.`, numbers);
  }
  return check('large-budget', 'pass', `${where} leaves ${pct(l.robust, e.samples)} robust, at or below the ${pct(e.constantShare * e.samples, e.samples)} of a constant prediction.`, numbers);
}

function singleStep(e: HealthEvidence): HealthCheck {
  if (e.singleStep.length === 0) return check('iterative-vs-single-step', 'skip', 'No positive budget in the sweep.');
  const worst = worstGap(e.singleStep, (p) => p.referenceRobust - p.otherRobust);
  const numbers = { eps: worst.eps, iterativeRobust: worst.referenceRobust, fgsmRobust: worst.otherRobust, samples: worst.samples };
  const line = `${worst.attack} leaves ${worst.referenceRobust} robust and FGSM ${worst.otherRobust} of ${worst.samples} at ε = ${worst.eps}`;
  if (beyondSlack(worst.referenceRobust - worst.otherRobust, worst.samples)) return check('iterative-vs-single-step', 'warn', `${line}: the single step is stronger (check the iterative search's step size, or masked gradients).`, numbers);
  return check('iterative-vs-single-step', 'pass', `${line} (the budget where FGSM comes closest).`, numbers);
}

function gradientFree(e: HealthEvidence): HealthCheck {
  const g = e.gradientFree;
  if (g === null || e.reference === null) return check('gradient-free-vs-gradient', 'skip', 'No positive budget in the sweep.');
  const numbers = { eps: g.eps, gradientRobust: g.referenceRobust, squareRobust: g.otherRobust, squareOnly: g.otherOnly, samples: g.samples };
  const line = `At ε = ${g.eps} Square leaves ${g.otherRobust} robust, ${e.reference} ${g.referenceRobust} of ${g.samples}; Square alone flips ${g.otherOnly}`;
  const stronger = beyondSlack(g.referenceRobust - g.otherRobust, g.samples) || beyondSlack(g.otherOnly, g.samples);
  if (stronger) return check('gradient-free-vs-gradient', 'warn', `${line}: a search without gradients does better, a sign of masked gradients.`, numbers);
  return check('gradient-free-vs-gradient', 'pass', `${line}.`, numbers);
}

function convergence(e: HealthEvidence): HealthCheck {
  const c = e.convergence;
  if (c === null || e.reference === null) return check('convergence', 'skip', 'No positive budget in the sweep.');
  if (c.doubledSteps === null && c.addedRestarts === null) return check('convergence', 'skip', `${e.reference} has neither steps nor random restarts to add.`, { eps: c.eps });
  const numbers: Record<string, number> = { eps: c.eps, referenceRobust: c.referenceRobust, samples: e.samples };
  const parts: string[] = [];
  if (c.doubledSteps !== null) {
    numbers['doubledStepsNewFlips'] = c.doubledSteps;
    parts.push(`doubled steps flip ${c.doubledSteps} more`);
  }
  if (c.addedRestarts !== null) {
    numbers['addedRestartsNewFlips'] = c.addedRestarts;
    parts.push(`two more restarts flip ${c.addedRestarts} more`);
  }
  const worst = Math.max(c.doubledSteps ?? 0, c.addedRestarts ?? 0);
  const line = `At ε = ${c.eps}, of ${c.referenceRobust} samples robust under ${e.reference}, ${parts.join(' and ')} (${pct(worst, e.samples)} of all samples)`;
  if (beyondSlack(worst, e.samples)) return check('convergence', 'warn', `${line}: the search has not converged; raise its steps or restarts.`, numbers);
  return check('convergence', 'pass', `${line}: within 1 point.`, numbers);
}

function gradients(e: HealthEvidence): HealthCheck {
  const g = e.gradients;
  if (g.samples === 0) return check('gradients', 'skip', 'No samples.');
  const good = g.samples - g.nonFinite - g.zero;
  const numbers = { samples: g.samples, nonFinite: g.nonFinite, zero: g.zero, share: good / g.samples };
  const line = `${pct(good, g.samples)} of ${g.samples} samples have a finite, non-zero cross-entropy gradient (${g.nonFinite} non-finite, ${g.zero} zero)`;
  if (good / g.samples < GRADIENT_SHARE) return check('gradients', 'warn', `${line}: below 99 %, so gradient searches are blind on the rest.`, numbers);
  return check('gradients', 'pass', `${line}.`, numbers);
}

function noise(e: HealthEvidence): HealthCheck {
  if (e.noise.length === 0 || e.reference === null) return check('noise', 'skip', 'No positive budget in the sweep.');
  const worst = worstGap(e.noise, (p) => p.referenceRobust - p.otherRobust);
  const numbers = { eps: worst.eps, noiseRobust: worst.otherRobust, searchRobust: worst.referenceRobust, samples: worst.samples };
  const line = `Random noise leaves ${worst.otherRobust} robust and ${e.reference} ${worst.referenceRobust} of ${worst.samples} at ε = ${worst.eps}`;
  if (beyondSlack(worst.referenceRobust - worst.otherRobust, worst.samples)) return check('noise', 'warn', `${line}: noise beats the search, a sign of masked gradients.`, numbers);
  return check('noise', 'pass', `${line} (the budget where noise comes closest).`, numbers);
}

function saturation(e: HealthEvidence): HealthCheck {
  const s = e.saturation;
  if (s === null) return check('saturation', 'skip', 'The model outputs probabilities but its raw outputs were not available to inspect.');
  const numbers = { rows: s.rows, topOne: s.topOne, saturatedRows: s.saturatedRows, share: s.rows === 0 ? 0 : s.saturatedRows / s.rows };
  if (s.outputKind === 'logits') {
    // Why report it: where p_y rounds to 1 the cross-entropy gradient loses its −∇z_y term (and its value is 0),
    // while margin-type losses on the logits keep their full gradient.
    return check('saturation', 'pass', `The model outputs logits, which the losses use directly; the softmax of ${s.topOne} of ${s.rows} clean rows (${pct(s.topOne, s.rows)}) rounds to exactly 1, where cross-entropy is weak and margin or DLR losses are not.`, numbers);
  }
  const line = `${s.saturatedRows} of ${s.rows} clean outputs (${pct(s.saturatedRows, s.rows)}) are float32 ones and zeros`;
  if (s.rows > 0 && s.saturatedRows / s.rows > SATURATION_SHARE) return check('saturation', 'warn', `${line}: their log-probabilities are flat, which starves every loss of gradient; evaluate the logits instead.`, numbers);
  return check('saturation', 'pass', `${line}.`, numbers);
}

/** The paired count with the largest gap (reference robust minus other robust); first on ties. */
function worstGap<T extends PairedCount>(items: readonly T[], gap: (p: T) => number): T {
  return items.reduce((worst, p) => (gap(p) > gap(worst) ? p : worst));
}

function formatBudget(eps: number): string {
  return Number.isInteger(eps) ? String(eps) : String(Number(eps.toPrecision(6)));
}
