import type { ReactNode } from 'react';
import { StyleSheet, View, type ViewStyle } from 'react-native';
import { colors, radius, space } from '../constants/theme';
import { Txt } from './Txt';

export interface PanelProps {
  title?: string;
  /** Short line under the title, e.g. what a plot shows. */
  note?: string;
  right?: ReactNode;
  children: ReactNode;
  style?: ViewStyle;
  accessibilityLabel?: string;
}

/** A titled block on a screen. */
export function Panel({ title, note, right, children, style, accessibilityLabel }: PanelProps) {
  return (
    <View style={[styles.panel, style]} accessibilityLabel={accessibilityLabel ?? title} role={title ? 'region' : undefined}>
      {title || right ? (
        <View style={styles.head}>
          <View style={styles.titles}>
            {title ? (
              <Txt variant="label" role="heading" aria-level={2}>
                {title}
              </Txt>
            ) : null}
            {note ? <Txt variant="caption">{note}</Txt> : null}
          </View>
          {right}
        </View>
      ) : null}
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { backgroundColor: colors.surface, borderColor: colors.border, borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  head: { flexDirection: 'row', alignItems: 'flex-start', justifyContent: 'space-between', gap: space.md },
  titles: { flex: 1, gap: 2 },
});
