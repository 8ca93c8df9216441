import { useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { RUN_STATUSES, type RunStatus } from '../shared/api/contract';
import { space, WIDE_BREAKPOINT } from '../constants/theme';
import { useRuns, type RunFilters } from '../hooks/runs';
import { useCohorts } from '../hooks/cohorts';
import { useSession } from '../hooks/session';
import { isStaff } from './lib/roles';
import { Button } from './Button';
import { ChoiceChips } from './fields';
import { lawModules } from '../shared/engine';
import { RunCard } from './RunCard';
import { Screen } from './Screen';
import { Empty, ErrorState, Loading } from './States';
import { statusLabel } from './StatusBadge';

const ANY = 'any';

/** The runs list with its filters; pull to refresh on phones. */
export function RunsBoard() {
  const [status, setStatus] = useState<RunStatus | typeof ANY>(ANY);
  const [law, setLaw] = useState<string>(ANY);
  const [cohort, setCohort] = useState<number | 0>(0);
  const filters: RunFilters = {
    status: status === ANY ? undefined : status,
    law: law === ANY ? undefined : law,
    cohort: cohort || undefined,
  };
  const runs = useRuns(filters);
  const session = useSession();
  const cohorts = useCohorts(isStaff(session.data));
  const cohortChoices = (cohorts.data ?? []).map((c) => ({ value: c.id, label: c.name }));
  const { width } = useWindowDimensions();
  const columns = width >= WIDE_BREAKPOINT ? 2 : 1;
  const filtered = filters.status || filters.law || filters.cohort;

  return (
    <Screen
      title="Runs"
      subtitle="Runs you can see, newest first. Tap one to watch it or read its diagnostics."
      onRefresh={() => runs.refetch()}
      refreshing={runs.isRefetching}
      actions={
        <>
          <Button tone="secondary" label="Refresh" onPress={() => runs.refetch()} busy={runs.isRefetching} accessibilityHint="Reloads the list (or pull down on a phone)" />
          <Button href="/runs/new" label="Launch a run" accessibilityHint="Opens the new-run form" />
        </>
      }
    >
      <View style={styles.filters} role="group" accessibilityLabel="Filters">
        <ChoiceChips compact label="Status" value={status} onChange={setStatus} choices={[{ value: ANY, label: 'All' }, ...RUN_STATUSES.map((s) => ({ value: s, label: statusLabel(s) }))]} />
        <ChoiceChips compact label="Law" value={law} onChange={setLaw} choices={[{ value: ANY, label: 'All' }, ...lawModules().map((m) => ({ value: m.kind, label: m.shortLabel }))]} />
        {cohortChoices.length ? <ChoiceChips compact label="Cohort" value={cohort} onChange={setCohort} choices={[{ value: 0, label: 'All' }, ...cohortChoices]} /> : null}
      </View>
      {runs.isPending ? (
        <Loading what="Loading runs" />
      ) : runs.isError ? (
        <ErrorState error={runs.error} title="Could not load runs" onRetry={() => runs.refetch()} />
      ) : runs.data.length === 0 ? (
        filtered ? (
          <Empty title="No runs match" hint="Try another status or law." />
        ) : (
          <Empty
            title="No runs yet"
            hint="Set up a model, pick a force law (or two), and launch. Small runs finish in seconds."
            action={
              <Button href="/runs/new" label="Launch your first run" />
            }
          />
        )
      ) : (
        <View style={[styles.grid, columns > 1 && styles.gridWide]} role="list" accessibilityLabel={`${runs.data.length} runs`}>
          {runs.data.map((r) => (
            <View key={r.id} style={columns > 1 ? styles.cellWide : undefined}>
              <RunCard run={r} showOwner={isStaff(session.data) || r.owner.id !== session.data?.id} />
            </View>
          ))}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  filters: { gap: space.md, flexDirection: 'row', flexWrap: 'wrap' },
  grid: { gap: space.md },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap' },
  cellWide: { width: '49.3%' },
});
