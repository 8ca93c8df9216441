import { StyleSheet, View } from 'react-native';
import { colors, space } from '../../constants/theme';
import { useUsage, type Usage } from '../../hooks/account';
import { formatCount, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { ProgressBar } from '../RunCard';
import { describeError, Loading, Notice } from '../States';
import { Txt } from '../Txt';

export interface Cost {
  particles: number;
  steps: number;
  interactions: number;
  runs: number;
}

/** Why a submission would be refused, in the same terms as the server's quota check. */
export function refusals(cost: Cost, usage: Usage): string[] {
  const out: string[] = [];
  if (cost.particles > usage.limits.maxParticles) out.push(`${formatCount(cost.particles)} particles is over your limit of ${formatCount(usage.limits.maxParticles)}.`);
  if (cost.steps > usage.limits.maxSteps) out.push(`${formatCount(cost.steps)} steps is over your limit of ${formatCount(usage.limits.maxSteps)}.`);
  if (cost.runs > usage.remaining.concurrentRuns)
    out.push(`This needs ${cost.runs} run slot${cost.runs > 1 ? 's' : ''}; you have ${usage.remaining.concurrentRuns} free of ${usage.limits.maxConcurrentRuns} (wait for a run to end, or cancel one).`);
  if (cost.interactions > usage.remaining.interactionsToday)
    out.push(`It costs ${formatInteractions(cost.interactions)} interactions; ${formatInteractions(usage.remaining.interactionsToday)} of today's ${formatInteractions(usage.limits.dailyInteractions)} are left.`);
  return out;
}

function Meter({ label, need, left, total, unit }: { label: string; need: number; left: number; total: number; unit: (n: number) => string }) {
  const over = need > left;
  const used = total - left;
  return (
    <View style={styles.meter}>
      <View style={styles.meterHead}>
        <Txt variant="small" color={colors.text}>
          {label}
        </Txt>
        <Txt variant="mono" color={over ? colors.danger : colors.text}>
          {unit(need)} needed · {unit(left)} left
        </Txt>
      </View>
      <View style={styles.track} accessibilityRole="progressbar" accessibilityLabel={`${label}: needs ${unit(need)}, ${unit(left)} left of ${unit(total)}`}>
        <View style={[styles.used, { width: `${Math.min(100, (used / Math.max(1, total)) * 100)}%` }]} />
        <View style={[styles.need, { width: `${Math.min(100, (need / Math.max(1, total)) * 100)}%`, backgroundColor: over ? colors.danger : colors.accent }]} />
      </View>
    </View>
  );
}

/** What the run will cost against what is left of the budget, and whether it would be refused. */
export function CostPanel({ cost }: { cost: Cost | null }) {
  const usage = useUsage();
  return (
    <Panel title="Cost" note="Counted in pair interactions: particles × particles (direct sum) or the tree's estimate, plus the grid's share for field-form MOND, × force evaluations per step × steps.">
      {!cost ? (
        <Txt variant="small">Fix the highlighted fields to see the cost.</Txt>
      ) : (
        <>
          <Txt variant="mono" color={colors.text} testID="cost-total">
            {formatInteractions(cost.interactions)} interactions · {cost.runs} run{cost.runs > 1 ? 's' : ''} · N = {formatCount(cost.particles)} · {formatCount(cost.steps)} steps
          </Txt>
          {usage.isPending ? (
            <Loading what="Loading your budget" />
          ) : usage.isError ? (
            <Notice tone="warning">{`Your remaining budget could not be loaded (${describeError(usage.error)}); the server checks it on submit.`}</Notice>
          ) : (
            <>
              <Meter label="Daily compute" need={cost.interactions} left={usage.data.remaining.interactionsToday} total={usage.data.limits.dailyInteractions} unit={formatInteractions} />
              <Meter label="Run slots" need={cost.runs} left={usage.data.remaining.concurrentRuns} total={usage.data.limits.maxConcurrentRuns} unit={String} />
              <Txt variant="caption">
                Limits per run: {formatCount(usage.data.limits.maxParticles)} particles, {formatCount(usage.data.limits.maxSteps)} steps.
              </Txt>
              {refusals(cost, usage.data).map((r) => (
                <Notice key={r} tone="danger">
                  {`Would be refused: ${r}`}
                </Notice>
              ))}
            </>
          )}
        </>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  meter: { gap: 4 },
  meterHead: { flexDirection: 'row', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap' },
  track: { height: 8, borderRadius: 4, backgroundColor: colors.surfaceRaised, overflow: 'hidden', flexDirection: 'row' },
  used: { height: 8, backgroundColor: colors.textFaint },
  need: { height: 8 },
});
