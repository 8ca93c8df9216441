import { useLocalSearchParams } from 'expo-router';
import { RunView } from '../../../components/run/RunView';

export default function RunScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <RunView id={String(id)} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
