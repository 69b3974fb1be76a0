/** Draws a Plotly figure into a div and keeps it in step with its data; Plotly is loaded on first use. */
import { useEffect, useRef, type RefObject } from 'react';
import type { Config, Data, Layout } from 'plotly.js-dist-min';

type PlotlyModule = typeof import('plotly.js-dist-min');
let plotly: Promise<PlotlyModule> | null = null;

/** The Plotly module, imported once (it is large, so it is kept out of the first page load). */
export function loadPlotly(): Promise<PlotlyModule> {
  plotly ??= import('plotly.js-dist-min');
  return plotly;
}

const CONFIG: Partial<Config> = { displaylogo: false, responsive: true, modeBarButtonsToRemove: ['select2d', 'lasso2d'] };

/** Render `data`/`layout` into the returned ref's div whenever they change; purge on unmount. */
export function usePlot(data: Data[], layout: Partial<Layout>): RefObject<HTMLDivElement | null> {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    let cancelled = false;
    void loadPlotly().then((module) => {
      const Plotly = module.default ?? module;
      if (!cancelled && ref.current) void Plotly.react(ref.current, data, layout, CONFIG);
    });
    return () => {
      cancelled = true;
    };
  }, [data, layout]);
  useEffect(() => {
    const div = ref.current;
    return () => {
      if (div) void loadPlotly().then((module) => (module.default ?? module).purge(div));
    };
  }, []);
  return ref;
}
