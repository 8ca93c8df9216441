import { Children, Fragment, isValidElement, useEffect, useState, type ReactElement, type ReactNode } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { colors, fonts, radius, space, type as sizes } from '../constants/theme';
import { NAME_MAX_LENGTH, nameProblem } from '../shared/spec';
import { formatBound, formatInput } from './format';
import { numberOfText, parseNumberText } from './numberText';
import { Txt } from './Txt';

function FieldFrame({ label, hint, error, children, nativeID }: { label: string; hint?: string; error?: string; children: ReactNode; nativeID?: string }) {
  return (
    <View style={styles.field}>
      <Txt variant="label" nativeID={nativeID}>
        {label}
      </Txt>
      {children}
      {error ? (
        <Txt variant="caption" color={colors.danger} role="alert">
          {error}
        </Txt>
      ) : hint ? (
        <Txt variant="caption">{hint}</Txt>
      ) : null}
    </View>
  );
}

export interface NumberFieldProps {
  label: string;
  /** NaN while the text does not parse, so the form holding it is invalid until it does. */
  value: number | undefined;
  onChange: (v: number | undefined) => void;
  unit?: string;
  min?: number;
  max?: number;
  /** The minimum itself is not allowed (e.g. a mass must be > 0). */
  exclusiveMin?: boolean;
  integer?: boolean;
  /** Empty is allowed: it means "use the default", or what `emptyMeans` says. */
  optional?: boolean;
  emptyMeans?: string;
  hint?: string;
  /** The person's own limit for this field (from their quota), shown beside the range. */
  limit?: string;
  error?: string;
  testID?: string;
}

export function rangeText(min?: number, max?: number, unit?: string, exclusiveMin = false): string {
  const u = unit ? ` ${unit}` : '';
  if (exclusiveMin && min !== undefined) return max !== undefined ? `> ${formatBound(min)} and ≤ ${formatBound(max)}${u}` : `> ${formatBound(min)}${u}`;
  if (min !== undefined && max !== undefined) return `${formatBound(min)} – ${formatBound(max)}${u}`;
  if (min !== undefined) return `≥ ${formatBound(min)}${u}`;
  if (max !== undefined) return `≤ ${formatBound(max)}${u}`;
  return '';
}

/**
 * A number with its unit and allowed range. The text stays exactly as typed: while it does not
 * parse the field says why and hands NaN up; range errors show at once; the schema has the last word.
 */
export function NumberField({ label, value, onChange, unit, min, max, exclusiveMin, integer, optional, emptyMeans = 'default', hint, limit, error, testID }: NumberFieldProps) {
  const [text, setText] = useState(formatInput(value));
  useEffect(() => {
    // Follow outside changes (a preset, a clone); a value this text already stands for is our own.
    setText((t) => (Object.is(numberOfText(t), value) ? t : formatInput(value)));
  }, [value]);
  const range = rangeText(min, max, unit, exclusiveMin);
  let local: string | undefined;
  const read = parseNumberText(text);
  if (read.state === 'empty') local = optional ? undefined : `${label} is empty: enter a number`;
  else if (read.state === 'invalid') local = `${label} is ${read.problem}`;
  else if (integer && !Number.isInteger(read.value)) local = `${label} takes whole numbers only`;
  else if ((min !== undefined && (exclusiveMin ? read.value <= min : read.value < min)) || (max !== undefined && read.value > max)) local = `Allowed: ${range}`;
  const shown = local ?? error;
  return (
    <FieldFrame label={label} hint={[hint, range && `Range ${range}`, limit, optional && `empty = ${emptyMeans}`].filter(Boolean).join(' · ')} error={shown}>
      <View style={[styles.inputRow, shown ? styles.inputError : null]}>
        <TextInput
          value={text}
          onChangeText={(t) => {
            setText(t);
            onChange(numberOfText(t));
          }}
          // Not a decimal pad: that has no "e", and 4e10 must be typeable on a phone.
          keyboardType="numbers-and-punctuation"
          autoCapitalize="none"
          autoCorrect={false}
          autoComplete="off"
          spellCheck={false}
          accessibilityLabel={unit ? `${label} in ${unit}` : label}
          accessibilityHint={range ? `Allowed range ${range}` : undefined}
          aria-invalid={Boolean(shown)}
          style={styles.input}
          testID={testID}
        />
        {unit ? (
          <Txt style={styles.unit} color={colors.textMuted}>
            {unit}
          </Txt>
        ) : null}
      </View>
    </FieldFrame>
  );
}

export function TextField({ label, value, onChange, placeholder, hint, error, testID }: { label: string; value: string; onChange: (v: string) => void; placeholder?: string; hint?: string; error?: string; testID?: string }) {
  return (
    <FieldFrame label={label} hint={hint} error={error}>
      <View style={[styles.inputRow, error ? styles.inputError : null]}>
        <TextInput value={value} onChangeText={onChange} placeholder={placeholder} placeholderTextColor={colors.textFaint} accessibilityLabel={label} style={styles.input} testID={testID} />
      </View>
    </FieldFrame>
  );
}

/**
 * A name a person gives (a run, template, cohort, galaxy or API token): the shared length limit in
 * the hint, a name over it marked here as it is typed, and `error` (the server's refusal of this
 * field, see `fieldError`) shown here too rather than away from the field.
 */
export function NameField({ label, value, onChange, placeholder, hint, error, testID }: { label: string; value: string; onChange: (v: string) => void; placeholder?: string; hint?: string; error?: string; testID?: string }) {
  const limit = `Up to ${NAME_MAX_LENGTH} characters.`;
  return <TextField label={label} value={value} onChange={onChange} placeholder={placeholder} hint={hint ? `${limit} ${hint}` : limit} error={nameProblem(value) ?? error} testID={testID} />;
}

export interface Choice<T extends string | number> {
  value: T;
  label: string;
  /** A line under the chips describing the chosen option. */
  note?: string;
}

function flatten(children: ReactNode): ReactNode[] {
  return Children.toArray(children).flatMap((c) => (isValidElement(c) && c.type === Fragment ? flatten((c as ReactElement<{ children?: ReactNode }>).props.children) : [c]));
}

/** Fields side by side, wrapping to one per line on narrow screens. */
export function FieldRow({ children }: { children: ReactNode }) {
  return (
    <View style={styles.row}>
      {flatten(children).map((child, i) => (
        <View key={i} style={styles.cell}>
          {child}
        </View>
      ))}
    </View>
  );
}

/** A row of chips, one chosen (a radio group). */
export function ChoiceChips<T extends string | number>({ label, value, choices, onChange, hint, compact }: { label?: string; value: T; choices: Choice<T>[]; onChange: (v: T) => void; hint?: string; compact?: boolean }) {
  const chosen = choices.find((c) => c.value === value);
  const chips = (
    <View style={styles.chips} role="radiogroup" accessibilityLabel={label}>
      {choices.map((c) => {
        const on = c.value === value;
        return (
          <Pressable
            key={String(c.value)}
            role="radio"
            accessibilityState={{ checked: on }}
            aria-checked={on}
            accessibilityLabel={c.label}
            onPress={() => onChange(c.value)}
            style={({ pressed }) => [styles.chip, compact && styles.chipCompact, on && styles.chipOn, pressed && styles.chipPressed]}
          >
            <Txt style={styles.chipText} color={on ? colors.accentText : colors.text}>
              {c.label}
            </Txt>
          </Pressable>
        );
      })}
    </View>
  );
  if (!label) return chips;
  return (
    <FieldFrame label={label} hint={chosen?.note ?? hint}>
      {chips}
    </FieldFrame>
  );
}

/** An on/off switch with its words beside it. */
export function Toggle({ label, value, onChange, hint }: { label: string; value: boolean; onChange: (v: boolean) => void; hint?: string }) {
  return (
    <Pressable role="switch" accessibilityState={{ checked: value }} aria-checked={value} accessibilityLabel={label} onPress={() => onChange(!value)} style={styles.toggleRow}>
      <View style={[styles.track, value && styles.trackOn]}>
        <View style={[styles.knob, value && styles.knobOn]} />
      </View>
      <View style={styles.toggleText}>
        <Txt variant="body">{label}</Txt>
        {hint ? <Txt variant="caption">{hint}</Txt> : null}
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  field: { gap: space.xs, flexShrink: 1, maxWidth: '100%' },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  cell: { flexGrow: 1, flexShrink: 1, flexBasis: 150, minWidth: 140 },
  inputRow: { flexDirection: 'row', alignItems: 'center', backgroundColor: colors.surfaceRaised, borderColor: colors.border, borderWidth: 1, borderRadius: radius.md, minHeight: 44 },
  inputError: { borderColor: colors.danger },
  input: { flex: 1, minWidth: 0, color: colors.text, fontFamily: fonts.mono, fontSize: sizes.body, paddingHorizontal: space.md, paddingVertical: space.sm, outlineStyle: 'none' } as object,
  unit: { fontFamily: fonts.mono, fontSize: sizes.small, paddingRight: space.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  // A long label (a run's name) wraps inside its chip instead of running past the panel.
  chip: { borderWidth: 1, borderColor: colors.borderStrong, borderRadius: radius.pill, paddingHorizontal: space.md, minHeight: 36, justifyContent: 'center', backgroundColor: colors.surfaceRaised, maxWidth: '100%' },
  chipCompact: { minHeight: 30, paddingHorizontal: space.sm },
  chipOn: { backgroundColor: colors.accent, borderColor: colors.accent },
  chipPressed: { opacity: 0.8 },
  chipText: { fontFamily: fonts.bodySemi, fontSize: sizes.small, flexShrink: 1 },
  toggleRow: { flexDirection: 'row', alignItems: 'center', gap: space.md, minHeight: 44 },
  track: { width: 42, height: 24, borderRadius: 12, backgroundColor: colors.surfaceRaised, borderWidth: 1, borderColor: colors.borderStrong, padding: 2 },
  trackOn: { backgroundColor: colors.accent, borderColor: colors.accent },
  knob: { width: 18, height: 18, borderRadius: 9, backgroundColor: colors.textMuted },
  knobOn: { backgroundColor: colors.accentText, transform: [{ translateX: 18 }] },
  toggleText: { flex: 1, gap: 2 },
});
