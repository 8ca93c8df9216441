import { useLocalSearchParams } from 'expo-router';
import { GalaxyView } from '../../../components/galaxy/GalaxyView';
import { Empty } from '../../../components/States';

export default function GalaxyScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  // Only a plain positive number names a galaxy; anything else is not found, as on the server.
  const n = /^[1-9][0-9]{0,9}$/.test(id ?? '') ? Number(id) : 0;
  if (!n) return <Empty title="No such galaxy" hint={`"${id}" is not a galaxy id.`} />;
  return <GalaxyView id={n} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
