import { View } from 'react-native';
import type { LawSpec } from '../../shared/spec';
import { lawInfo, lawModule, lawModules } from '../../shared/engine';
import { space } from '../../constants/theme';
import { ChoiceChips } from '../fields';
import { Txt } from '../Txt';
import { setIn } from './draft';
import { styles as formStyles } from './formStyles';
import { SchemaFields } from './SchemaFields';
import type { Path } from './schemaForm';

export interface LawEditorProps {
  label: string;
  law: LawSpec;
  onChange: (law: LawSpec) => void;
  issues: Record<string, string>;
  /** Key prefix of this law's problems in `issues`: "law." or "pairLaw.". */
  issuePrefix: string;
  /** A law kind that may not be picked (the other law of a pair). */
  exclude?: string;
  testID?: string;
}

/** Picks a force law and its parameters (drawn from the law's schema), with what the law conserves and where it holds. */
export function LawEditor({ label, law, onChange, issues, issuePrefix, exclude, testID }: LawEditorProps) {
  // The law sits at `law` of a one-field holder, so its schema is found where the spec keeps it.
  const holder = { law };
  const set = (path: Path, v: unknown) => onChange(setIn(holder, path, v).law);
  let info: ReturnType<typeof lawInfo> | null = null;
  try {
    info = lawInfo(law);
  } catch {
    info = null; // parameters half-typed; the fields show what is wrong
  }
  const kinds = lawModules().filter((m) => m.kind !== exclude || m.kind === law.kind);
  return (
    <View style={formStyles.group} testID={testID}>
      <ChoiceChips label={label} value={law.kind} onChange={(k) => onChange(lawModule(k).preset as LawSpec)} choices={kinds.map((m) => ({ value: m.kind, label: m.shortLabel }))} />
      <SchemaFields draft={holder} path={['law']} set={set} issues={issues} issueKey={(p) => `${issuePrefix}${p.slice(1).join('.')}`} />
      {info ? (
        <View style={{ gap: space.xs }}>
          <Txt variant="caption">
            {info.label}: energy {info.hasPotential ? (info.conservesEnergy ? 'conserved' : 'not conserved') : 'not defined'}, momentum {info.conservesMomentum ? 'conserved' : 'not conserved'}.
          </Txt>
          <Txt variant="caption">Valid: {info.validity}</Txt>
        </View>
      ) : null}
    </View>
  );
}
