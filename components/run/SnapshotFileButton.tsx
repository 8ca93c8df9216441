import { View } from 'react-native';
import { useMutation } from '@tanstack/react-query';
import type { RunDetail } from '../../shared/api/contract';
import { colors } from '../../constants/theme';
import { downloadSnapshotFile } from '../lib/exports';
import { Button } from '../Button';
import { describeError } from '../States';
import { Txt } from '../Txt';

/** Downloads the run's stored frames as HDF5; the server writes the file, so it can take a moment. */
export function SnapshotFileButton({ run }: { run: RunDetail }) {
  const save = useMutation({ mutationFn: () => downloadSnapshotFile(run) });
  return (
    <View style={{ gap: 4 }}>
      <Button
        small
        tone="secondary"
        label="Snapshots HDF5"
        busy={save.isPending}
        onPress={() => save.mutate()}
        accessibilityHint="Downloads every stored frame: positions, velocities, masses, particle ids and components, with units"
        testID="download-snapshots"
      />
      {save.isError ? <Txt variant="caption" color={colors.danger}>{describeError(save.error)}</Txt> : null}
    </View>
  );
}
