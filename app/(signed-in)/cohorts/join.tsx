import { useLocalSearchParams } from 'expo-router';
import { JoinCohort } from '../../../components/cohorts/JoinCohort';

// A static route, so "/cohorts/join" is never read as the cohort with id "join".
export default function JoinCohortScreen() {
  const { code } = useLocalSearchParams<{ code?: string }>();
  return <JoinCohort code={typeof code === 'string' && code.trim() ? code.trim() : undefined} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
