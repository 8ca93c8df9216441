import { CohortsView } from '../../../components/cohorts/CohortsView';

export default function CohortsScreen() {
  return <CohortsView />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
