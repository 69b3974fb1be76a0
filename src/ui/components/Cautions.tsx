/** What a robustness curve from an attack does and does not show; always beside the results. */
import type { ReactElement } from 'react';

/** The cautions box. */
export function Cautions(): ReactElement {
  return (
    <aside className="cautions" data-testid="cautions">
      <h3>Read these numbers with care</h3>
      <ul>
        <li>
          An attack finds changes that fool the model; it cannot prove none exist. Each robust accuracy here is an <strong>upper bound</strong>: a stronger search may find more flips.
        </li>
        <li>It holds only for this threat model (this norm, these budgets, in pixel units), this preprocessing and these sample images.</li>
        <li>It is not a certificate of robustness.</li>
        <li>Whether a model is fit for use is decided under the applicable safety standards and by qualified review, not by this chart.</li>
      </ul>
    </aside>
  );
}
