/** What a flip-budget run found: the median, the histogram of per-image flip budgets and the curve they imply. */
import { useMemo, type ReactElement } from 'react';
import type { FlipsReply } from '../../worker/protocol.ts';
import { budgetText, flipCurveLayout, flipCurveTraces, histogramLayout, histogramTraces, medianText } from '../lib/flipFigure.ts';
import { attackLabel } from '../lib/figure.ts';
import { usePlot } from './usePlot.ts';

function HistogramChart({ reply }: { reply: FlipsReply }): ReactElement {
  const norm = reply.result.config.norm;
  const data = useMemo(() => histogramTraces(reply.histogram, norm), [reply, norm]);
  const layout = useMemo(() => histogramLayout(reply.histogram, norm, reply.result.medianFlipEps), [reply, norm]);
  const ref = usePlot(data, layout);
  return <div ref={ref} className="chart-mid" data-testid="flip-histogram" />;
}

function CurveFromFlips({ reply }: { reply: FlipsReply }): ReactElement {
  const data = useMemo(() => flipCurveTraces(reply.curve), [reply]);
  const layout = useMemo(() => flipCurveLayout(reply.result.config.norm), [reply]);
  const ref = usePlot(data, layout);
  return <div ref={ref} className="chart-mid" data-testid="flip-curve" />;
}

/** The view of one reply. */
export function FlipBudgetView({ reply, subject }: { reply: FlipsReply; subject: string }): ReactElement {
  const { result, histogram, maxEps } = reply;
  const norm = result.config.norm;
  const measured = result.records.length;
  return (
    <div className="stack" data-testid="flip-view">
      <p>
        {attackLabel(result.config.search)}, {norm === 'linf' ? 'L∞' : 'L2'}, on {measured} of {reply.totalSamples} images, budgets up to {budgetText(maxEps, norm)}
        {result.config.search === 'deepfool' ? '' : `, to within ${budgetText(result.config.tol, norm)}`}.{result.complete ? '' : ' Stopped early: only the images that finished are shown.'}{' '}
        <span className="muted small">Measured on: {subject}.</span>
      </p>
      <p className="flip-median" data-testid="flip-median">
        Median flip budget over the {result.cleanCorrect} images read correctly: <strong>{medianText(result.medianFlipEps, maxEps, norm)}</strong>
      </p>
      <p className="muted small" data-testid="flip-counts">
        Not in the bars: {histogram.misclassified} read wrongly before any change (budget 0) and {histogram.neverFlipped} never flipped up to {budgetText(maxEps, norm)} (counted as
        holding at every budget shown).
      </p>
      <div className="two-charts">
        <figure>
          <HistogramChart reply={reply} />
          <figcaption className="muted small">Images by the smallest budget at which the search flipped them.</figcaption>
        </figure>
        <figure>
          <CurveFromFlips reply={reply} />
          <figcaption className="muted small">
            Robust accuracy at every budget, read off the flip budgets: an image holds at ε when its flip budget is larger. Shaded: Wilson 95 % interval.
          </figcaption>
        </figure>
      </div>
    </div>
  );
}
