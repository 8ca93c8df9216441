import { lawName, modelName } from '../../shared/engine';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { RunSummary } from '../../shared/api/contract';
import { colors, space } from '../../constants/theme';
import { useRuns } from '../../hooks/runs';
import { Button } from '../Button';
import { ChoiceChips } from '../fields';
import { formatAge } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { Empty, ErrorState, Loading } from '../States';
import { StatusBadge } from '../StatusBadge';
import { Txt } from '../Txt';

interface Pair {
  id: string;
  runs: RunSummary[];
}

export function groupPairs(runs: RunSummary[]): Pair[] {
  const pairs = new Map<string, RunSummary[]>();
  for (const r of runs) if (r.pairId) pairs.set(r.pairId, [...(pairs.get(r.pairId) ?? []), r]);
  return [...pairs.entries()].filter(([, rs]) => rs.length >= 2).map(([id, rs]) => ({ id, runs: rs }));
}

/** Without a pair in the address: the pairs to open, or any two finished runs to set side by side. */
export function ComparePicker() {
  const runs = useRuns({});
  const [a, setA] = useState('');
  const [b, setB] = useState('');
  if (runs.isPending) return <Loading what="Loading runs" />;
  if (runs.isError)
    return (
      <Screen title="Side by side">
        <ErrorState error={runs.error} title="Could not load runs" onRetry={() => runs.refetch()} />
      </Screen>
    );
  const pairs = groupPairs(runs.data);
  const finished = runs.data.filter((r) => r.status === 'finished');
  const choices = finished.map((r) => ({ value: r.id, label: `${r.name}` }));
  return (
    <Screen title="Side by side" subtitle="Two runs from the same initial conditions under two laws, played in step with their curves overlaid.">
      <Panel title="Your pairs">
        {pairs.length === 0 ? (
          <Empty title="No pairs yet" hint="Launch a run with “Run as a pair under a second law” switched on." action={<Button label="Launch a pair" href="/runs/new" />} />
        ) : (
          <View style={styles.list} role="list">
            {pairs.map((p) => (
              <View key={p.id} style={styles.pair} role="listitem">
                <View style={styles.pairText}>
                  <Txt variant="heading">{modelName(p.runs[0].modelKind)}: {p.runs.map((r) => lawName(r.lawKind)).join(' vs ')}</Txt>
                  <View style={styles.badges}>
                    {p.runs.map((r) => (
                      <StatusBadge key={r.id} status={r.status} percent={r.progress * 100} />
                    ))}
                    <Txt variant="caption">{formatAge(p.runs[0].createdAt)}</Txt>
                  </View>
                </View>
                <Button small label="Compare" href={{ pathname: '/compare', params: { pair: p.id } }} accessibilityLabel={`Compare ${p.runs.map((r) => r.name).join(' and ')}`} />
              </View>
            ))}
          </View>
        )}
      </Panel>
      <Panel title="Any two finished runs" note="Runs not launched as a pair may differ in their initial conditions as well as their laws.">
        {finished.length < 2 ? (
          <Txt variant="small">You need two finished runs for this.</Txt>
        ) : (
          <>
            <ChoiceChips label="Left" value={a} onChange={setA} choices={choices} />
            <ChoiceChips label="Right" value={b} onChange={setB} choices={choices.filter((c) => c.value !== a)} />
            <Button label="Set side by side" disabled={!a || !b || a === b} href={a && b && a !== b ? { pathname: '/compare', params: { a, b } } : undefined} />
          </>
        )}
      </Panel>
    </Screen>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  pair: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.md, paddingVertical: space.sm, borderBottomWidth: 1, borderBottomColor: colors.border, flexWrap: 'wrap' },
  pairText: { flex: 1, gap: space.xs, minWidth: 220 },
  badges: { flexDirection: 'row', gap: space.sm, alignItems: 'center', flexWrap: 'wrap' },
});
