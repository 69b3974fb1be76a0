/**
 * Report sections about what was evaluated and how: purpose and scope, model and sample
 * identification, threat model, and every search with all its settings.
 */
import { getAttack } from '../attacks/registry.ts';
import type { TargetMode } from '../attacks/types.ts';
import type { ResizeMode } from '../samples/crop.ts';
import { greyLevels, normName, percent } from './format.ts';
import { html, type Html } from './html.ts';
import { attackLabel, className, type ReportContext } from './context.ts';

const DEFAULT_PURPOSE =
  'This report records an empirical robustness evaluation of an image classifier: how its accuracy on a labelled sample set falls when every image may be changed by a small perturbation, chosen by a search that tries to make the model misclassify it.';

/** Purpose and scope. `purpose` replaces the default first paragraph when given. */
export function purposeSection(c: ReportContext, purpose: string | undefined): Html {
  const { run } = c.saved;
  const positive = run.config.eps.filter((e) => e > 0).length;
  return html`<section class="major" id="purpose"><h2>Purpose and scope</h2>
<p>${purpose ?? DEFAULT_PURPOSE}</p>
<p>Scope: ${run.samples.count} samples in ${c.classNames.length} classes; the ${normName(run.config.norm)} threat model at ${run.config.eps.length} budgets (${positive} above zero); ${c.attacks.length} search${c.attacks.length === 1 ? '' : 'es'} (${c.attacks.map(attackLabel).join(', ')}). Clean accuracy: ${percent(run.samples.cleanAccuracy)} (${run.samples.cleanCorrect} of ${run.samples.count}).</p>
${run.complete ? '' : html`<p class="callout warn">This run was cancelled before it finished: only the curve points listed below were measured.</p>`}
</section>`;
}

/** Model and sample identification: hashes, counts, classes. */
export function identificationSection(c: ReportContext): Html {
  const { run } = c.saved;
  const d = run.model.description;
  const counts = classCounts(c);
  return html`<section class="major" id="identification"><h2>Model and samples</h2>
<h3>Model</h3>
<dl class="facts">
<dt>Model SHA-256</dt><dd class="hash">${run.model.sha256}</dd>
${d ? html`<dt>Format</dt><dd>${d.format === 'layers' ? 'TensorFlow.js layers model' : d.format === 'graph' ? 'TensorFlow.js graph model' : 'ONNX'}${d.onnx ? ` (opset ${d.onnx.opset}, producer ${d.onnx.producer || 'unknown'})` : ''}</dd>
<dt>Input</dt><dd>${d.height}×${d.width}×${d.channels} (${d.layout.toUpperCase()}; declared shape [${d.inputShape.map((v) => (v === null ? '?' : String(v))).join(', ')}])</dd>
<dt>Output</dt><dd>${d.numClasses} classes, ${d.outputKind === 'logits' ? 'raw scores (logits)' : 'probabilities (the log is taken for losses)'}</dd>
<dt>Parameters</dt><dd>${d.parameterCount.toLocaleString('en-US')}</dd>
${d.notes.length > 0 ? html`<dt>Notes</dt><dd>${d.notes.join(' ')}</dd>` : ''}` : ''}
</dl>
<table><thead><tr><th>Model file</th><th>SHA-256</th></tr></thead><tbody>
${run.model.files.map((f) => html`<tr><td>${f.name}</td><td class="hash">${f.sha256}</td></tr>`)}
</tbody></table>
<p class="note">The model SHA-256 is the hash of the listing "&lt;file SHA-256&gt;  &lt;name&gt;" (one line per file, sorted by name), the layout of sha256sum's output, so it can be recomputed with standard tools.</p>
<h3>Samples</h3>
<dl class="facts">
<dt>Sample set SHA-256</dt><dd class="hash">${run.samples.sha256}</dd>
<dt>Files hashed</dt><dd>${run.samples.files} (images and manifest, if any)</dd>
<dt>Samples evaluated</dt><dd>${run.samples.count}</dd>
<dt>Image size seen by the model</dt><dd>${c.saved.imageSize.height}×${c.saved.imageSize.width}×${c.saved.imageSize.channels}</dd>
<dt>Resizing</dt><dd>${resizeDescription(run.samples.resize)}</dd>
<dt>Clean accuracy</dt><dd>${run.samples.cleanCorrect} of ${run.samples.count} correct (${run.samples.cleanAccuracy.toFixed(6)})</dd>
</dl>
<table><thead><tr><th class="num">Index</th><th>Class</th><th class="num">Samples</th><th class="num">Correct clean</th></tr></thead><tbody>
${c.classNames.map((name, i) => html`<tr><td class="num">${i}</td><td>${name}</td><td class="num">${counts.samples[i] ?? 0}</td><td class="num">${counts.correct[i] ?? 0}</td></tr>`)}
</tbody></table>
</section>`;
}

function classCounts(c: ReportContext): { samples: number[]; correct: number[] } {
  const samples = c.classNames.map(() => 0);
  const correct = c.classNames.map(() => 0);
  for (const r of c.saved.records) {
    samples[r.label] = (samples[r.label] ?? 0) + 1;
    if (r.cleanPred === r.label) correct[r.label] = (correct[r.label] ?? 0) + 1;
  }
  return { samples, correct };
}

/** Threat model: norm, budgets in pixel units and as k/255, preprocessing. */
export function threatModelSection(c: ReportContext): Html {
  const { config, preprocessing } = c.saved.run;
  const size = c.saved.imageSize;
  const values = size.height * size.width * size.channels;
  const meaning =
    config.norm === 'linf'
      ? 'L∞: every pixel value may move by at most ε, independently of the others.'
      : `L2: the Euclidean length of the whole perturbation, over all ${values} pixel values, is at most ε.`;
  return html`<section class="major" id="threat-model"><h2>Threat model</h2>
<p>Perturbations δ = x′ − x are measured on pixel values in [0, 1], before the model's preprocessing, and the perturbed image x′ stays in [0, 1]. ${meaning} A budget of k/255 corresponds to k grey levels of an 8-bit image.</p>
<table><thead><tr><th>Norm</th><th class="num">ε (pixel units)</th><th class="num">ε as k/255</th></tr></thead><tbody>
${[...config.eps].sort((a, b) => a - b).map((e) => html`<tr><td>${normName(config.norm)}</td><td class="num">${c.eps(e)}</td><td class="num">${greyLevels(e)}</td></tr>`)}
</tbody></table>
<h3>Preprocessing (part of the attacked function)</h3>
<dl class="facts">
<dt>Input range</dt><dd>${preprocessing.inputRange}</dd>
<dt>Mean</dt><dd>${preprocessing.mean.join(', ')}</dd>
<dt>Standard deviation</dt><dd>${preprocessing.std.join(', ')}</dd>
<dt>Layout</dt><dd>${preprocessing.layout.toUpperCase()}</dd>
</dl>
</section>`;
}

/** Every search with all its settings, plus the seed and batch size. */
export function searchesSection(c: ReportContext): Html {
  const { config } = c.saved.run;
  return html`<section class="major" id="searches"><h2>Searches and their settings</h2>
<p>Seed ${config.seed}; ${config.batchSize} samples per batch (random streams are drawn per search, budget and batch, so both settings matter for exact reproduction). Budgets of one search are nested: a sample flipped at ε counts as flipped at every larger ε. Samples misclassified clean count as not robust and are not attacked.</p>
${config.attacks.map((a) => {
    const meta = getAttack(a.id).meta;
    const entries = Object.entries(a.options).sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0));
    return html`<h3>${meta.label} <span class="mono">(${a.id})</span></h3>
<p class="note">${meta.summary}</p>
<table><thead><tr><th>Setting</th><th>Value</th></tr></thead><tbody>
${entries.length === 0 ? html`<tr><td colspan="2">no settings</td></tr>` : entries.map(([key, value]) => html`<tr><td class="mono">${key}</td><td>${optionText(c, key, value)}</td></tr>`)}
</tbody></table>`;
  })}
</section>`;
}

function optionText(c: ReportContext, key: string, value: unknown): string {
  if (value === null) return key === 'stepSize' ? 'automatic (2.5·ε / steps)' : 'automatic (the search\'s default rule)';
  if (key === 'target' && typeof value === 'object') {
    const t = value as TargetMode;
    if (t.kind === 'untargeted') return 'untargeted (any wrong class)';
    if (t.kind === 'least-likely') return "targeted: each sample's least-likely clean class";
    return `targeted: class ${t.classIndex} (${className(c, t.classIndex)})`;
  }
  return typeof value === 'object' ? JSON.stringify(value) : String(value);
}

/** Plain words for how the images were brought to the model's size (absent: stretched, the default). */
function resizeDescription(mode: ResizeMode | undefined): string {
  return mode === 'crop'
    ? "centre cropped to the model's proportions, then resized bilinearly (the borders of the longer side are not seen)"
    : "stretched to the model's size with bilinear resizing (proportions may change)";
}
