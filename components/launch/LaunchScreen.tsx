import type { LawSpec, RunSpecInput } from '../../shared/spec';
import { useTemplate } from '../../hooks/cohorts';
import { useRun } from '../../hooks/runs';
import { Screen } from '../Screen';
import { ErrorState, Loading } from '../States';
import { LaunchForm } from './LaunchForm';

function Failed({ error, what, retry }: { error: unknown; what: string; retry: () => void }) {
  return (
    <Screen title="Launch a run">
      <ErrorState error={error} title={`Could not load the ${what}`} onRetry={retry} />
    </Screen>
  );
}

/** The new-run form: empty, filled from a run being cloned (`from`), or from a cohort template. */
export function LaunchScreen({ from, template }: { from?: string; template?: number }) {
  const source = useRun(from);
  const tpl = useTemplate(template);
  if (from) {
    if (source.isPending) return <Loading what="Loading the run to clone" />;
    if (source.isError) return <Failed error={source.error} what="run to clone" retry={() => source.refetch()} />;
    return <LaunchForm start={{ spec: source.data.spec as RunSpecInput, name: `${source.data.name} (copy)`, origin: `A copy of “${source.data.name}”: change what you like and launch.` }} />;
  }
  if (template) {
    if (tpl.isPending) return <Loading what="Loading the template" />;
    if (tpl.isError) return <Failed error={tpl.error} what="template" retry={() => tpl.refetch()} />;
    const t = tpl.data;
    return <LaunchForm start={{ spec: t.spec as RunSpecInput, pairLaw: (t.pairLaw as LawSpec | null) ?? null, name: t.name, origin: `From the template “${t.name}” of ${t.cohortName}${t.description ? `: ${t.description}` : '.'}` }} />;
  }
  return <LaunchForm />;
}
