import type { RunSpecInput } from '../../shared/spec';
import { useRun } from '../../hooks/runs';
import { Screen } from '../Screen';
import { ErrorState, Loading } from '../States';
import { LaunchForm } from './LaunchForm';

/** The new-run form, empty or filled from a run being cloned. */
export function LaunchScreen({ from }: { from?: string }) {
  const source = useRun(from);
  if (!from) return <LaunchForm />;
  if (source.isPending) return <Loading what="Loading the run to clone" />;
  if (source.isError)
    return (
      <Screen title="Launch a run">
        <ErrorState error={source.error} title="Could not load the run to clone" onRetry={() => source.refetch()} />
      </Screen>
    );
  return <LaunchForm initial={source.data.spec as RunSpecInput} origin={`A copy of “${source.data.name}”: change what you like and launch.`} />;
}
