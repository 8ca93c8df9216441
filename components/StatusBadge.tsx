import { StyleSheet, View } from 'react-native';
import type { RunStatus } from '../shared/api/contract';
import { colors, fonts, lawColor, radius, space } from '../constants/theme';
import { Txt } from './Txt';

// Infall's words for run states, and a glyph so colour is never the only cue.
const STATUS: Record<RunStatus, { label: string; glyph: string; color: string }> = {
  queued: { label: 'Waiting', glyph: '◌', color: colors.textMuted },
  running: { label: 'Integrating', glyph: '◐', color: colors.link },
  finished: { label: 'Done', glyph: '●', color: colors.ok },
  failed: { label: 'Failed', glyph: '✕', color: colors.danger },
  cancelled: { label: 'Stopped', glyph: '◻', color: colors.warning },
};

export function statusLabel(status: RunStatus): string {
  return STATUS[status]?.label ?? status;
}

export function StatusBadge({ status, percent }: { status: RunStatus; percent?: number }) {
  const s = STATUS[status] ?? STATUS.queued;
  const text = status === 'running' && percent !== undefined ? `${s.label} ${Math.floor(percent)}%` : s.label;
  return (
    <View style={[styles.badge, { borderColor: s.color }]} role="note" accessibilityLabel={`Status: ${text}`}>
      <Txt style={styles.glyph} color={s.color}>
        {s.glyph}
      </Txt>
      <Txt style={styles.text} color={s.color}>
        {text}
      </Txt>
    </View>
  );
}

/** A law's name in its own colour. */
export function LawTag({ kind, label }: { kind: string; label?: string }) {
  const c = lawColor(kind);
  return (
    <View style={[styles.badge, { borderColor: c, backgroundColor: 'transparent' }]} accessibilityLabel={`Force law: ${label ?? kind}`}>
      <View style={[styles.dot, { backgroundColor: c }]} />
      <Txt style={styles.text} color={c}>
        {label ?? kind}
      </Txt>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { flexDirection: 'row', alignItems: 'center', gap: space.xs, borderWidth: 1, borderRadius: radius.pill, paddingHorizontal: space.sm, paddingVertical: 2, alignSelf: 'flex-start' },
  glyph: { fontSize: 11, fontFamily: fonts.mono },
  text: { fontSize: 12, fontFamily: fonts.monoMedium },
  dot: { width: 7, height: 7, borderRadius: 4 },
});
