import Svg, { Circle, Path } from 'react-native-svg';
import { colors } from '../constants/theme';

// Infall's own line icons, drawn on a 24-unit grid.
export type IconName = 'runs' | 'launch' | 'compare' | 'galaxy' | 'cohort' | 'admin' | 'account';

const STROKE = { strokeWidth: 1.8, fill: 'none', strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const };

export function Icon({ name, color = colors.text, size = 22 }: { name: IconName; color?: string; size?: number }) {
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" accessibilityElementsHidden importantForAccessibility="no">
      {name === 'runs' ? (
        <>
          <Circle cx={5} cy={6} r={1.6} fill={color} />
          <Circle cx={5} cy={12} r={1.6} fill={color} />
          <Circle cx={5} cy={18} r={1.6} fill={color} />
          <Path d="M10 6h10M10 12h7M10 18h9" stroke={color} {...STROKE} />
        </>
      ) : name === 'launch' ? (
        <>
          <Circle cx={12} cy={12} r={8.5} stroke={color} {...STROKE} />
          <Path d="M12 7.5v9M7.5 12h9" stroke={color} {...STROKE} />
        </>
      ) : name === 'compare' ? (
        <>
          <Path d="M11 3.5a8.5 8.5 0 0 0 0 17z" stroke={color} {...STROKE} />
          <Path d="M13 3.5a8.5 8.5 0 0 1 0 17" stroke={color} {...STROKE} strokeDasharray="2.5 2.5" />
        </>
      ) : name === 'galaxy' ? (
        <>
          <Circle cx={12} cy={12} r={1.8} fill={color} />
          <Path d="M12 12c0-4 3-6.5 6.5-5.5M12 12c0 4-3 6.5-6.5 5.5M12 12c4 0 6.5 3 5.5 6.5M12 12c-4 0-6.5-3-5.5-6.5" stroke={color} {...STROKE} />
        </>
      ) : name === 'cohort' ? (
        <>
          <Circle cx={12} cy={7} r={3} stroke={color} {...STROKE} />
          <Circle cx={5.5} cy={15} r={2.5} stroke={color} {...STROKE} />
          <Circle cx={18.5} cy={15} r={2.5} stroke={color} {...STROKE} />
          <Path d="M9 20c.8-2.4 1.8-3.5 3-3.5s2.2 1.1 3 3.5" stroke={color} {...STROKE} />
        </>
      ) : name === 'admin' ? (
        <>
          <Path d="M12 3l7.5 3v5.5c0 4.4-3.1 8.2-7.5 9.5-4.4-1.3-7.5-5.1-7.5-9.5V6z" stroke={color} {...STROKE} />
          <Path d="M9 12l2.2 2.2L15.5 10" stroke={color} {...STROKE} />
        </>
      ) : (
        <>
          <Circle cx={12} cy={9} r={3.5} stroke={color} {...STROKE} />
          <Path d="M5 20c1.3-3.4 3.8-5 7-5s5.7 1.6 7 5" stroke={color} {...STROKE} />
        </>
      )}
    </Svg>
  );
}

/** The Infall mark: matter spiralling in towards a bright centre. */
export function Mark({ size = 28 }: { size?: number }) {
  return (
    <Svg width={size} height={size} viewBox="0 0 28 28" accessibilityElementsHidden importantForAccessibility="no">
      <Circle cx={14} cy={14} r={12.5} stroke={colors.border} strokeWidth={1.2} fill="none" />
      <Path d="M26.5 14A12.5 12.5 0 0 1 14 26.5 9 9 0 0 1 5 17.5 6 6 0 0 1 11 11.5 3 3 0 0 1 14 14.5" stroke={colors.accent} strokeWidth={2} fill="none" strokeLinecap="round" />
      <Circle cx={14} cy={14} r={2.2} fill={colors.text} />
    </Svg>
  );
}
