/** Report sections that close it: limitations and cautions, how to reproduce, the environment. */
import { html, type Html } from './html.ts';
import { normName } from './format.ts';
import { reproduceCommand } from './commandLine.ts';
import type { ReportContext } from './context.ts';

/** Limitations and cautions. */
export function limitationsSection(c: ReportContext): Html {
  const { run } = c.saved;
  return html`<section class="major" id="limitations"><h2>Limitations and cautions</h2>
<ul>
<li><strong>An upper bound, not a certificate.</strong> The searches are empirical: each flip found is real, but a sample they did not flip may still be flipped by a stronger or different search. The robust accuracy reported here is therefore an upper bound on the true robust accuracy, and it proves nothing about inputs that were not tested.</li>
<li><strong>Only this threat model.</strong> The numbers hold for ${normName(run.config.norm)} perturbations of at most the listed budgets on pixel values in [0, 1], with the stated preprocessing. Other norms, larger budgets, physical changes (lighting, viewpoint, occlusion, stickers, weather), natural distribution shift and corrupted inputs are not covered.</li>
<li><strong>Only these samples.</strong> The results describe ${run.samples.count} samples with the SHA-256 above. How well they represent the conditions the model will meet in use is for the reviewer to judge; the confidence intervals account for sampling only, not for an unrepresentative sample set.</li>
<li><strong>Only this model file.</strong> Any change to the weights, the preprocessing or the runtime is a different system and needs its own evaluation.</li>
<li><strong>Not a safety decision.</strong> This report is one piece of evidence. Whether the measured robustness is acceptable must be decided under the safety standards that apply to the product and by qualified review, not by this tool.</li>
</ul>
</section>`;
}

/** The command line that recreates the numbers. */
export function reproduceSection(c: ReportContext): Html {
  const command = reproduceCommand(c.saved);
  return html`<section class="major" id="reproduce"><h2>Reproducing these numbers</h2>
<p>${c.saved.origin === 'cli' ? 'The command that produced this run:' : 'This run was made in the workbench; the equivalent command line is:'}</p>
<pre id="reproduce-command"><code>${command.command}</code></pre>
<ul class="note">${command.notes.map((n) => html`<li>${n}</li>`)}</ul>
<p>It writes curve.csv, samples.csv, run.json and the saved run (run.brink.json) into the --out folder. With the same model and sample files, Brink version, seed and settings, curve.csv must equal the table in the section "Robust accuracy" row for row.</p>
</section>`;
}

/** Software, backend and times. */
export function environmentSection(c: ReportContext): Html {
  const { run } = c.saved;
  const b = run.backend;
  return html`<section class="major" id="environment"><h2>Environment</h2>
<dl class="facts">
<dt>Made in</dt><dd>${c.saved.origin === 'cli' ? 'the Brink command line' : 'the Brink workbench (browser)'}</dd>
<dt>Brink version</dt><dd>${run.brinkVersion}</dd>
<dt>TensorFlow.js version</dt><dd>${run.tfjsVersion}</dd>
<dt>Backend</dt><dd>${b.name}${b.name === 'wasm' ? `, SIMD ${b.simd ? 'on' : 'off'}, ${b.threads ? `${b.threadCount} threads` : 'single thread'}` : ''}${b.notice ? ` (${b.notice})` : ''}</dd>
<dt>Started</dt><dd>${run.startedAt}</dd>
<dt>Ended</dt><dd>${run.endedAt}</dd>
<dt>Saved</dt><dd>${c.saved.savedAt}</dd>
<dt>Complete</dt><dd>${run.complete ? 'yes' : 'no (cancelled)'}</dd>
</dl>
</section>`;
}
