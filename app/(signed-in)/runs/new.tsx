import { useLocalSearchParams } from 'expo-router';
import { LaunchScreen } from '../../../components/launch/LaunchScreen';

export default function NewRunScreen() {
  const { from } = useLocalSearchParams<{ from?: string }>();
  return <LaunchScreen from={typeof from === 'string' ? from : undefined} />;
}
