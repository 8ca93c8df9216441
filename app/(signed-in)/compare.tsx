import { useLocalSearchParams } from 'expo-router';
import { CompareView } from '../../components/compare/CompareView';

export default function CompareScreen() {
  const { pair, a, b } = useLocalSearchParams<{ pair?: string; a?: string; b?: string }>();
  return <CompareView pair={pair} a={a} b={b} />;
}
