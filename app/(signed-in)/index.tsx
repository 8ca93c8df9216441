import { RunsBoard } from '../../components/RunsBoard';

export default function RunsScreen() {
  return <RunsBoard />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../components/States';
