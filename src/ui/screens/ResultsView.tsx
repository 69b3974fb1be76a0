/** Step 6 as shown: a run read from a saved-run file when one is in view, else this session's results. */
import type { ReactElement } from 'react';
import { useReview } from '../store/review.ts';
import { SavedRunResults } from '../components/SavedRunResults.tsx';
import { ResultsScreen } from './ResultsScreen.tsx';

/** The results step. */
export function ResultsView(): ReactElement {
  const entry = useReview((r) => r.entries.find((e) => e.id === r.viewing) ?? null);
  return entry === null ? <ResultsScreen /> : <SavedRunResults entry={entry} />;
}
