/**
 * Step 6: the curve with its table, the health checks and the cautions beside it, the per-class
 * views, flip budgets and the flipped images.
 */
import type { ReactElement } from 'react';
import { useWorkspace } from '../store/workspace.ts';
import { CurveChart } from '../components/CurveChart.tsx';
import { ResultsTable } from '../components/ResultsTable.tsx';
import { FlipGallery } from '../components/FlipGallery.tsx';
import { Cautions } from '../components/Cautions.tsx';
import { HealthPanel } from '../components/HealthPanel.tsx';
import { ClassBreakdown } from '../components/ClassBreakdown.tsx';
import { FlipBudgetPanel } from '../components/FlipBudgetPanel.tsx';
import { percent } from '../lib/format.ts';

/** The results screen. */
export function ResultsScreen(): ReactElement {
  const run = useWorkspace((s) => s.run);
  const model = useWorkspace((s) => s.model.value?.label ?? '');
  const result = run.result;
  if (result === null || result.curve.length === 0) {
    return (
      <div className="stack">
        <h2>Results</h2>
        <p className="muted">Results appear here after a sweep. The demo button at the top runs one. Flip budgets below need only a model and samples.</p>
        <Cautions />
        <FlipBudgetPanel />
      </div>
    );
  }
  return (
    <div className="stack">
      <h2>Results</h2>
      <p className="lead">
        {model}: clean accuracy {percent(result.cleanAccuracy)} on {result.samples} images.{result.complete ? '' : ' The sweep was cancelled; only finished points are shown.'}
      </p>
      <div className="with-aside">
        <section className="panel">
          <CurveChart points={result.curve} cleanAccuracy={result.cleanAccuracy} norm={result.config.norm} />
          <p className="muted small">Shaded: Wilson 95 % interval of each robust accuracy. Dashed: clean accuracy.</p>
          <ResultsTable points={result.curve} />
        </section>
        <div className="aside-stack">
          <Cautions />
          <HealthPanel />
        </div>
      </div>
      <ClassBreakdown norm={result.config.norm} />
      <FlipBudgetPanel />
      <FlipGallery result={result} />
    </div>
  );
}
