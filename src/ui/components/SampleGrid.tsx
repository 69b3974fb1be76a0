/** Thumbnails of a few samples with their labels and, once known, the model's clean answer. */
import { useMemo, type ReactElement } from 'react';
import type { CleanReply, PreviewReply } from '../../worker/protocol.ts';
import { pixelsToRgba } from '../lib/imagery.ts';
import { PixelCanvas } from './PixelCanvas.tsx';

export interface SampleGridProps {
  readonly preview: PreviewReply;
  readonly classNames: readonly string[];
  readonly clean: CleanReply | null;
}

/** The grid. */
export function SampleGrid({ preview, classNames, clean }: SampleGridProps): ReactElement {
  const tiles = useMemo(
    () => preview.images.map((img) => ({ img, rgba: pixelsToRgba(img.pixels, preview) })),
    [preview],
  );
  return (
    <ul className="grid" data-testid="sample-grid">
      {tiles.map(({ img, rgba }) => {
        const predicted = clean?.predictions[img.index];
        const right = predicted === img.label;
        return (
          <li key={img.index} className="tile">
            <PixelCanvas rgba={rgba} width={preview.width} height={preview.height} size={72} label={img.file} />
            <span className="tile-label">{classNames[img.label] ?? img.label}</span>
            {predicted !== undefined && (
              <span className={right ? 'tile-pred ok' : 'tile-pred bad'}>
                {right ? 'read correctly' : `read as ${classNames[predicted] ?? predicted}`}
              </span>
            )}
          </li>
        );
      })}
    </ul>
  );
}
