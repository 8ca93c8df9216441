import { useState } from 'react';
import { View } from 'react-native';
import type { RunDetail } from '../../shared/api/contract';
import { colors } from '../../constants/theme';
import { useExtendRun } from '../../hooks/runs';
import { specOf } from '../../hooks/runOutput';
import { Button } from '../Button';
import { NumberField } from '../fields';
import { describeError } from '../States';
import { Txt } from '../Txt';

/** Carries a finished run on from where it ended; the extra steps are charged like a new run. */
export function ExtendRun({ run }: { run: RunDetail }) {
  const extend = useExtendRun(run.id);
  const [more, setMore] = useState<number | undefined>((specOf(run)?.duration_Myr ?? 100) / 2);
  return (
    <View style={{ gap: 4 }}>
      <NumberField label="Carry on for" unit="Myr" value={more} onChange={setMore} min={0} exclusiveMin hint="From the run's last state; the extra steps count against your budget" testID="extend-more" />
      <Button
        small
        tone="secondary"
        label="Carry on"
        busy={extend.isPending}
        disabled={more === undefined || more <= 0}
        onPress={() => more !== undefined && extend.mutate(more)}
        accessibilityHint="Runs this simulation further from its last state"
        testID="extend-run"
      />
      {extend.isError ? <Txt variant="caption" color={colors.danger}>{describeError(extend.error)}</Txt> : null}
    </View>
  );
}
