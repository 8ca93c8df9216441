import { Text, type TextProps, type TextStyle } from 'react-native';
import { colors, fonts, type as sizes } from '../constants/theme';

type Variant = 'display' | 'title' | 'heading' | 'body' | 'small' | 'caption' | 'mono' | 'label';

const VARIANTS: Record<Variant, TextStyle> = {
  display: { fontFamily: fonts.heading, fontSize: sizes.display, color: colors.text, letterSpacing: -0.5 },
  title: { fontFamily: fonts.heading, fontSize: sizes.title, color: colors.text },
  heading: { fontFamily: fonts.bodySemi, fontSize: sizes.lead, color: colors.text },
  body: { fontFamily: fonts.body, fontSize: sizes.body, color: colors.text, lineHeight: 22 },
  small: { fontFamily: fonts.body, fontSize: sizes.small, color: colors.textMuted, lineHeight: 19 },
  caption: { fontFamily: fonts.body, fontSize: sizes.caption, color: colors.textMuted },
  mono: { fontFamily: fonts.mono, fontSize: sizes.small, color: colors.text },
  // Labels above fields and panels, in the case they are written: symbols such as ε, a₀ and Δt
  // change meaning when upper-cased.
  label: { fontFamily: fonts.bodySemi, fontSize: sizes.caption, color: colors.textMuted, letterSpacing: 0.3 },
};

export interface TxtProps extends TextProps {
  variant?: Variant;
  color?: string;
}

/** Text in Infall's type scale. */
export function Txt({ variant = 'body', color, style, ...rest }: TxtProps) {
  return <Text {...rest} style={[VARIANTS[variant], color ? { color } : null, style]} />;
}
