/**
 * The flipped images a saved run carries: its PNG thumbnails (clean and changed, 8 bits per
 * channel), per search, with the labels and the budget that first flipped each one.
 */
import { useMemo, useState, type ReactElement } from 'react';
import type { AttackId } from '../../core/attacks/types.ts';
import type { FlipThumbnail, SavedRun } from '../../core/savedRun/types.ts';
import { attackLabel } from '../lib/figure.ts';
import { AttackSelect } from './AttackSelect.tsx';
import { describeEps, formatEps } from '../lib/budgets.ts';
import { percent } from '../lib/format.ts';

function Thumbnail({ flip, names, norm }: { flip: FlipThumbnail; names: readonly string[]; norm: string }): ReactElement {
  const name = (i: number): string => names[i] ?? `class ${i}`;
  return (
    <li className="flip saved-flip">
      <div className="triple">
        <figure>
          <img className="pixels saved-thumb" src={`data:image/png;base64,${flip.originalPng}`} alt={`${flip.file}, original`} />
          <figcaption>original</figcaption>
        </figure>
        <figure>
          <img className="pixels saved-thumb" src={`data:image/png;base64,${flip.adversarialPng}`} alt={`${flip.file}, changed by ${attackLabel(flip.attack)}`} />
          <figcaption>changed</figcaption>
        </figure>
      </div>
      <dl className="flip-labels">
        <dt>file</dt>
        <dd>{flip.file}</dd>
        <dt>true</dt>
        <dd>{name(flip.label)}</dd>
        <dt>clean</dt>
        <dd>
          {name(flip.cleanPred)} ({percent(flip.cleanConf)})
        </dd>
        <dt>changed</dt>
        <dd>
          {name(flip.advPred)} ({percent(flip.advConf)})
        </dd>
        <dt>flips at</dt>
        <dd>ε = {norm === 'linf' ? describeEps(flip.eps) : formatEps(flip.eps)}</dd>
      </dl>
    </li>
  );
}

/** The thumbnail gallery of a saved run. */
export function SavedRunGallery({ saved }: { saved: SavedRun }): ReactElement {
  const attacks = useMemo(() => [...new Set(saved.flips.map((f) => f.attack))], [saved]);
  const [choice, setChoice] = useState<AttackId | null>(null);
  const shown = choice !== null && attacks.includes(choice) ? choice : (attacks[attacks.length - 1] ?? null);
  const flips = saved.flips.filter((f) => f.attack === shown);
  const names = saved.run.samples.classNames ?? [];
  return (
    <section className="panel">
      <h3>Flipped images kept in the file</h3>
      <p className="muted small">
        A saved run keeps a selection of flipped images (the first few per search and true class) as 8-bit PNG thumbnails; the per-image results of every sample are in the file too.
      </p>
      {attacks.length > 0 && (
        <div className="row">
          <AttackSelect attacks={attacks} value={shown} onChange={setChoice} />
          <span className="muted">{flips.length} kept</span>
        </div>
      )}
      {attacks.length === 0 && <p className="muted">This saved run holds no flipped images.</p>}
      <ul className="flips" data-testid="saved-run-gallery">
        {flips.map((f) => (
          <Thumbnail key={`${f.attack}|${f.index}`} flip={f} names={names} norm={saved.run.config.norm} />
        ))}
      </ul>
    </section>
  );
}
