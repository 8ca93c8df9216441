import { useMemo, useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import type { RunDetail } from '../../shared/api/contract';
import { colors, lawColor, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { usePlayhead, useFrameTime } from '../../hooks/playback';
import { useRunEvents } from '../../hooks/runEvents';
import { readOutput, specOf, type RunOutputView } from '../lib/runOutput';
import { lawInfo, lawName } from '../../shared/engine';
import { useRun, useRuns, useSnapshots } from '../../hooks/runs';
import { isFinal } from '../lib/runStatus';
import { Button } from '../Button';
import { lawModules } from '../../shared/engine';

const LAW_ORDER = lawModules().map((m) => m.kind);
import { Panel } from '../Panel';
import { ParticleView, type Projection } from '../ParticleView';
import { PlaybackControls } from '../PlaybackControls';
import { Screen } from '../Screen';
import { Empty, ErrorState, Loading } from '../States';
import { LawTag, StatusBadge } from '../StatusBadge';
import { Txt } from '../Txt';
import { DiagnosticsPlots, type PlottedRun } from '../run/DiagnosticsPlots';
import { LawNotes, ModelCaution } from '../run/LawNotes';
import { LiveProgress } from '../run/LiveProgress';
import { RotationAtPlayhead } from '../run/RotationAtPlayhead';
import { RotationCurvePlot } from '../run/RotationCurvePlot';
import { SpecTable } from '../run/SpecTable';
import { ComparePicker } from './ComparePicker';
import { SetupVsLaw } from './SetupVsLaw';

// Each side in its law's colour; two runs of the same law kind fall back to the second accent.
function sideColor(run: RunDetail, other: RunDetail): string {
  return run.lawKind === other.lawKind ? colors.link : lawColor(run.lawKind);
}

function Live({ run, lawLabel, color }: { run: RunDetail; lawLabel: string; color: string }) {
  const stream = useRunEvents(run.id, !isFinal(run.status));
  const spec = specOf(run);
  return <LiveProgress run={run} stream={stream} hasPotential={spec ? lawInfo(spec.law).hasPotential : true} lawLabel={lawLabel} color={color} />;
}

/** Both animations on one playhead, then the overlaid curves and diagnostics that follow it. */
function SyncedPlayers({ runs, plotted }: { runs: { run: RunDetail; out: RunOutputView }[]; plotted: PlottedRun[] }) {
  const a = useSnapshots(runs[0].run.id, true);
  const b = useSnapshots(runs[1].run.id, true);
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const [projection, setProjection] = useState<Projection>('xy');
  const framesA = useMemo(() => a.data?.frames ?? [], [a.data]);
  const framesB = useMemo(() => b.data?.frames ?? [], [b.data]);
  // One playhead over the longer of the two runs' snapshot times drives both views.
  const times = useMemo(() => {
    const ta = framesA.map((f) => f.time_Myr);
    const tb = framesB.map((f) => f.time_Myr);
    return (ta[ta.length - 1] ?? 0) >= (tb[tb.length - 1] ?? 0) ? ta : tb;
  }, [framesA, framesB]);
  const playhead = usePlayhead(times);
  const failed = a.error ?? b.error;
  const ready = !a.isPending && !b.isPending && !failed;
  return (
    <>
      <Panel title="Snapshots in step" note="One playhead drives both runs, matched by simulated time.">
        {a.isPending || b.isPending ? (
          <Loading what="Loading snapshots" />
        ) : failed ? (
          <ErrorState error={failed} title="Could not load snapshots" onRetry={() => (a.error ? a.refetch() : b.refetch())} />
        ) : (
          <>
            <View style={[styles.players, wide && styles.playersWide]}>
              {[framesA, framesB].map((frames, k) => (
                <View key={runs[k].run.id} style={[styles.player, wide && styles.half]}>
                  <LawTag kind={runs[k].run.lawKind} label={runs[k].out.law.label} />
                  <ParticleView frames={frames} parts={[a.data, b.data][k]} playhead={playhead} projection={projection} color={plotted[k].color} label={runs[k].run.name} maxSize={wide ? 560 : 520} />
                </View>
              ))}
            </View>
            <PlaybackControls playhead={playhead} times={times} projection={projection} onProjection={setProjection} />
          </>
        )}
      </Panel>
      {ready ? (
        <RotationAtPlayhead
          runs={plotted}
          sources={[
            { id: runs[0].run.id, spec: specOf(runs[0].run), frames: framesA, radii_kpc: runs[0].out.rotationCurves.final.radii_kpc },
            { id: runs[1].run.id, spec: specOf(runs[1].run), frames: framesB, radii_kpc: runs[1].out.rotationCurves.final.radii_kpc },
          ]}
          playhead={playhead}
          times={times}
        />
      ) : (
        <RotationCurvePlot runs={plotted} />
      )}
      {ready ? <PlotsAtPlayhead plotted={plotted} playhead={playhead} times={times} /> : <DiagnosticsPlots runs={plotted} />}
    </>
  );
}

function PlotsAtPlayhead({ plotted, playhead, times }: { plotted: PlottedRun[]; playhead: ReturnType<typeof usePlayhead>; times: number[] }) {
  const t = useFrameTime(playhead, times);
  return <DiagnosticsPlots runs={plotted} markerTime={t} />;
}

function ComparePair({ a, b }: { a: RunDetail; b: RunDetail }) {
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const outA = readOutput(a);
  const outB = readOutput(b);
  const tints = [sideColor(a, b), sideColor(b, a)];
  // Short law names, unless both runs use the same kind (then the full labels tell them apart).
  const same = a.lawKind === b.lawKind;
  const labelA = same && outA ? outA.law.label : lawName(a.lawKind);
  const labelB = same && outB ? outB.law.label : lawName(b.lawKind);
  const done = outA && outB;
  const specA = specOf(a);
  const specB = specOf(b);
  const specs = specA && specB ? <SpecTable columns={[{ title: labelA, color: tints[0], spec: specA }, { title: labelB, color: tints[1], spec: specB }]} /> : null;
  const sameIC = a.pairId !== null && a.pairId === b.pairId;
  const plotted: PlottedRun[] = done ? [{ id: a.id, label: labelA, color: tints[0], out: outA, galaxyId: a.galaxyId }, { id: b.id, label: labelB, color: tints[1], out: outB, galaxyId: b.galaxyId }] : [];

  return (
    <Screen wide title="Side by side" subtitle={`${a.name}  ·  ${b.name}`} actions={<Button small tone="secondary" label="Pick other runs" href="/compare" />}>
      <View style={styles.tags}>
        {[a, b].map((r) => (
          <View key={r.id} style={styles.tagRow}>
            <StatusBadge status={r.status} percent={r.progress * 100} />
            <Button small tone="quiet" label={`Open ${r.name}`} href={{ pathname: '/runs/[id]', params: { id: r.id } }} />
          </View>
        ))}
      </View>
      <ModelCaution />
      <Txt variant="small">{sameIC ? 'Launched as a pair: same model and seed, two force laws. What each run started from is set out below.' : 'These runs were not launched as a pair, so their initial conditions may differ as well as their laws.'}</Txt>
      {[a, b].some((r) => !isFinal(r.status)) ? (
        <View style={[styles.players, wide && styles.playersWide]}>
          {[a, b].map((r, k) => (
            <View key={r.id} style={wide ? styles.half : undefined}>
              {isFinal(r.status) ? <Panel title={`${k ? labelB : labelA} · ${r.name}`}><StatusBadge status={r.status} /></Panel> : <Live run={r} lawLabel={k ? labelB : labelA} color={tints[k]} />}
            </View>
          ))}
        </View>
      ) : null}
      {done ? (
        <>
          <SetupVsLaw a={{ label: labelA, spec: a.spec, out: outA }} b={{ label: labelB, spec: b.spec, out: outB }} />
          {specs}
          <SyncedPlayers runs={[{ run: a, out: outA }, { run: b, out: outB }]} plotted={plotted} />
          <View style={[styles.players, wide && styles.playersWide]}>
            <View style={wide ? styles.half : undefined}><LawNotes info={outA.law} /></View>
            <View style={wide ? styles.half : undefined}><LawNotes info={outB.law} /></View>
          </View>
        </>
      ) : [a, b].every((r) => isFinal(r.status)) ? (
        <>
          <Empty title="Nothing to compare yet" hint="One of these runs ended without output (failed or stopped early)." />
          {specs}
        </>
      ) : (
        <>
          <Txt variant="small">The comparison appears when both runs have finished.</Txt>
          {specs}
        </>
      )}
    </Screen>
  );
}

function CompareIds({ ids }: { ids: [string, string] }) {
  const a = useRun(ids[0]);
  const b = useRun(ids[1]);
  if (a.isPending || b.isPending) return <Loading what="Loading both runs" />;
  const failed = a.error ?? b.error;
  if (failed)
    return (
      <Screen title="Side by side">
        <ErrorState error={failed} title="Could not load the runs" onRetry={() => (a.error ? a.refetch() : b.refetch())} />
      </Screen>
    );
  return <ComparePair a={a.data!} b={b.data!} />;
}

function ComparePairId({ pair }: { pair: string }) {
  const runs = useRuns({ pair });
  if (runs.isPending) return <Loading what="Loading the pair" />;
  if (runs.isError)
    return (
      <Screen title="Side by side">
        <ErrorState error={runs.error} title="Could not load the pair" onRetry={() => runs.refetch()} />
      </Screen>
    );
  if (runs.data.length < 2)
    return (
      <Screen title="Side by side">
        <Empty title="This pair is not complete" hint="A pair has two runs; this one has fewer that you can see." action={<Button label="Pick runs to compare" href="/compare" />} />
      </Screen>
    );
  // Both runs of a pair are created together, so the order is Infall's: the more standard law
  // (Newton, then Newton + halo, then the modified laws) on the left.
  const rank = (kind: string) => LAW_ORDER.indexOf(kind) + 1 || LAW_ORDER.length + 1;
  const [first, second] = [...runs.data].sort((x, y) => rank(x.lawKind) - rank(y.lawKind) || x.name.localeCompare(y.name));
  return <CompareIds ids={[first.id, second.id]} />;
}

/** The compare page: a pair by its id, two runs by theirs, or a picker. */
export function CompareView({ pair, a, b }: { pair?: string; a?: string; b?: string }) {
  if (a && b) return <CompareIds ids={[a, b]} />;
  if (pair) return <ComparePairId pair={pair} />;
  return <ComparePicker />;
}

const styles = StyleSheet.create({
  tags: { gap: space.xs },
  tagRow: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  players: { gap: space.lg },
  playersWide: { flexDirection: 'row', alignItems: 'flex-start' },
  player: { gap: space.sm, alignItems: 'center' },
  half: { flex: 1, minWidth: 0 },
});
