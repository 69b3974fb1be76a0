/**
 * The flipped images: original | adversarial | perturbation (diverging colours) | labels, per
 * sample; filter by class, sort by flipping ε; click one to see its confidence against ε.
 */
import { useEffect, useMemo, useState, type ReactElement } from 'react';
import type { AttackId } from '../../core/attacks/types.ts';
import type { SweepResult } from '../../core/sweep/types.ts';
import type { FlipImage } from '../../worker/protocol.ts';
import { useWorkspace } from '../store/workspace.ts';
import { GALLERY_PAGE, loadGalleryImages } from '../store/actions.ts';
import { attacksIn, flippedItems, type FlipItem, type FlipOrder } from '../lib/gallery.ts';
import { describeEps, formatEps } from '../lib/budgets.ts';
import { perturbationToRgba, pixelsToRgba, type ImageSize } from '../lib/imagery.ts';
import { percent } from '../lib/format.ts';
import { PixelCanvas } from './PixelCanvas.tsx';
import { ConfidenceChart } from './ConfidenceChart.tsx';
import { AttackSelect } from './AttackSelect.tsx';

function Images({ image, size }: { image: FlipImage; size: ImageSize }): ReactElement {
  const views = useMemo(() => {
    const original = pixelsToRgba(image.original, size);
    const adversarial = pixelsToRgba(image.adversarial, size);
    return { original, adversarial, perturbation: perturbationToRgba(image.original, image.adversarial, size) };
  }, [image, size]);
  return (
    <div className="triple">
      <figure>
        <PixelCanvas rgba={views.original} width={size.width} height={size.height} size={80} label="original" />
        <figcaption>original</figcaption>
      </figure>
      <figure>
        <PixelCanvas rgba={views.adversarial} width={size.width} height={size.height} size={80} label="adversarial" />
        <figcaption>changed</figcaption>
      </figure>
      <figure>
        <PixelCanvas rgba={views.perturbation.rgba} width={size.width} height={size.height} size={80} label="perturbation" />
        <figcaption>change, ±{formatEps(views.perturbation.scale)}</figcaption>
      </figure>
    </div>
  );
}

function Labels({ item, names, norm }: { item: FlipItem; names: readonly string[]; norm: string }): ReactElement {
  const { record, outcome } = item;
  const name = (i: number): string => names[i] ?? `class ${i}`;
  return (
    <dl className="flip-labels">
      <dt>true</dt>
      <dd>{name(record.label)}</dd>
      <dt>clean</dt>
      <dd>
        {name(record.cleanPred)} ({percent(record.cleanConf)})
      </dd>
      <dt>changed</dt>
      <dd>{outcome ? `${name(outcome.advPred)} (${percent(outcome.advConf)})` : '–'}</dd>
      <dt>flips at</dt>
      <dd>ε = {norm === 'linf' ? describeEps(item.eps) : formatEps(item.eps)}</dd>
    </dl>
  );
}

/** The gallery. */
export function FlipGallery({ result }: { result: SweepResult }): ReactElement {
  const gallery = useWorkspace((s) => s.gallery);
  const names = useWorkspace((s) => s.run.classNames);
  const attacks = useMemo(() => attacksIn(result.records), [result]);
  const [attack, setAttack] = useState<AttackId | null>(null);
  const [classIndex, setClassIndex] = useState<number | null>(null);
  const [order, setOrder] = useState<FlipOrder>('eps-ascending');
  const [selected, setSelected] = useState<number | null>(null);
  const shown = attack !== null && attacks.includes(attack) ? attack : (attacks[attacks.length - 1] ?? null);
  const items = useMemo(() => (shown === null ? [] : flippedItems(result.records, shown, classIndex, order)), [result, shown, classIndex, order]);
  const [pages, setPages] = useState(1);
  const runId = useWorkspace((s) => s.run.id);
  const visible = useMemo(() => items.slice(0, pages * GALLERY_PAGE), [items, pages]);
  useEffect(() => {
    if (shown !== null) void loadGalleryImages(runId, visible.map((i) => ({ index: i.record.index, attack: shown })));
  }, [runId, shown, visible]);
  const detail = result.records.find((r) => r.index === selected) ?? null;
  return (
    <section className="panel">
      <h3>Flipped images</h3>
      <div className="row">
        <AttackSelect attacks={attacks} value={shown} onChange={setAttack} />
        <label className="field inline">
          true class
          <select value={classIndex ?? ''} onChange={(e) => setClassIndex(e.target.value === '' ? null : Number(e.target.value))} data-testid="gallery-class">
            <option value="">all</option>
            {names.map((n, i) => (
              <option key={n} value={i}>
                {n}
              </option>
            ))}
          </select>
        </label>
        <label className="field inline">
          order
          <select value={order} onChange={(e) => setOrder(e.target.value as FlipOrder)}>
            <option value="eps-ascending">smallest flipping ε first</option>
            <option value="eps-descending">largest flipping ε first</option>
          </select>
        </label>
        <span className="muted">{items.length} flipped</span>
      </div>
      {detail !== null && (
        <div className="detail">
          <h4>
            {detail.file}: the model's answer against ε <button type="button" onClick={() => setSelected(null)}>close</button>
          </h4>
          <ConfidenceChart record={detail} classNames={names} />
          <p className="muted small">Hollow markers: still the true class. Filled: a wrong class.</p>
        </div>
      )}
      {items.length === 0 && <p className="muted">No image flipped{classIndex !== null ? ' in this class' : ''} within these budgets.</p>}
      <ul className="flips" data-testid="flip-gallery">
        {visible.map((item) => {
          const image = shown === null ? undefined : gallery.images[`${shown}|${item.record.index}`];
          return (
            <li key={item.record.index} className={selected === item.record.index ? 'flip selected' : 'flip'}>
              <button type="button" className="flip-button" onClick={() => setSelected(item.record.index)} title={`${item.record.file}: show confidence against ε`}>
                {image && gallery.size ? <Images image={image} size={gallery.size} /> : <div className="triple muted">images loading…</div>}
                <Labels item={item} names={names} norm={result.config.norm} />
              </button>
            </li>
          );
        })}
      </ul>
      {visible.length < items.length && (
        <button type="button" onClick={() => setPages(pages + 1)}>
          Show the next {Math.min(GALLERY_PAGE, items.length - visible.length)} of {items.length - visible.length} more
        </button>
      )}
    </section>
  );
}
