import { useLocalSearchParams } from 'expo-router';
import { CohortDetail } from '../../../components/cohorts/CohortDetail';

export default function CohortScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  return <CohortDetail id={Number(id)} />;
}
