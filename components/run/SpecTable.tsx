import { StyleSheet, View } from 'react-native';
import type { RunSpec } from '../../shared/spec';
import { colors, fonts, radius, space } from '../../constants/theme';
import { compareSpecs, type SpecLine } from '../compare/differences';
import { Panel } from '../Panel';
import { rowText, SPEC_GROUPS, specRows } from '../spec/rows';
import { Txt } from '../Txt';

export interface SpecColumn {
  title: string;
  color: string;
  spec: RunSpec;
}

function Line({ line, titles }: { line: SpecLine; titles: string[] }) {
  const pair = titles.length === 2;
  const spoken = pair ? `${line.label}: ${titles[0]} ${line.a ?? 'not set'}; ${titles[1]} ${line.b ?? 'not set'}${line.differs ? '; differs' : ''}` : `${line.label}: ${line.a}`;
  return (
    <View style={[styles.line, line.differs && styles.differs]} accessible accessibilityLabel={spoken} testID={`spec-${line.key}`}>
      <View style={styles.labelCell}>
        {line.differs ? (
          <Txt variant="caption" color={colors.warning} style={styles.mark}>
            ≠
          </Txt>
        ) : null}
        <Txt variant="caption" style={styles.label}>
          {line.label}
        </Txt>
      </View>
      {(pair ? [line.a, line.b] : [line.a]).map((v, k) => (
        <Txt key={k} variant="mono" color={v === null ? colors.textFaint : colors.text} style={styles.value}>
          {v ?? '—'}
        </Txt>
      ))}
    </View>
  );
}

/**
 * The spec a run ran, every field with its label and unit; with two columns the fields that
 * differ between the runs are marked (≠, tinted row, and said so to screen readers).
 */
export function SpecTable({ columns }: { columns: [SpecColumn] | [SpecColumn, SpecColumn] }) {
  const pair = columns.length === 2;
  const lines: SpecLine[] = pair
    ? compareSpecs(columns[0].spec, columns[1].spec)
    : specRows(columns[0].spec).map((r) => ({ key: r.key, group: r.group, label: r.label, a: rowText(r), b: null, differs: false }));
  const differing = lines.filter((l) => l.differs).length;
  const note = pair
    ? differing
      ? `${differing === 1 ? '1 field differs' : `${differing} fields differ`} (marked ≠); every other field is the same.`
      : 'The two specs are the same in every field.'
    : 'Every field of the spec, as submitted, with defaults filled in.';
  return (
    <Panel title={pair ? 'What each ran' : 'What it ran'} note={note}>
      {pair ? (
        <View style={styles.line} aria-hidden>
          <View style={styles.labelCell} />
          {columns.map((c) => (
            <Txt key={c.title} variant="label" color={c.color} style={styles.value} numberOfLines={2}>
              {c.title}
            </Txt>
          ))}
        </View>
      ) : null}
      {SPEC_GROUPS.map((group) => {
        const rows = lines.filter((l) => l.group === group);
        return rows.length ? (
          <View key={group} style={styles.group}>
            <Txt variant="label">{group}</Txt>
            {rows.map((l) => (
              <Line key={l.key} line={l} titles={columns.map((c) => c.title)} />
            ))}
          </View>
        ) : null;
      })}
    </Panel>
  );
}

const styles = StyleSheet.create({
  group: { gap: 2 },
  line: { flexDirection: 'row', alignItems: 'flex-start', gap: space.sm, paddingVertical: 3, paddingHorizontal: space.xs, borderRadius: radius.sm, borderLeftWidth: 3, borderLeftColor: 'transparent' },
  differs: { backgroundColor: colors.surfaceRaised, borderLeftColor: colors.warning },
  labelCell: { flex: 4, flexDirection: 'row', gap: space.xs, minWidth: 0 },
  mark: { fontFamily: fonts.monoMedium },
  label: { flexShrink: 1 },
  value: { flex: 5, minWidth: 0 },
});
