import { StyleSheet, View } from 'react-native';
import { colors, space } from '../../constants/theme';
import { useUsage, type Usage } from '../../hooks/account';
import type { QuotaRefusal } from '../../shared/api/accounts';
import { particleCount, stepCount, type RunSpec } from '../../shared/spec';
import { modelModule } from '../../shared/engine';
import { describeRefusal, groupDigits, interactionsText } from '../../shared/api/quotaWords';
import { formatBound, formatCount, formatInteractions } from '../format';
import { Panel } from '../Panel';
import { describeError, Loading, Notice } from '../States';
import { Txt } from '../Txt';

export interface Cost {
  particles: number;
  steps: number;
  interactions: number;
  runs: number;
}

/** What the server's quota check would refuse, in its own terms. */
export function quotaRefusals(cost: Cost, usage: Usage): QuotaRefusal[] {
  const { limits, remaining } = usage;
  const out: QuotaRefusal[] = [];
  if (cost.particles > limits.maxParticles) out.push({ limit: 'maxParticles', max: limits.maxParticles, needed: cost.particles, remaining: limits.maxParticles });
  if (cost.steps > limits.maxSteps) out.push({ limit: 'maxSteps', max: limits.maxSteps, needed: cost.steps, remaining: limits.maxSteps });
  if (cost.runs > remaining.concurrentRuns) out.push({ limit: 'maxConcurrentRuns', max: limits.maxConcurrentRuns, needed: cost.runs, remaining: remaining.concurrentRuns });
  if (cost.interactions > remaining.interactionsToday) out.push({ limit: 'dailyInteractions', max: limits.dailyInteractions, needed: Math.ceil(cost.interactions), remaining: remaining.interactionsToday });
  return out;
}

/** Why a submission would be refused, in the same sentences the server answers with. */
export function refusals(cost: Cost, usage: Usage): string[] {
  return quotaRefusals(cost, usage).map((r) => describeRefusal(r, cost.runs));
}

/** The fields that set the particle count, as the model module names them (its N, its live halo's, both systems' of an encounter). */
function particleFields(draft: Record<string, unknown>): string[] {
  const model = draft.model as { kind?: string } | undefined;
  try {
    return modelModule(String(model?.kind)).particleFields(model).map((p) => `model.${p}`);
  } catch {
    return []; // half-typed: the fields say what is wrong
  }
}

const finitePositive = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0;

/**
 * The person's own limits beside the fields that set them (`hints`), and the fields that break
 * one (`marks`), by issue key; both are empty until their usage has loaded.
 */
export function quotaFieldNotes(draft: Record<string, unknown>, cost: Cost | null, usage: Usage | undefined): { hints: Record<string, string>; marks: Record<string, string> } {
  const hints: Record<string, string> = {};
  const marks: Record<string, string> = {};
  if (!usage) return { hints, marks };
  const { maxParticles, maxSteps } = usage.limits;
  const nFields = particleFields(draft);
  for (const key of nFields) hints[key] = `your limit ${groupDigits(maxParticles)} particles${nFields.length > 1 ? ' for both together' : ''}`;
  const { timestep_Myr: dt, duration_Myr: duration } = draft;
  if (finitePositive(dt)) hints.duration_Myr = `your limit ${groupDigits(maxSteps)} steps, ${formatBound(maxSteps * dt)} Myr at this timestep`;
  if (finitePositive(duration)) hints.timestep_Myr = `your limit ${groupDigits(maxSteps)} steps, so at least ${formatBound(duration / maxSteps)} Myr for this duration`;
  // Particles and steps are checked on the draft itself, so the field is marked even while
  // another field is still being typed; the daily budget needs the whole cost.
  const particles = particleCount(draft as unknown as RunSpec);
  if (particles > maxParticles) for (const key of nFields) marks[key] = `${groupDigits(particles)} particles is over your limit of ${groupDigits(maxParticles)} per run`;
  const steps = finitePositive(dt) && finitePositive(duration) ? stepCount({ timestep_Myr: dt, duration_Myr: duration } as RunSpec) : 0;
  if (steps > maxSteps) for (const key of ['duration_Myr', 'timestep_Myr']) marks[key] = `${groupDigits(steps)} steps is over your limit of ${groupDigits(maxSteps)} per run`;
  if (cost && Math.ceil(cost.interactions) > usage.remaining.interactionsToday)
    for (const key of nFields) marks[key] ??= `${interactionsText(cost.interactions)} pair interactions is more than the ${interactionsText(usage.remaining.interactionsToday)} left of your budget today`;
  return { hints, marks };
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
                  {`Would be refused. ${r}`}
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
