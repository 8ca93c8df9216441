import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Link, useRouter } from 'expo-router';
import { colors, space } from '../../constants/theme';
import { useFitSample, useSampleFit, useSampleFits } from '../../hooks/galaxies';
import { SAMPLE_MAX_GALAXIES, type GalaxySampleRecord } from '../../shared/api/galaxies';
import { FIT_LAWS, type FitLaw, type SampleLawFit } from '../../shared/galaxy/fit';
import { fitFamilies } from '../../shared/engine';
import { Button } from '../Button';
import { ChoiceChips, Toggle } from '../fields';
import { formatAge, formatValue } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, ErrorState, Loading, Notice } from '../States';
import { Txt } from '../Txt';
import { fitLook } from './series';
import { paramText } from './GalaxyView';

// Ticked at first: the fit families with a parameter the whole sample shares (a0, H0 and the halo
// scaling relation fitted).
const SHARING_FITS = fitFamilies()
  .filter((f) => f.shared({ a0: 'free', a0_m_s2: 1.2e-10, H0: 'free', H0_km_s_Mpc: 70 }, true).length > 0)
  .map((f) => f.id);

/** Fits the ticked galaxies together and opens the sample's page. */
export function SampleFitForm({ ids }: { ids: number[] }) {
  const fit = useFitSample();
  const router = useRouter();
  const [laws, setLaws] = useState<FitLaw[]>(SHARING_FITS);
  const [a0, setA0] = useState<'fixed' | 'free'>('free');
  const [H0, setH0] = useState<'fixed' | 'free'>('free');
  const flip = (law: FitLaw) => setLaws((l) => (l.includes(law) ? l.filter((x) => x !== law) : FIT_LAWS.filter((x) => x === law || l.includes(x))));
  const tooFew = ids.length < 2;
  const tooMany = ids.length > SAMPLE_MAX_GALAXIES;
  return (
    <Panel title="Fit the selection as a sample" note="One a0 (MOND), one H0 (emergent) or one concentration–mass normalisation (NFW) shared by all ticked galaxies; each galaxy keeps its own halo speed and mass-to-light ratios.">
      <View style={styles.toggles}>
        {FIT_LAWS.map((law) => (
          <View key={law} style={styles.toggle}>
            <Toggle label={fitLook(law).label} value={laws.includes(law)} onChange={() => flip(law)} />
          </View>
        ))}
      </View>
      <ChoiceChips label="MOND's a0" value={a0} onChange={setA0} choices={[{ value: 'free', label: 'shared, fitted', note: 'one a0 for the sample' }, { value: 'fixed', label: 'fixed', note: 'held at 1.2e-10 m/s²' }]} compact />
      <ChoiceChips label="Emergent gravity's H0" value={H0} onChange={setH0} choices={[{ value: 'free', label: 'shared, fitted', note: 'one H0 for the sample' }, { value: 'fixed', label: 'fixed', note: 'held at 70 km/s/Mpc' }]} compact />
      <Button
        label={`Fit ${ids.length} galaxies together`}
        disabled={tooFew || tooMany || laws.length === 0}
        busy={fit.isPending}
        onPress={() => fit.mutate({ galaxyIds: ids, laws, a0, H0 }, { onSuccess: (r) => router.push({ pathname: '/galaxies/samples/[id]', params: { id: String(r.id) } }) })}
        testID="sample-fit"
      />
      {tooFew ? <Txt variant="caption">Tick at least two galaxies.</Txt> : null}
      {tooMany ? <Txt variant="caption">A sample has at most {SAMPLE_MAX_GALAXIES} galaxies.</Txt> : null}
      {laws.length === 0 ? <Txt variant="caption">Choose at least one law.</Txt> : null}
      {fit.isError ? <Notice tone="danger">{describeError(fit.error)}</Notice> : null}
    </Panel>
  );
}

/** One's own sample fits, newest first, each a link to its page; nothing shows until there is one. */
export function SampleFitList() {
  const samples = useSampleFits();
  if (!samples.data?.samples.length) return null;
  return (
    <Panel title="Your sample fits">
      {samples.data.samples.slice(0, 10).map((s) => (
        <Link key={s.id} href={{ pathname: '/galaxies/samples/[id]', params: { id: String(s.id) } }}>
          <Txt variant="small" color={colors.accent}>
            {s.galaxies.map((g) => g.name.split(' (')[0]).join(', ')} · {s.laws.map((l) => fitLook(l).label).join(', ')} · {formatAge(s.createdAt)}
          </Txt>
        </Link>
      ))}
    </Panel>
  );
}

function LawVerdict({ l, deltaBic, preferred }: { l: SampleLawFit; deltaBic: number; preferred: boolean }) {
  return (
    <View style={styles.lawRow} accessibilityLabel={`${l.label} sample fit`} testID={`sample-law-${l.law}`}>
      <View style={styles.head}>
        <View style={[styles.swatch, { backgroundColor: fitLook(l.law).color }]} />
        <Txt variant="heading">{l.label}</Txt>
        {preferred ? (
          <Txt variant="caption" color={colors.accent}>
            preferred
          </Txt>
        ) : null}
      </View>
      <Txt variant="mono" accessibilityLabel={`summed chi squared ${formatValue(l.chi2)} over ${l.points} points, BIC ${formatValue(l.bic)}, delta BIC ${formatValue(deltaBic)}`}>
        Σχ² {formatValue(l.chi2)} · χ²/ν {formatValue(l.reducedChi2)} (ν = {l.dof}) · BIC {formatValue(l.bic)} · ΔBIC {formatValue(deltaBic)}
      </Txt>
      {l.shared.length ? (
        l.shared.map((p) => (
          <Txt key={p.name} variant="mono" color={colors.text}>
            shared {paramText(p)}
          </Txt>
        ))
      ) : (
        <Txt variant="caption">No shared parameter under this law: each galaxy is fitted on its own inside the joint fit.</Txt>
      )}
      {l.galaxies.map((g) => (
        <Txt key={g.name} variant="small">
          {g.name}: χ² {formatValue(g.chi2)} over {g.points} points; {g.params.map(paramText).join('; ')}
        </Txt>
      ))}
      <Txt variant="caption">{fitLook(l.law).note}</Txt>
    </View>
  );
}

export function SampleResults({ record }: { record: GalaxySampleRecord }) {
  const { laws, refused, verdict } = record.results;
  return (
    <View style={{ gap: space.md }} testID="sample-results">
      <Txt variant="small">
        Fitted {formatAge(record.createdAt)} by {record.requestedBy.name}; a0 {record.request.a0}, H0 {record.request.H0}. Preferred by the sample's BIC (lower is better):{' '}
        <Txt variant="small" color={colors.accent}>
          {laws.find((l) => l.law === verdict.preferred)?.label ?? verdict.preferred}
        </Txt>
      </Txt>
      {laws.map((l) => (
        <LawVerdict key={l.law} l={l} deltaBic={verdict.deltaBic[l.law] ?? 0} preferred={l.law === verdict.preferred} />
      ))}
      {refused.map((r) => (
        <Txt key={r.law} variant="small" color={colors.warning}>
          {fitLook(r.law).label}: not fitted. {r.reason}
        </Txt>
      ))}
    </View>
  );
}

/** One joint fit across several galaxies: per law the shared parameter, summed chi^2 and BIC. */
export function SampleView({ id }: { id: number }) {
  const sample = useSampleFit(id);
  if (sample.isPending) return <Loading what="Loading the sample fit" />;
  if (sample.isError) return <ErrorState error={sample.error} title="Could not load this sample fit" onRetry={() => sample.refetch()} />;
  const s = sample.data;
  return (
    <Screen title={`Sample of ${s.galaxies.length} galaxies`} subtitle="One shared parameter per law across the galaxies, each galaxy's own parameters fitted beside it.">
      <Notice tone="warning">Numerical models of these tables under each law's assumptions and the stated priors, not measurements.</Notice>
      <Panel title="Galaxies">
        {s.galaxies.map((g) => (
          <Link key={g.id} href={{ pathname: '/galaxies/[id]', params: { id: String(g.id) } }}>
            <Txt variant="small" color={colors.accent}>
              {g.name} (#{g.id})
            </Txt>
          </Link>
        ))}
      </Panel>
      <Panel title="Per-law verdict" note="Shared a0 (MOND), H0 (emergent) or the concentration–mass normalisation (NFW) with 1σ from the covariance at the optimum; Σχ² over all galaxies' points; BIC = Σχ² + k ln N.">
        <SampleResults record={s} />
      </Panel>
    </Screen>
  );
}

const styles = StyleSheet.create({
  toggles: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  toggle: { flexBasis: 140, flexGrow: 1 },
  lawRow: { gap: space.xs, paddingTop: space.sm, borderTopWidth: 1, borderTopColor: colors.border },
  head: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  swatch: { width: 14, height: 14, borderRadius: 3 },
});
