import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../../constants/theme';
import { ChoiceChips, FieldRow, Toggle } from '../fields';
import { enumOptions, fieldKind, memberKind, nodeAt, pickMember, startValue, titleOf, type JsonNode, type Path } from './schemaForm';
import { getIn } from './draft';
import { styles as formStyles } from './formStyles';
import { SpecNumber } from './SpecField';

/** Names, notes and starting values for the kinds of a union (the systems of an encounter). */
export interface KindCatalogue {
  label(kind: string): string;
  note?(kind: string): string | undefined;
  preset(kind: string): unknown;
}

export interface SchemaFieldsProps {
  /** The value the paths start from (the draft spec, or `{ law }` for a pair's second law). */
  draft: unknown;
  /** Path of the object whose fields are drawn. */
  path: Path;
  set: (path: Path, v: unknown) => void;
  issues: Record<string, string>;
  /** A field's key in `issues` when it is not its dotted path (the pair's second law). */
  issueKey?: (path: Path) => string;
  /** Fields drawn elsewhere (the velocities' law of a pair). */
  skip?: readonly string[];
  kinds?: KindCatalogue;
  /** Draws a list of rows (uploaded particles). */
  renderRows?: (path: Path) => ReactNode;
  /** Starting values for optional parts, each used where its fields fit (the registry's live halo). */
  partPresets?: readonly unknown[];
}

/**
 * Every field of one object of the spec, drawn from its JSON Schema alone: numbers side by side,
 * enums as chips, optional parts behind a switch, tuples as a row, unions by `kind`.
 */
export function SchemaFields(props: SchemaFieldsProps) {
  const { draft, path, set, issues, issueKey = (p: Path) => p.join('.'), skip = [], kinds, renderRows, partPresets = [] } = props;
  const found = nodeAt(path, draft);
  const value = getIn(draft, path);
  const node = found ? pickMember(found.node, value) : null;
  if (!node?.properties) return null;

  const out: ReactNode[] = [];
  let numbers: ReactNode[] = [];
  const flush = () => {
    if (numbers.length) out.push(<FieldRow key={`row-${out.length}`}>{numbers}</FieldRow>);
    numbers = [];
  };
  const number = (p: Path, label?: string) => <SpecNumber key={p.join('.')} draft={draft} path={p} onChange={set} issues={issues} issueKey={issueKey(p)} label={label} />;

  for (const [key, child] of Object.entries(node.properties)) {
    if (key === 'kind' || skip.includes(key)) continue;
    const p = [...path, key];
    const v = getIn(draft, p);
    const optional = !(node.required ?? []).includes(key);
    const title = titleOf(key, child);
    const kind = fieldKind(child);
    if (kind === 'number') {
      numbers.push(number(p));
      continue;
    }
    flush();
    // An optional part is switched on with a valid starting value and off by leaving it out.
    const toggle = optional && (kind === 'tuple' || kind === 'object') ? <Toggle key={`${key}-on`} label={title} hint={child.description} value={v !== undefined} onChange={(on) => set(p, on ? startValue(child, partPresets) : undefined)} /> : null;
    if (toggle) out.push(toggle);
    if (kind === 'choice') {
      const choices = enumOptions(child);
      out.push(<ChoiceChips key={key} label={title} value={(v ?? child.default ?? choices[0]?.value) as string | number} onChange={(c) => set(p, c)} choices={choices} hint={child.description} />);
    } else if (kind === 'boolean') {
      out.push(<Toggle key={key} label={title} hint={child.description} value={Boolean(v ?? child.default)} onChange={(on) => set(p, on)} />);
    } else if (kind === 'tuple' && v !== undefined) {
      const items = child.prefixItems!;
      out.push(<FieldRow key={key}>{items.map((item, i) => number([...p, i], item.title ?? `${title} ${child.itemTitles?.[i] ?? i + 1}`))}</FieldRow>);
    } else if (kind === 'object' && v !== undefined) {
      out.push(
        <View key={key} style={toggle ? styles.part : formStyles.group}>
          <SchemaFields {...props} path={p} />
        </View>,
      );
    } else if (kind === 'union' && kinds) {
      out.push(
        <View key={key} style={styles.member}>
          <ChoiceChips
            label={title}
            value={String((v as { kind?: unknown } | undefined)?.kind)}
            onChange={(k) => set(p, kinds.preset(k))}
            choices={(child.oneOf ?? child.anyOf ?? []).map((m: JsonNode) => {
              const k = String(memberKind(m));
              return { value: k, label: kinds.label(k), note: kinds.note?.(k) };
            })}
          />
          <SchemaFields {...props} path={p} />
        </View>,
      );
    } else if (kind === 'rows' && renderRows) {
      out.push(<View key={key}>{renderRows(p)}</View>);
    }
  }
  flush();
  return out.length ? <View style={formStyles.group}>{out}</View> : null;
}

const styles = StyleSheet.create({
  member: { gap: space.md, padding: space.md, borderWidth: 1, borderColor: colors.border, borderRadius: radius.md },
  part: { gap: space.md, paddingLeft: space.md, borderLeftWidth: 2, borderLeftColor: colors.border },
});
