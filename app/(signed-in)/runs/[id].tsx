import { useLocalSearchParams } from 'expo-router';
import { RunView } from '../../../components/run/RunView';

export default function RunScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <RunView id={String(id)} />;
}
