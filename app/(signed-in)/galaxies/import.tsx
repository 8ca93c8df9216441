import { GalaxyImport } from '../../../components/galaxy/GalaxyImport';

export default function ImportGalaxyScreen() {
  return <GalaxyImport />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
