import { useLocalSearchParams } from 'expo-router';
import { CohortDetail } from '../../../components/cohorts/CohortDetail';
import { Screen } from '../../../components/Screen';
import { Empty } from '../../../components/States';
import { Button } from '../../../components/Button';

export default function CohortScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const n = Number(id);
  // Anything but a cohort number would otherwise wait for ever on a query that never starts.
  if (!Number.isInteger(n) || n <= 0)
    return (
      <Screen title="Cohort">
        <Empty title="No such cohort" hint={`"${String(id).slice(0, 40)}" is not a cohort number.`} action={<Button small label="Your cohorts" href="/cohorts" />} />
      </Screen>
    );
  return <CohortDetail id={n} />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../../components/States';
