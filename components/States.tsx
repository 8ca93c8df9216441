import type { ReactNode } from 'react';
import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../constants/theme';
import { ApiError } from './lib/api';
import { Button } from './Button';
import { Txt } from './Txt';

/** A spinner with words, announced to screen readers. */
export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <View style={styles.box} role="progressbar" accessibilityLabel={what} aria-busy>
      <ActivityIndicator color={colors.accent} />
      <Txt variant="small">{what}…</Txt>
    </View>
  );
}

export function Empty({ title, hint, action }: { title: string; hint?: string; action?: ReactNode }) {
  return (
    <View style={[styles.box, styles.framed]} role="note" accessibilityLabel={`${title}. ${hint ?? ''}`}>
      <Txt variant="heading">{title}</Txt>
      {hint ? (
        <Txt variant="small" style={styles.center}>
          {hint}
        </Txt>
      ) : null}
      {action}
    </View>
  );
}

export function describeError(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error && error.message) return error.message;
  return 'Something went wrong.';
}

/** The words of an API refusal of `field` (without the "field: " the API puts first), to show at that field; undefined for any other error. */
export function fieldError(error: unknown, field: string): string | undefined {
  if (!(error instanceof ApiError) || error.field !== field) return undefined;
  return error.message.startsWith(`${field}: `) ? error.message.slice(field.length + 2) : error.message;
}

/** An error with its message and, when it can help, a retry. */
export function ErrorState({ error, title = 'That did not work', onRetry }: { error: unknown; title?: string; onRetry?: () => void }) {
  const message = describeError(error);
  return (
    <View style={[styles.box, styles.framed, styles.error]} role="alert" accessibilityLabel={`${title}: ${message}`}>
      <Txt variant="heading" color={colors.danger}>
        {title}
      </Txt>
      <Txt variant="small" style={styles.center}>
        {message}
      </Txt>
      {onRetry ? <Button label="Try again" tone="secondary" small onPress={onRetry} /> : null}
    </View>
  );
}

/**
 * What a screen shows instead of itself when it threw while drawing: what went wrong, a
 * retry, and a way back. Route files export it as their ErrorBoundary, so one broken
 * screen never blanks the whole app.
 */
export function ScreenFailure({ error, retry }: { error: unknown; retry?: () => void }) {
  const message = describeError(error);
  return (
    <View style={styles.page} role="main">
      <View style={[styles.box, styles.framed, styles.error]} role="alert" accessibilityLabel={`This screen could not be shown: ${message}`} testID="screen-failure">
        <Txt variant="heading" color={colors.danger} role="heading">
          This screen could not be shown
        </Txt>
        <Txt variant="small" style={styles.center}>
          {message}
        </Txt>
        <Txt variant="caption" style={styles.center}>
          Nothing you stored was changed. Try again, or go back to your runs.
        </Txt>
        <View style={styles.actions}>
          {retry ? <Button label="Try again" tone="secondary" small onPress={retry} /> : null}
          <Button label="Back to your runs" small href="/" />
        </View>
      </View>
    </View>
  );
}

/** An inline message under a form or action. */
export function Notice({ tone, children }: { tone: 'warning' | 'danger' | 'info' | 'ok'; children: ReactNode }) {
  const color = tone === 'warning' ? colors.warning : tone === 'danger' ? colors.danger : tone === 'ok' ? colors.ok : colors.link;
  return (
    <View style={[styles.notice, { borderLeftColor: color }]} role={tone === 'danger' ? 'alert' : 'status'}>
      {typeof children === 'string' ? <Txt variant="small" color={colors.text}>{children}</Txt> : children}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { alignItems: 'center', justifyContent: 'center', gap: space.sm, paddingVertical: space.xl, paddingHorizontal: space.lg },
  framed: { borderWidth: 1, borderStyle: 'dashed', borderColor: colors.border, borderRadius: radius.lg },
  error: { borderStyle: 'solid', borderColor: colors.danger },
  center: { textAlign: 'center', maxWidth: 520 },
  page: { flex: 1, justifyContent: 'center', padding: space.lg, backgroundColor: colors.background },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, justifyContent: 'center' },
  notice: { borderLeftWidth: 3, backgroundColor: colors.surfaceRaised, paddingVertical: space.sm, paddingHorizontal: space.md, borderRadius: radius.sm, gap: space.xs },
});
