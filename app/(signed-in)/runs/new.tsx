import { useLocalSearchParams } from 'expo-router';
import { LaunchScreen } from '../../../components/launch/LaunchScreen';

export default function NewRunScreen() {
  const { from, template } = useLocalSearchParams<{ from?: string; template?: string }>();
  const t = Number(template);
  return <LaunchScreen from={typeof from === 'string' ? from : undefined} template={Number.isInteger(t) && t > 0 ? t : undefined} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
