/** Draws RGBA bytes into a canvas shown enlarged with crisp pixels. */
import { useEffect, useRef, type ReactElement } from 'react';

export interface PixelCanvasProps {
  readonly rgba: Uint8ClampedArray<ArrayBuffer>;
  readonly width: number;
  readonly height: number;
  /** Displayed width in CSS pixels. */
  readonly size?: number;
  readonly label: string;
}

/** A small image. */
export function PixelCanvas({ rgba, width, height, size = 96, label }: PixelCanvasProps): ReactElement {
  const ref = useRef<HTMLCanvasElement>(null);
  useEffect(() => {
    const context = ref.current?.getContext('2d');
    if (!context) return;
    context.putImageData(new ImageData(rgba, width, height), 0, 0);
  }, [rgba, width, height]);
  return <canvas ref={ref} className="pixels" width={width} height={height} style={{ width: size, height: (size * height) / width }} role="img" aria-label={label} />;
}
