import { GalaxiesView } from '../../../components/galaxy/GalaxiesView';

export default function GalaxiesScreen() {
  return <GalaxiesView />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
