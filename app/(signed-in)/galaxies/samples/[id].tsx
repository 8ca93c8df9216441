import { useLocalSearchParams } from 'expo-router';
import { SampleView } from '../../../../components/galaxy/SampleView';
import { Empty } from '../../../../components/States';

export default function SampleScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  // Only a plain positive number names a sample fit, as on the server.
  const n = /^[1-9][0-9]{0,9}$/.test(id ?? '') ? Number(id) : 0;
  if (!n) return <Empty title="No such sample fit" hint={`"${id}" is not a sample id.`} />;
  return <SampleView id={n} />;
}

export { ScreenFailure as ErrorBoundary } from '../../../../components/States';
