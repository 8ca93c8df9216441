import { ActivityIndicator, Pressable, StyleSheet, View, type ViewStyle } from 'react-native';
import { Link, type Href } from 'expo-router';
import { colors, fonts, radius, space, type as sizes } from '../constants/theme';
import { Txt } from './Txt';

type Tone = 'primary' | 'secondary' | 'quiet' | 'danger';

export interface ButtonProps {
  label: string;
  onPress?: () => void;
  tone?: Tone;
  disabled?: boolean;
  busy?: boolean;
  accessibilityLabel?: string;
  accessibilityHint?: string;
  style?: ViewStyle;
  small?: boolean;
  testID?: string;
  /** Makes it a link that looks like a button (a real anchor on the web). */
  href?: Href;
}

export function Button({ label, onPress, tone = 'primary', disabled, busy, accessibilityLabel, accessibilityHint, style, small, testID, href }: ButtonProps) {
  const off = disabled || busy;
  const textColor = tone === 'primary' ? colors.accentText : tone === 'danger' ? colors.danger : tone === 'quiet' ? colors.link : colors.text;
  const content = (
    <View style={styles.row}>
      {busy ? <ActivityIndicator size="small" color={textColor} /> : null}
      <Txt style={[styles.text, small && styles.smallText]} color={textColor}>
        {label}
      </Txt>
    </View>
  );
  if (href && !off) {
    // <Link asChild> merges its child's style as a plain object, so the style is flattened here.
    return (
      <Link href={href} asChild>
        <Pressable role="link" accessibilityLabel={accessibilityLabel ?? label} accessibilityHint={accessibilityHint} testID={testID} style={StyleSheet.flatten([styles.base, small && styles.small, styles[tone], style])}>
          {content}
        </Pressable>
      </Link>
    );
  }
  return (
    <Pressable
      role="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityHint={accessibilityHint}
      accessibilityState={{ disabled: Boolean(off), busy: Boolean(busy) }}
      disabled={off}
      onPress={onPress}
      testID={testID}
      style={({ pressed }) => [
        styles.base,
        small && styles.small,
        styles[tone],
        pressed && !off && (tone === 'primary' ? styles.primaryPressed : styles.pressed),
        off && styles.disabled,
        style,
      ]}
    >
      {content}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: { minHeight: 44, paddingHorizontal: space.lg, borderRadius: radius.md, alignItems: 'center', justifyContent: 'center', borderWidth: 1 },
  small: { minHeight: 34, paddingHorizontal: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  text: { fontFamily: fonts.bodySemi, fontSize: sizes.body },
  smallText: { fontSize: sizes.small },
  primary: { backgroundColor: colors.accent, borderColor: colors.accent },
  primaryPressed: { backgroundColor: colors.accentPressed, borderColor: colors.accentPressed },
  secondary: { backgroundColor: colors.surfaceRaised, borderColor: colors.borderStrong },
  quiet: { backgroundColor: 'transparent', borderColor: 'transparent' },
  danger: { backgroundColor: 'transparent', borderColor: colors.danger },
  pressed: { opacity: 0.75 },
  disabled: { opacity: 0.45 },
});
