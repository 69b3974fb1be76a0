/** The workbench frame: header with the engine status and the demo button, step list, current screen. */
import type { ReactElement } from 'react';
import { useWorkspace } from './store/workspace.ts';
import type { ScreenId } from './store/state.ts';
import { Header } from './components/Header.tsx';
import { StepNav } from './components/StepNav.tsx';
import { ModelScreen } from './screens/ModelScreen.tsx';
import { SamplesScreen } from './screens/SamplesScreen.tsx';
import { PreprocessingScreen } from './screens/PreprocessingScreen.tsx';
import { PlanScreen } from './screens/PlanScreen.tsx';
import { RunScreen } from './screens/RunScreen.tsx';
import { ResultsView } from './screens/ResultsView.tsx';
import { ExportsScreen } from './screens/ExportsScreen.tsx';
import { ReviewScreen } from './screens/ReviewScreen.tsx';

const SCREEN_VIEWS: Readonly<Record<ScreenId, () => ReactElement>> = {
  model: ModelScreen,
  samples: SamplesScreen,
  preprocessing: PreprocessingScreen,
  plan: PlanScreen,
  run: RunScreen,
  results: ResultsView,
  exports: ExportsScreen,
  review: ReviewScreen,
};

/** The whole app. */
export function App(): ReactElement {
  const screen = useWorkspace((s) => s.screen);
  const View = SCREEN_VIEWS[screen];
  return (
    <div className="app">
      <Header />
      <div className="body">
        <StepNav />
        <main className="screen" data-screen={screen}>
          <View />
        </main>
      </div>
    </div>
  );
}
