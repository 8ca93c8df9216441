import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../../constants/theme';
import { useGalaxies, useGalaxySelection } from '../../hooks/galaxies';
import { VISIBILITY_WORDS, type GalaxySummary } from '../../shared/api/galaxies';
import { Button } from '../Button';
import { formatAge, formatCount, formatValue } from '../format';
import { LinePlot } from '../LinePlot';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { Empty, ErrorState, Loading } from '../States';
import { Txt } from '../Txt';
import { rarSeries } from './series';
import { SampleFitForm, SampleFitList } from './SampleView';

function GalaxyCard({ g, selected, onSelect }: { g: GalaxySummary; selected: boolean; onSelect: () => void }) {
  return (
    <View role="listitem" style={styles.card}>
      <Pressable role="checkbox" aria-checked={selected} accessibilityLabel={`Add ${g.name} to the acceleration relation`} onPress={onSelect} style={[styles.check, selected && styles.checkOn]}>
        <Txt variant="caption" color={selected ? colors.accentText : colors.textMuted}>
          {selected ? '✓' : ''}
        </Txt>
      </Pressable>
      <View style={{ flex: 1, gap: 2, minWidth: 180 }}>
        <Txt variant="heading">{g.name}</Txt>
        <Txt variant="caption">
          {formatCount(g.points)} points · {g.owner.name} · {formatAge(g.uploadedAt)} · {g.visibility === 'cohort' && g.cohort ? g.cohort.name : VISIBILITY_WORDS[g.visibility]}
          {g.invented ? ' · invented' : ''}
        </Txt>
      </View>
      <Button small label="Open" href={{ pathname: '/galaxies/[id]', params: { id: String(g.id) } }} accessibilityLabel={`Open galaxy ${g.name}`} />
    </View>
  );
}

/** The acceleration relation of the galaxies ticked in the list, each with its latest fit's mass-to-light ratios. */
function SelectionRar({ ids }: { ids: number[] }) {
  const details = useGalaxySelection(ids);
  const ready = details.filter((d) => d.data).map((d) => d.data!);
  const rar = rarSeries(
    ready.map((g) => {
      const latest = g.fits[0]?.results;
      return { name: g.name, curve: g.curve, fit: latest?.laws.find((l) => l.law === latest.verdict.preferred) ?? null };
    }),
  );
  return (
    <Panel title="Acceleration relation of the selection" note="Observed against baryonic acceleration; mass-to-light ratios from each galaxy's preferred fit (the priors' centres where none). Published relation: McGaugh, Lelli & Schombert 2016.">
      <LinePlot series={rar.series} xLabel="g_bar [m/s²]" yLabel="g_obs [m/s²]" xLog yLog height={260} accessibilityLabel="Acceleration relation of the selected galaxies" emptyText="None of the selected galaxies has baryonic components" testID="selection-rar" />
      <Txt variant="small">
        Scatter about the relation: {formatValue(rar.scatter.rms_dex, 2)} dex rms over {rar.scatter.points} points from {ready.length} galaxies.
      </Txt>
    </Panel>
  );
}

/** Galaxies one may see: one's own, one's cohorts', and the public ones; import a new curve. */
export function GalaxiesView() {
  const galaxies = useGalaxies();
  const [selected, setSelected] = useState<number[]>([]);
  const flip = (id: number) => setSelected((s) => (s.includes(id) ? s.filter((x) => x !== id) : [...s, id]));
  return (
    <Screen title="Galaxies" subtitle="Observed rotation curves, how each law fits them, and the acceleration relation." actions={<Button label="Import a curve" href="/galaxies/import" testID="galaxy-import" />}>
      {galaxies.isPending ? (
        <Loading what="Loading galaxies" />
      ) : galaxies.isError ? (
        <ErrorState error={galaxies.error} title="Could not load galaxies" onRetry={() => galaxies.refetch()} />
      ) : galaxies.data.galaxies.length === 0 ? (
        <Empty title="No galaxies yet" hint="Import a rotation-curve table (CSV or columns of numbers) to fit it under each law." />
      ) : (
        <>
          <Txt variant="small">Tick galaxies to see their acceleration relation together, or to fit them as one sample.</Txt>
          <View role="list" style={{ gap: space.sm }}>
            {galaxies.data.galaxies.map((g) => (
              <GalaxyCard key={g.id} g={g} selected={selected.includes(g.id)} onSelect={() => flip(g.id)} />
            ))}
          </View>
          {selected.length ? <SelectionRar ids={selected} /> : null}
          {selected.length ? <SampleFitForm ids={selected} /> : null}
          <SampleFitList />
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  card: { flexDirection: 'row', alignItems: 'center', gap: space.md, padding: space.md, borderWidth: 1, borderColor: colors.border, borderRadius: radius.md, backgroundColor: colors.surface, flexWrap: 'wrap' },
  check: { width: 28, height: 28, borderRadius: radius.sm, borderWidth: 1, borderColor: colors.borderStrong, alignItems: 'center', justifyContent: 'center' },
  checkOn: { backgroundColor: colors.accent, borderColor: colors.accent },
});
