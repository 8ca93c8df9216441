import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';
import { colors, space } from '../../constants/theme';
import { useCohorts } from '../../hooks/cohorts';
import { useDeleteGalaxy, useFitGalaxy, useGalaxy, useRunsFromGalaxy, useUpdateGalaxy } from '../../hooks/galaxies';
import { HALO_FITS } from '../../shared/galaxy/toRun';
import { API_BASE } from '../lib/api';
import { FIT_LAWS, type FitLaw, type LawFit } from '../../shared/galaxy/fit';
import { VISIBILITY_WORDS, type GalaxyDetail, type GalaxyFitRecord, type GalaxyVisibility } from '../../shared/api/galaxies';
import { Button } from '../Button';
import { ChoiceChips, Toggle } from '../fields';
import { formatAge, formatCount, formatValue } from '../format';
import { LinePlot } from '../LinePlot';
import { Panel } from '../Panel';
import { Fact } from '../run/RunFacts';
import { Screen } from '../Screen';
import { describeError, ErrorState, Loading, Notice } from '../States';
import { Txt } from '../Txt';
import { componentSeries, dataSeries, fitLook, otherFitSeries, rarSeries, residualSeries } from './series';

function FitForm({ galaxy }: { galaxy: GalaxyDetail }) {
  const fit = useFitGalaxy(galaxy.id);
  const [laws, setLaws] = useState<FitLaw[]>([...FIT_LAWS]);
  const [a0, setA0] = useState<'fixed' | 'free'>('fixed');
  const [H0, setH0] = useState<'fixed' | 'free'>('fixed');
  const flip = (law: FitLaw) => setLaws((l) => (l.includes(law) ? l.filter((x) => x !== law) : FIT_LAWS.filter((x) => x === law || l.includes(x))));
  return (
    <Panel title="Fit" note="Least squares per law, with the stellar mass-to-light ratios free under a stated prior; compared by BIC.">
      <View style={styles.lawToggles}>
        {FIT_LAWS.map((law) => (
          <View key={law} style={styles.lawToggle}>
            <Toggle label={fitLook(law).label} value={laws.includes(law)} onChange={() => flip(law)} />
          </View>
        ))}
      </View>
      <ChoiceChips label="MOND's a0" value={a0} onChange={setA0} choices={[{ value: 'fixed', label: 'fixed', note: 'held at 1.2e-10 m/s² (Begeman, Broeils & Sanders 1991)' }, { value: 'free', label: 'free', note: 'fitted, within 1e-11 to 1e-9 m/s²' }]} compact />
      <ChoiceChips label="Emergent gravity's H0" value={H0} onChange={setH0} choices={[{ value: 'fixed', label: 'fixed', note: 'held at 70 km/s/Mpc' }, { value: 'free', label: 'free', note: 'fitted, within 20 to 200 km/s/Mpc' }]} compact />
      <Button label="Fit the curve" disabled={laws.length === 0} busy={fit.isPending} onPress={() => fit.mutate({ laws, a0, H0 })} testID="fit-run" />
      {laws.length === 0 ? <Txt variant="caption">Choose at least one law.</Txt> : null}
      {fit.isError ? <Notice tone="danger">{describeError(fit.error)}</Notice> : null}
    </Panel>
  );
}

export function paramText(p: LawFit['params'][number]): string {
  const err = p.error === null ? '' : ` ± ${formatValue(p.error, 2)}`;
  return `${p.name} = ${formatValue(p.value)}${err}${p.unit ? ` ${p.unit}` : ''}${p.atBound ? ' (at its bound)' : ''}`;
}

function FitTable({ record }: { record: GalaxyFitRecord }) {
  const { laws, refused = [], verdict } = record.results;
  return (
    <View style={{ gap: space.md }} testID="fit-table">
      <Txt variant="small">
        Fitted {formatAge(record.createdAt)} by {record.requestedBy.name}; a0 {record.request.a0}, H0 {record.request.H0}. Preferred by BIC (lower is better):{' '}
        <Txt variant="small" color={colors.accent}>
          {laws.find((l) => l.law === verdict.preferred)?.label ?? verdict.preferred}
        </Txt>
      </Txt>
      {laws.map((l) => (
        <View key={l.law} style={styles.fitRow} accessibilityLabel={`${l.label} fit`}>
          <View style={styles.fitHead}>
            <View style={[styles.swatch, { backgroundColor: fitLook(l.law).color }]} />
            <Txt variant="heading">{l.label}</Txt>
          </View>
          <Txt variant="mono" accessibilityLabel={`chi squared ${formatValue(l.chi2)}, reduced ${formatValue(l.reducedChi2)} over ${l.dof} degrees of freedom, AIC ${formatValue(l.aic)}, BIC ${formatValue(l.bic)}`}>
            χ² {formatValue(l.chi2)} · χ²/ν {formatValue(l.reducedChi2)} (ν = {l.dof}) · AIC {formatValue(l.aic)} · BIC {formatValue(l.bic)} · ΔBIC {formatValue(verdict.deltaBic[l.law] ?? 0)}
          </Txt>
          {l.params.map((p) => (
            <Txt key={p.name} variant="mono">
              {paramText(p)}
            </Txt>
          ))}
          <Txt variant="caption">{fitLook(l.law).note}</Txt>
        </View>
      ))}
      {refused.map((r) => (
        <Txt key={r.law} variant="small" color={colors.warning}>
          {fitLook(r.law).label}: not fitted. {r.reason}
        </Txt>
      ))}
    </View>
  );
}

/** A pair of runs from the newest Newtonian fit: the fitted disk, bulge and halo, against field-form MOND. */
function RunFromFit({ galaxy, record }: { galaxy: GalaxyDetail; record: GalaxyFitRecord }) {
  const start = useRunsFromGalaxy(galaxy.id);
  const router = useRouter();
  const halo = record.results.laws.filter((l) => (HALO_FITS as readonly string[]).includes(l.law)).reduce<LawFit | null>((a, b) => (!a || b.bic < a.bic ? b : a), null);
  if (!halo) return null;
  return (
    <Panel
      title="Run it"
      note="Two runs from the same particles: an exponential disk (gas folded in) and Hernquist bulge fitted to this fit's scaled baryons, under Newton with the fitted halo as a rigid field, and under field-form MOND. 1,000 particles, 250 Myr; charged to your quota."
    >
      <Button
        label={`Start a pair from the ${fitLook(halo.law).label} fit`}
        busy={start.isPending}
        onPress={() => start.mutate({ fitId: record.id, halo: halo.law as (typeof HALO_FITS)[number] }, { onSuccess: ({ runs }) => router.push({ pathname: '/compare', params: { pair: runs[0].pairId! } }) })}
        testID="galaxy-run-pair"
      />
      {start.isError ? <Notice tone="danger">{describeError(start.error)}</Notice> : null}
    </Panel>
  );
}

function Sharing({ galaxy }: { galaxy: GalaxyDetail }) {
  const router = useRouter();
  const update = useUpdateGalaxy(galaxy.id);
  const remove = useDeleteGalaxy(galaxy.id);
  const cohorts = useCohorts();
  const [confirm, setConfirm] = useState(false);
  const choose = (visibility: GalaxyVisibility) => {
    if (visibility !== 'cohort') update.mutate({ visibility, cohortId: null });
    else if (cohorts.data?.length) update.mutate({ visibility, cohortId: galaxy.cohort?.id ?? cohorts.data[0].id });
  };
  return (
    <Panel title="Sharing" note={`Seen by ${VISIBILITY_WORDS[galaxy.visibility]}${galaxy.cohort ? ` (${galaxy.cohort.name})` : ''}.`}>
      <ChoiceChips
        value={galaxy.visibility}
        onChange={choose}
        compact
        choices={[
          { value: 'private', label: 'Only me' },
          ...(cohorts.data?.length ? [{ value: 'cohort' as const, label: 'A cohort' }] : []),
          { value: 'public', label: 'Everyone signed in' },
        ]}
      />
      {galaxy.visibility === 'cohort' && (cohorts.data?.length ?? 0) > 1 ? (
        <ChoiceChips label="Cohort" value={galaxy.cohort?.id ?? 0} onChange={(id) => update.mutate({ visibility: 'cohort', cohortId: id })} choices={cohorts.data!.map((c) => ({ value: c.id, label: c.name }))} compact />
      ) : null}
      {update.isError ? <Notice tone="danger">{describeError(update.error)}</Notice> : null}
      <View style={styles.inline}>
        {confirm ? (
          <>
            <Txt variant="small">Delete this galaxy, its file and its fits?</Txt>
            <Button small tone="danger" label="Delete" busy={remove.isPending} onPress={() => remove.mutate(undefined, { onSuccess: () => router.replace('/galaxies') })} />
            <Button small tone="quiet" label="Keep it" onPress={() => setConfirm(false)} />
          </>
        ) : (
          <Button small tone="danger" label="Delete…" onPress={() => setConfirm(true)} />
        )}
      </View>
      {remove.isError ? <Notice tone="danger">{describeError(remove.error)}</Notice> : null}
    </Panel>
  );
}

/** One galaxy: its data, how each law fits it, the acceleration relation, and who sees it. */
export function GalaxyView({ id }: { id: number }) {
  const galaxy = useGalaxy(id);
  const latest = galaxy.data?.fits[0] ?? null;
  const [picked, setPicked] = useState<FitLaw | null>(null);
  const chosen = latest ? (latest.results.laws.find((l) => l.law === picked) ?? latest.results.laws.find((l) => l.law === latest.results.verdict.preferred) ?? null) : null;
  const rar = useMemo(() => (galaxy.data ? rarSeries([{ name: galaxy.data.name, curve: galaxy.data.curve, fit: chosen }]) : null), [galaxy.data, chosen]);

  if (galaxy.isPending) return <Loading what="Loading the galaxy" />;
  if (galaxy.isError) return <ErrorState error={galaxy.error} title="Could not load this galaxy" onRetry={() => galaxy.refetch()} />;
  const g = galaxy.data;
  const curveSeries = [dataSeries(g.curve), ...(chosen ? componentSeries(chosen) : []), ...(latest ? otherFitSeries(latest.results.laws, chosen?.law ?? null) : [])];

  return (
    <Screen
      title={g.name}
      subtitle={`${formatCount(g.points)} points · ${g.owner.name} · uploaded ${formatAge(g.uploadedAt)} · ${VISIBILITY_WORDS[g.visibility]}`}
      actions={<Button small tone="secondary" label="Raw file" accessibilityLabel={`Download ${g.fileName}`} onPress={() => globalThis.open?.(`${API_BASE}/api/galaxies/${g.id}/file`)} />}
    >
      {g.invented ? <Notice tone="info">An invented galaxy, made up for the demonstration: not an observation.</Notice> : null}
      <Notice tone="warning">
        Numerical models. Each fitted curve is a model of this table under one law's assumptions and the stated priors; it is not a measurement, and a good χ² does not make a law right outside its domain.
      </Notice>
      <View style={styles.facts}>
        {g.curve.distanceMpc ? <Fact label="distance" value={`${formatValue(g.curve.distanceMpc.value)}${g.curve.distanceMpc.error ? ` ± ${formatValue(g.curve.distanceMpc.error, 2)}` : ''}`} unit="Mpc" /> : null}
        {g.curve.inclinationDeg ? <Fact label="inclination" value={`${formatValue(g.curve.inclinationDeg.value)}${g.curve.inclinationDeg.error ? ` ± ${formatValue(g.curve.inclinationDeg.error, 2)}` : ''}`} unit="°" /> : null}
        <Fact label="outermost radius" value={formatValue(g.curve.radiusKpc[g.curve.radiusKpc.length - 1])} unit="kpc" />
        <Fact label="components" value={[g.curve.vGas && 'gas', g.curve.vDisk && 'stellar disk', g.curve.vBulge && 'bulge'].filter(Boolean).join(', ') || 'none'} />
      </View>

      <Panel title="Rotation curve" note={chosen ? `Observed speeds with 1σ error bars; ${chosen.label} and its parts. Other fits are in the legend.` : 'Observed speeds with 1σ error bars. Fit the curve to see each law’s model.'}>
        {latest ? (
          <ChoiceChips value={chosen?.law ?? latest.results.verdict.preferred} onChange={setPicked} compact choices={latest.results.laws.map((l) => ({ value: l.law, label: fitLook(l.law).label }))} />
        ) : null}
        <LinePlot series={curveSeries} xLabel="radius [kpc]" yLabel="speed [km/s]" yFromZero xFromZero height={260} accessibilityLabel={`Rotation curve of ${g.name}${chosen ? ` with the ${chosen.label} fit` : ''}`} testID="galaxy-curve" />
      </Panel>

      {latest ? (
        <Panel title="Residuals" note="(observed − model) / error at each radius: a good fit scatters within ±1 to ±2 without a trend.">
          <LinePlot series={residualSeries(latest.results.laws)} xLabel="radius [kpc]" yLabel="residual [σ]" xFromZero height={200} accessibilityLabel="Normalised residuals of each fit" testID="galaxy-residuals" />
        </Panel>
      ) : null}

      <Panel
        title="Radial acceleration relation"
        note={`g_obs = v²/R against g_bar = v_bar²/R, with mass-to-light ratios ${chosen ? `from the ${chosen.label} fit` : 'at the priors’ centres'}. Published relation: McGaugh, Lelli & Schombert 2016.`}
      >
        {g.curve.vGas || g.curve.vDisk || g.curve.vBulge ? (
          <>
            <LinePlot series={rar!.series} xLabel="g_bar [m/s²]" yLabel="g_obs [m/s²]" xLog yLog height={260} accessibilityLabel="Observed against baryonic acceleration, log-log, with the published relation" testID="galaxy-rar" />
            <Txt variant="small" testID="rar-scatter">
              Scatter about the relation: {formatValue(rar!.scatter.rms_dex, 2)} dex rms, mean offset {formatValue(rar!.scatter.mean_dex, 2)} dex, over {rar!.scatter.points} points.
            </Txt>
          </>
        ) : (
          <Txt variant="small">This table has no baryonic components, so there is no baryonic acceleration to plot.</Txt>
        )}
      </Panel>

      <FitForm galaxy={g} />
      {latest ? (
        <Panel title="Fit results" note="Uncertainties are 1σ from the covariance at the optimum; a parameter at its bound has no fair error bar.">
          <FitTable record={latest} />
        </Panel>
      ) : null}
      {latest ? <RunFromFit galaxy={g} record={latest} /> : null}
      {g.canManage ? <Sharing galaxy={g} /> : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  inline: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  lawToggles: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  lawToggle: { flexBasis: 140, flexGrow: 1 },
  fitRow: { gap: space.xs, paddingTop: space.sm, borderTopWidth: 1, borderTopColor: colors.border },
  fitHead: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  swatch: { width: 14, height: 14, borderRadius: 3 },
});
