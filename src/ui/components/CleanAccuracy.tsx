/** The clean accuracy of the loaded model on the loaded samples, with its Wilson 95 % interval. */
import type { ReactElement } from 'react';
import { wilsonInterval } from '../../core/stats/wilson.ts';
import { useWorkspace } from '../store/workspace.ts';
import { percent } from '../lib/format.ts';

/** The box. */
export function CleanAccuracy(): ReactElement | null {
  const clean = useWorkspace((s) => s.clean);
  const haveBoth = useWorkspace((s) => s.model.value !== null && s.samples.value !== null);
  if (!haveBoth) return <p className="muted">Clean accuracy appears here once a model and samples are both loaded.</p>;
  if (clean.error !== null) return <p className="problem">{clean.error}</p>;
  if (clean.value === null) return <p className="muted">{clean.busy ? 'Measuring clean accuracy…' : 'Clean accuracy is not available.'}</p>;
  const { accuracy, correct, samples } = clean.value;
  const ci = wilsonInterval(correct, samples);
  return (
    <p className="clean" data-testid="clean-accuracy">
      Clean accuracy <strong>{percent(accuracy)}</strong> ({correct} of {samples} read correctly; 95 % interval {percent(ci.low)}–{percent(ci.high)})
    </p>
  );
}
