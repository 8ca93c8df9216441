import { useState } from 'react';
import { View } from 'react-native';
import { space } from '../../constants/theme';
import type { useRunPlayback } from '../../hooks/runPlayback';
import { Panel } from '../Panel';
import { ParticleView, type Projection } from '../ParticleView';
import { PlaybackControls } from '../PlaybackControls';
import { Empty, ErrorState, Loading } from '../States';

/** The snapshot animation of one run, with its controls. */
export function SnapshotPlayer({ playback, color, label }: { playback: ReturnType<typeof useRunPlayback>; color: string; label: string }) {
  const { snaps, frames, parts, times, playhead } = playback;
  const [projection, setProjection] = useState<Projection>('xy');
  return (
    <Panel title="Snapshots" note={frames.length ? `${frames.length} stored snapshots of ${frames[0].positions.length / 3} particles.` : undefined}>
      {snaps.isPending ? (
        <Loading what="Loading snapshots" />
      ) : snaps.isError ? (
        <ErrorState error={snaps.error} title="Could not load snapshots" onRetry={() => snaps.refetch()} />
      ) : frames.length === 0 ? (
        <Empty title="No snapshots" hint="This run stored no snapshots." />
      ) : (
        <View style={{ gap: space.md }}>
          <ParticleView frames={frames} parts={parts} playhead={playhead} projection={projection} color={color} label={label} />
          <PlaybackControls playhead={playhead} times={times} projection={projection} onProjection={setProjection} />
        </View>
      )}
    </Panel>
  );
}
