/** Step 3: how pixels become the model's input, with a live look at exactly what the model receives. */
import { useEffect, useMemo, useState, type ReactElement } from 'react';
import { validatePreprocessing } from '../../core/models/pipeline.ts';
import type { InputRange, Layout, Preprocessing } from '../../core/types.ts';
import type { PreviewReply } from '../../worker/protocol.ts';
import { useWorkspace } from '../store/workspace.ts';
import { refreshClean, refreshPreview, setResizeMode } from '../store/actions.ts';
import { CleanAccuracy } from '../components/CleanAccuracy.tsx';
import { PixelCanvas } from '../components/PixelCanvas.tsx';
import { INPUT_RANGE_LABELS, LAYOUT_LABELS, NORMALISATION_PRESETS, RESIZE_LABELS, presetOf, withPreset } from '../lib/presets.ts';
import type { ResizeMode } from '../../core/samples/crop.ts';
import { channelList, parseChannelList } from '../lib/format.ts';
import { modelInputToRgba, pixelsToRgba } from '../lib/imagery.ts';

const PREVIEW_COUNT = 24;
const SHOWN = 6;

function ChannelField({ label, values, onChange }: { label: string; values: readonly number[]; onChange: (v: number[]) => void }): ReactElement {
  const [text, setText] = useState(channelList(values));
  useEffect(() => setText(channelList(values)), [values]);
  const parsed = parseChannelList(text);
  return (
    <label className="field">
      {label}
      <input
        value={text}
        aria-invalid={parsed === null}
        onChange={(e) => {
          setText(e.target.value);
          const v = parseChannelList(e.target.value);
          if (v !== null) onChange(v);
        }}
      />
      {parsed === null && <span className="problem">one number, or one per channel separated by commas</span>}
    </label>
  );
}

function ModelView({ preview }: { preview: PreviewReply }): ReactElement {
  const tiles = useMemo(
    () =>
      preview.images.slice(0, SHOWN).map((img) => ({
        img,
        stored: pixelsToRgba(img.pixels, preview),
        input: img.modelInput.length > 0 ? modelInputToRgba(img.modelInput, preview, preview.layout, img.inputMin, img.inputMax) : null,
      })),
    [preview],
  );
  return (
    <ul className="pairs" data-testid="model-input-preview">
      {tiles.map(({ img, stored, input }) => (
        <li key={img.index} className="pair">
          <PixelCanvas rgba={stored} width={preview.width} height={preview.height} size={80} label={`${img.file} as stored`} />
          {input && <PixelCanvas rgba={input} width={preview.width} height={preview.height} size={80} label={`${img.file} as the model receives it`} />}
          <span className="muted small">{input ? `model input from ${img.inputMin.toFixed(3)} to ${img.inputMax.toFixed(3)}` : 'no model yet'}</span>
        </li>
      ))}
    </ul>
  );
}

/** The preprocessing screen. */
export function PreprocessingScreen(): ReactElement {
  const pre = useWorkspace((s) => s.preprocessing);
  const setPre = useWorkspace((s) => s.setPreprocessing);
  const model = useWorkspace((s) => s.model.value);
  const samples = useWorkspace((s) => s.samples.value);
  const preview = useWorkspace((s) => s.preview);
  const running = useWorkspace((s) => s.run.status === 'running');
  const resize = useWorkspace((s) => s.resize);
  const reading = useWorkspace((s) => s.samples.busy);
  const problem = model === null ? null : validatePreprocessing(pre, model.description);
  useEffect(() => {
    if (problem !== null || running) return;
    const timer = setTimeout(() => {
      void refreshPreview(PREVIEW_COUNT);
      void refreshClean();
    }, 250);
    return () => clearTimeout(timer);
  }, [pre, model, samples, problem, running]);
  const preset = presetOf(pre);
  const update = (change: Partial<Preprocessing>): void => setPre({ ...pre, ...change });
  return (
    <div className="stack">
      <h2>Preprocessing</h2>
      <p className="lead">
        Attacks change pixels on the 0 to 1 scale; what follows here is part of the model as Brink differentiates it. Budgets therefore always mean pixel units: ε = 8/255 ≈ 0.031 lets
        every pixel move by up to 8 grey levels, whatever the model does with the values next.
      </p>
      <section className="panel form">
        <label className="field">
          Value range the model expects
          <select value={pre.inputRange} disabled={running} onChange={(e) => update({ inputRange: e.target.value as InputRange })}>
            {Object.entries(INPUT_RANGE_LABELS).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
              </option>
            ))}
          </select>
        </label>
        <fieldset className="field">
          <legend>Normalisation (value − mean) / std, after the range</legend>
          {NORMALISATION_PRESETS.map((p) => (
            <label key={p.id} className="choice">
              <input type="radio" name="norm-preset" checked={preset === p.id} disabled={running} onChange={() => setPre(withPreset(pre, p.id))} />
              <span>
                {p.label} <span className="muted">— {p.hint}</span>
              </span>
            </label>
          ))}
          <label className="choice">
            <input type="radio" name="norm-preset" checked={preset === 'custom'} disabled={running} onChange={() => update({ mean: [0.5], std: [0.25] })} />
            <span>Your own values</span>
          </label>
          {preset === 'custom' && (
            <div className="row">
              <ChannelField label="mean" values={pre.mean} onChange={(mean) => update({ mean })} />
              <ChannelField label="std" values={pre.std} onChange={(std) => update({ std })} />
            </div>
          )}
        </fieldset>
        <label className="field">
          Layout of the model's input
          <select value={pre.layout} disabled={running} onChange={(e) => update({ layout: e.target.value as Layout })}>
            {Object.entries(LAYOUT_LABELS).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
                {model?.description.layout === k ? ' — detected' : ''}
              </option>
            ))}
          </select>
        </label>
        <label className="field">
          Fitting images to the model's size{model ? ` (${model.description.height} × ${model.description.width})` : ''}
          <select value={resize} disabled={running || reading} data-testid="resize-mode" onChange={(e) => void setResizeMode(e.target.value as ResizeMode)}>
            {Object.entries(RESIZE_LABELS).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
              </option>
            ))}
          </select>
          <span className="muted small">
            {resize === 'crop'
              ? 'The largest centred part with the model’s proportions is kept, then resized bilinearly; the edges of the longer side are cut off.'
              : 'The whole image is resized bilinearly; a picture of other proportions is squeezed or widened.'}
          </span>
        </label>
        <p className="field">
          Channels: {model ? (model.description.channels === 1 ? 'grey (colour images are converted by luminance)' : 'colour (grey images are repeated into three channels)') : 'set by the model'}.
        </p>
        {problem !== null && <p className="problem" role="alert">{problem}</p>}
      </section>
      <section className="panel">
        <h3>What the model receives</h3>
        <p className="muted">Left: the image as stored. Right: the model's actual input for it, captured where the model is called, stretched from its own range to black–white for viewing.</p>
        {preview.error !== null && <p className="problem">{preview.error}</p>}
        {preview.value !== null ? <ModelView preview={preview.value} /> : <p className="muted">Load a model and samples to see this.</p>}
        <CleanAccuracy />
      </section>
    </div>
  );
}
