import { lawName, modelName } from '../shared/engine';
import { Pressable, StyleSheet, View } from 'react-native';
import { Link } from 'expo-router';
import type { RunSummary } from '../shared/api/contract';
import { colors, lawColor, radius, space } from '../constants/theme';
import { formatAge, formatCount } from './format';
import { LawTag, StatusBadge, statusLabel } from './StatusBadge';
import { Txt } from './Txt';

export function ProgressBar({ value, color = colors.accent, label }: { value: number; color?: string; label: string }) {
  const pct = Math.round(Math.min(1, Math.max(0, value)) * 100);
  return (
    <View style={styles.bar} role="progressbar" accessibilityLabel={label} accessibilityValue={{ min: 0, max: 100, now: pct }}>
      <View style={[styles.barFill, { width: `${pct}%`, backgroundColor: color }]} />
    </View>
  );
}

/** One run in a list: what it is, where it stands, and a way into it. */
export function RunCard({ run, showOwner }: { run: RunSummary; showOwner?: boolean }) {
  const model = modelName(run.modelKind);
  const law = lawName(run.lawKind);
  return (
    <Link href={{ pathname: '/runs/[id]', params: { id: run.id } }} asChild>
      <Pressable
        role="link"
        accessibilityLabel={`${run.name}: ${model} under ${law}, ${formatCount(run.particles)} particles, ${statusLabel(run.status)}`}
        style={StyleSheet.flatten([styles.card, { borderLeftColor: lawColor(run.lawKind) }])}
        testID={`run-${run.id}`}
      >
        <View style={styles.top}>
          <Txt variant="heading" numberOfLines={2} style={styles.name}>
            {run.name}
          </Txt>
          <StatusBadge status={run.status} percent={run.progress * 100} />
        </View>
        <View style={styles.meta}>
          <LawTag kind={run.lawKind} label={law} />
          <Txt variant="caption">{model}</Txt>
          <Txt variant="caption">N = {formatCount(run.particles)}</Txt>
          <Txt variant="caption">{formatCount(run.steps)} steps</Txt>
          {run.pairId ? <Txt variant="caption" color={colors.link}>pair</Txt> : null}
        </View>
        {run.status === 'running' || run.status === 'queued' ? <ProgressBar value={run.progress} color={lawColor(run.lawKind)} label={`${run.name} progress`} /> : null}
        {run.status === 'failed' && run.error ? (
          <Txt variant="caption" color={colors.danger} numberOfLines={2}>
            {run.error}
          </Txt>
        ) : null}
        <Txt variant="caption" color={colors.textFaint}>
          {showOwner ? `${run.owner.name} · ` : ''}
          {formatAge(run.createdAt)}
        </Txt>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  card: { backgroundColor: colors.surface, borderWidth: 1, borderColor: colors.border, borderLeftWidth: 3, borderRadius: radius.md, padding: space.md, gap: space.sm },
  top: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  name: { flex: 1 },
  meta: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.md },
  bar: { height: 6, borderRadius: 3, backgroundColor: colors.surfaceRaised, overflow: 'hidden' },
  barFill: { height: 6, borderRadius: 3 },
});
