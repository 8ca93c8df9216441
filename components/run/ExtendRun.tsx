import { useState } from 'react';
import { View } from 'react-native';
import type { RunDetail } from '../../shared/api/contract';
import { colors } from '../../constants/theme';
import { useExtendRun } from '../../hooks/runs';
import { specOf } from '../lib/runOutput';
import { Button } from '../Button';
import { NumberField } from '../fields';
import { Panel } from '../Panel';
import { describeError } from '../States';
import { Txt } from '../Txt';

/** Carries a finished run on from where it ended; the extra steps are charged like a new run. */
export function ExtendRun({ run }: { run: RunDetail }) {
  const extend = useExtendRun(run.id);
  const [more, setMore] = useState<number | undefined>((specOf(run)?.duration_Myr ?? 100) / 2);
  return (
    <Panel title="Carry on" note="Run this simulation further from where it ended. The extra steps count against your budget like a new run; the results shown stay until the longer run replaces them.">
      <View style={{ gap: 8, maxWidth: 360 }}>
        <NumberField label="More time" unit="Myr" value={more} onChange={setMore} min={0} exclusiveMin testID="extend-more" />
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
    </Panel>
  );
}
