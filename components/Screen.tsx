import type { ReactNode } from 'react';
import { RefreshControl, ScrollView, StyleSheet, View } from 'react-native';
import { colors, space } from '../constants/theme';
import { Txt } from './Txt';

export interface ScreenProps {
  title: string;
  subtitle?: string;
  actions?: ReactNode;
  children: ReactNode;
  /** Pull to refresh on phones. */
  onRefresh?: () => void;
  refreshing?: boolean;
  /** Wide content (compare) may use the whole width. */
  wide?: boolean;
}

/** The scrolling body of a screen with its heading; content is capped in width on big screens. */
export function Screen({ title, subtitle, actions, children, onRefresh, refreshing, wide }: ScreenProps) {
  return (
    <ScrollView
      style={styles.scroll}
      contentContainerStyle={styles.content}
      refreshControl={onRefresh ? <RefreshControl refreshing={Boolean(refreshing)} onRefresh={onRefresh} tintColor={colors.accent} /> : undefined}
    >
      <View style={[styles.inner, wide && styles.innerWide]}>
        <View style={styles.head}>
          <View style={styles.titles}>
            <Txt variant="display" role="heading" aria-level={1}>
              {title}
            </Txt>
            {subtitle ? <Txt variant="small">{subtitle}</Txt> : null}
          </View>
          {actions ? <View style={styles.actions}>{actions}</View> : null}
        </View>
        {children}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.background },
  content: { paddingHorizontal: space.lg, paddingTop: space.xl, paddingBottom: 64 },
  inner: { width: '100%', maxWidth: 1120, alignSelf: 'center', gap: space.lg },
  innerWide: { maxWidth: 1400 },
  head: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: space.md },
  titles: { flexShrink: 1, gap: space.xs },
  actions: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap' },
});
