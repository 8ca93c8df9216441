import { useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { useRouter } from 'expo-router';
import type { RunDetail } from '../../shared/api/contract';
import { lawInfo, lawName, modelName } from '../../shared/engine';
import { colors, lawColor, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { downloadFile, exportName, curvesCsv, diagnosticsCsv, runJson } from '../lib/exports';
import { useFrameTime } from '../../hooks/playback';
import type { Playhead } from '../lib/playhead';
import { useRunEvents } from '../../hooks/runEvents';
import { readOutput, specOf } from '../lib/runOutput';
import { useRunPlayback } from '../../hooks/runPlayback';
import { useCancelRun, useRun } from '../../hooks/runs';
import { useSession } from '../../hooks/session';
import { isAdmin } from '../lib/roles';
import { isFinal } from '../lib/runStatus';
import { Button } from '../Button';
import { formatAge, formatCount } from '../format';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { describeError, ErrorState, Loading, Notice } from '../States';
import { LawTag, StatusBadge } from '../StatusBadge';
import { Txt } from '../Txt';
import { DiagnosticsPlots, type PlottedRun } from './DiagnosticsPlots';
import { LawNotes, ModelCaution } from './LawNotes';
import { LiveProgress } from './LiveProgress';
import { RotationAtPlayhead } from './RotationAtPlayhead';
import { RunFacts } from './RunFacts';
import { SnapshotFileButton } from './SnapshotFileButton';
import { SnapshotPlayer } from './SnapshotPlayer';
import { SpecTable } from './SpecTable';
import { ExtendRun } from './ExtendRun';

function CancelButton({ run }: { run: RunDetail }) {
  const cancel = useCancelRun(run.id);
  const [armed, setArmed] = useState(false);
  return (
    <View style={{ gap: 4 }}>
      <Button
        tone="danger"
        small
        label={armed ? 'Tap again to stop it' : 'Cancel run'}
        busy={cancel.isPending}
        onPress={() => (armed ? cancel.mutate() : setArmed(true))}
        accessibilityHint="Stops the integration; what was computed is kept only if it was running"
        testID="cancel-run"
      />
      {cancel.isError ? <Txt variant="caption" color={colors.danger}>{describeError(cancel.error)}</Txt> : null}
    </View>
  );
}

function Exports({ run }: { run: RunDetail }) {
  const out = readOutput(run);
  if (!out) return null;
  return (
    <Panel title="Export" note="Diagnostics and rotation curves as CSV (units in the header), everything but the frames with the spec as JSON, or the stored frames as HDF5 (units in its attributes).">
      <View style={styles.buttons}>
        <Button small tone="secondary" label="Diagnostics CSV" onPress={() => downloadFile(exportName(run, 'diagnostics', 'csv'), 'text/csv', diagnosticsCsv(out))} />
        <Button small tone="secondary" label="Rotation curves CSV" onPress={() => downloadFile(exportName(run, 'curves', 'csv'), 'text/csv', curvesCsv(out))} />
        <Button small tone="secondary" label="Everything JSON" onPress={() => downloadFile(exportName(run, 'run', 'json'), 'application/json', runJson(run))} />
        {out.frames.length ? <SnapshotFileButton run={run} /> : null}
      </View>
    </Panel>
  );
}

/** Plots that follow the snapshot on screen (a small subscriber, so the page stays still). */
function PlotsAtPlayhead({ plotted, playhead, times }: { plotted: PlottedRun[]; playhead: Playhead; times: number[] }) {
  const t = useFrameTime(playhead, times);
  return <DiagnosticsPlots runs={plotted} markerTime={t} />;
}

/** The run page: live progress while it runs, then diagnostics, curves, snapshots and exports. */
export function RunView({ id }: { id: string }) {
  const router = useRouter();
  const run = useRun(id);
  const session = useSession();
  const { width } = useWindowDimensions();
  const wide = width >= WIDE_BREAKPOINT;
  const live = Boolean(run.data && !isFinal(run.data.status));
  const stream = useRunEvents(id, live);
  const out = readOutput(run.data);
  const playback = useRunPlayback(id, Boolean(out && out.frames.length));

  if (run.isPending) return <Loading what="Loading run" />;
  if (run.isError)
    return (
      <Screen title="Run">
        <ErrorState error={run.error} title={(run.error as { code?: string }).code === 'NOT_FOUND' ? 'No such run' : 'Could not load this run'} onRetry={() => run.refetch()} />
      </Screen>
    );

  const r = run.data;
  const spec = specOf(r);
  const info = out?.law ?? (spec ? lawInfo(spec.law) : null);
  const color = lawColor(r.lawKind);
  const mine = r.owner.id === session.data?.id || isAdmin(session.data);
  const plotted: PlottedRun[] = out ? [{ id: r.id, label: r.name, color, out, galaxyId: r.galaxyId }] : [];

  const player = out ? <SnapshotPlayer playback={playback} color={color} label={r.name} /> : null;
  const curves = out ? <RotationAtPlayhead runs={plotted} sources={[{ id: r.id, spec, frames: playback.frames, radii_kpc: out.rotationCurves.final.radii_kpc }]} playhead={playback.playhead} times={playback.times} /> : null;
  const notes = info ? <LawNotes info={info} /> : null;
  const specTable = spec ? <SpecTable columns={[{ title: r.name, color, spec }]} /> : null;

  return (
    <Screen
      title={r.name}
      subtitle={`${modelName(r.modelKind)} · N = ${formatCount(r.particles)} · ${formatCount(r.steps)} steps · ${r.owner.name} · ${formatAge(r.createdAt)}`}
      actions={
        <>
          {live && mine ? <CancelButton run={r} /> : null}
          <Button small tone="secondary" label="Clone" onPress={() => router.push({ pathname: '/runs/new', params: { from: r.id } })} accessibilityHint="Opens the new-run form filled with this run's spec" />
          {r.pairId ? (
            <Button href={{ pathname: '/compare', params: { pair: r.pairId } }} small label="Compare the pair" testID="compare-pair" />
          ) : null}
        </>
      }
    >
      <View style={styles.tags}>
        <StatusBadge status={r.status} percent={(stream.progress?.percent ?? r.progress * 100)} />
        <LawTag kind={r.lawKind} label={info?.label ?? lawName(r.lawKind)} />
      </View>
      <ModelCaution />
      {r.status === 'failed' ? <Notice tone="danger">{`This run failed: ${r.error ?? 'no reason was recorded'}`}</Notice> : null}
      {r.status === 'cancelled' ? <Notice tone="warning">This run was stopped before the end{out ? '; the results below cover the part that was computed.' : '.'}</Notice> : null}
      {live ? <LiveProgress run={r} stream={stream} hasPotential={info?.hasPotential ?? true} /> : null}

      {out ? (
        wide ? (
          <View style={styles.columns}>
            <View style={styles.left}>
              {player}
              {specTable}
              {notes}
            </View>
            <View style={styles.right}>
              <RunFacts out={out} />
              {curves}
            </View>
          </View>
        ) : (
          <>
            {player}
            <RunFacts out={out} />
            {curves}
            {specTable}
            {notes}
          </>
        )
      ) : (
        <>
          {specTable}
          {notes}
        </>
      )}
      {out ? <PlotsAtPlayhead plotted={plotted} playhead={playback.playhead} times={playback.times} /> : null}
      {out ? <Exports run={r} /> : null}
      {r.status === 'finished' && mine ? <ExtendRun run={r} /> : null}
      {!out && isFinal(r.status) && r.status !== 'failed' ? <Notice tone="info">This run left no output to show.</Notice> : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  tags: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  left: { flex: 5, gap: space.lg },
  right: { flex: 6, gap: space.lg },
});
