import { useLocalSearchParams } from 'expo-router';
import { CompareView } from '../../components/compare/CompareView';

export default function CompareScreen() {
  const { pair, a, b } = useLocalSearchParams<{ pair?: string; a?: string; b?: string }>();
  return <CompareView pair={pair} a={a} b={b} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../components/States';
