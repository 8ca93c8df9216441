import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { LawSpec } from '../../shared/spec';
import { lawName, LIVE_HALO_PRESET, modelModule, modelModules, modelName } from '../../shared/engine';
import { colors, space } from '../../constants/theme';
import { ChoiceChips } from '../fields';
import { Txt } from '../Txt';
import { Button } from '../Button';
import { describeError } from '../States';
import { useParticleTableUpload } from '../../hooks/galaxies';
import { pickTableFile } from '../lib/pickFile';
import { getIn, isSampled, pinnedLaw, withEquilibriumLaw, type Path } from './draft';
import { styles as formStyles } from './formStyles';
import { SchemaFields } from './SchemaFields';

type Model = Record<string, unknown>;

interface Props {
  draft: Record<string, unknown>;
  set: (path: Path, v: unknown) => void;
  issues: Record<string, string>;
  /** The pair's second law, when there is one: disks then need one law for their velocities. */
  pairLaw: LawSpec | null;
}

/**
 * The particles come from a file sent through the upload path: the server reads it with the
 * same rules and limits as any table (line and column named in a refusal) and hands them back.
 */
function RowsFromFile({ draft, path, set, issues }: Omit<Props, 'pairLaw'> & { path: Path }) {
  const current = (getIn(draft, path) as Record<string, number>[]) ?? [];
  const upload = useParticleTableUpload();
  const [pickError, setPickError] = useState<string | null>(null);
  const [fileName, setFileName] = useState<string | null>(null);
  const key = path.join('.');
  const issue = Object.entries(issues).find(([k]) => k.startsWith(key))?.[1];
  const choose = async () => {
    setPickError(null);
    try {
      const file = await pickTableFile(Infinity, ['.h5', 'application/x-hdf5']);
      if (!file) return;
      upload.mutate(file, {
        onSuccess: (r) => {
          setFileName(r.fileName);
          set(path, r.particles);
        },
      });
    } catch (e) {
      setPickError(e instanceof Error ? e.message : String(e));
    }
  };
  const problem = pickError ?? (upload.isError ? describeError(upload.error) : null) ?? issue;
  return (
    <View style={formStyles.group}>
      <View style={styles.pickRow}>
        <Button label={current.length ? 'Choose another particle file' : 'Choose a particle file'} tone="secondary" busy={upload.isPending} onPress={() => void choose()} testID={`field-${key}`} />
        <Txt variant="caption" color={problem ? colors.danger : colors.textMuted} role={problem ? 'alert' : undefined}>
          {problem ?? `${current.length} particles${fileName ? ` read from ${fileName}` : ''}`}
        </Txt>
      </View>
      <Txt variant="caption">CSV or columns separated by spaces, seven numbers a row (a header row and # comments are allowed), or a snapshot file (.h5) exported from a run: its last frame.</Txt>
    </View>
  );
}

/** Chooses the initial conditions: model kind and its numbers, drawn from the model's schema. */
export function ModelEditor({ draft, set, issues, pairLaw }: Props) {
  const model = draft.model as Model;
  const kind = String(model.kind);
  const law = draft.law as LawSpec;
  const eqLaw = pinnedLaw(model);
  const eqChoice = !eqLaw ? 'own' : pairLaw && JSON.stringify(eqLaw) === JSON.stringify(pairLaw) ? 'pair' : 'first';
  // Presets go into the draft as they are: the form only ever replaces values, never mutates them.
  const kinds = { label: modelName, note: (k: string) => modelModule(k).note, preset: (k: string) => modelModule(k).preset };

  return (
    <View style={formStyles.group}>
      <ChoiceChips
        label="Model"
        value={kind}
        onChange={(k) => set(['model'], kinds.preset(k))}
        choices={modelModules().map((m) => ({ value: m.kind, label: m.label, note: m.note }))}
      />
      <SchemaFields draft={draft} path={['model']} set={set} issues={issues} skip={['equilibriumLaw']} kinds={kinds} partPresets={[LIVE_HALO_PRESET]} renderRows={(path) => <RowsFromFile draft={draft} path={path} set={set} issues={issues} />} />
      {pairLaw && isSampled(model) ? (
        <ChoiceChips
          label="Velocities balanced for"
          value={eqChoice}
          onChange={(which) => set(['model'], withEquilibriumLaw(model, which === 'own' ? undefined : which === 'pair' ? pairLaw : law))}
          hint="Both runs start from the same positions. Balanced for its own law, each run starts in equilibrium, so what differs later comes from the laws; pinned to one law, both start from identical particles and the other run starts out of equilibrium."
          choices={[
            { value: 'own', label: 'each run’s own law' },
            { value: 'first', label: `${lawName(law.kind)} (first law)` },
            { value: 'pair', label: `${lawName(pairLaw.kind)} (second law)` },
          ]}
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  pickRow: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
