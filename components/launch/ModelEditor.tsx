import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { LawSpec } from '../../shared/spec';
import { colors, radius, space } from '../../constants/theme';
import { getIn, HALO_PRESET, isSampled, MODEL_PRESETS, SYSTEM_KINDS, withEquilibriumLaw, type Path } from '../../hooks/runDraft';
import { ChoiceChips, FieldRow, Toggle } from '../fields';
import { LAW_LABELS, MODEL_LABELS } from '../format';
import { Txt } from '../Txt';
import { Button } from '../Button';
import { describeError } from '../States';
import { useParticleTableUpload } from '../../hooks/galaxies';
import { pickTableFile } from '../lib/pickFile';
import { styles as formStyles } from './formStyles';
import { SpecNumber } from './SpecField';

type Model = Record<string, unknown>;

interface Props {
  draft: Record<string, unknown>;
  set: (path: Path, v: unknown) => void;
  issues: Record<string, string>;
  /** The pair's second law, when there is one: disks then need one law for their velocities. */
  pairLaw: LawSpec | null;
}

const MODEL_NOTES: Record<string, string> = {
  kepler: 'Two bodies starting at pericentre: the cleanest check of an integrator.',
  plummer: 'A cored sphere in equilibrium, sampled from its distribution function.',
  hernquist: 'A cuspy sphere like a galaxy bulge or elliptical.',
  disk: 'A rotating exponential disk, optionally with a bulge; its velocities follow the circular speed of a law.',
  encounter: 'Two systems on a parabolic orbit towards each other.',
  table: 'Your own particles from a file: one per row as x y z [kpc] vx vy vz [km/s] mass [M☉].',
};

function SystemFields({ draft, base, set, issues }: { draft: unknown; base: Path; set: Props['set']; issues: Props['issues'] }) {
  const sys = getIn(draft, base) as Model;
  const num = (key: string) => <SpecNumber key={key} draft={draft} path={[...base, key]} onChange={set} issues={issues} />;
  return (
    <View style={formStyles.group}>
      <FieldRow>
        {num('n')}
        {num('mass_Msun')}
        {sys.kind === 'disk' ? (
          <>
            {num('scaleLength_kpc')}
            {num('scaleHeight_kpc')}
            {num('toomreQ')}
          </>
        ) : (
          num('scale_kpc')
        )}
        {num('truncationRadius_kpc')}
      </FieldRow>
      {sys.kind === 'disk' ? (
        <>
          <Toggle label="Add a Hernquist bulge" value={Boolean(sys.bulge)} onChange={(on) => set([...base, 'bulge'], on ? { mass_Msun: 1e10, scale_kpc: 0.5 } : undefined)} />
          {sys.bulge ? (
            <FieldRow>
              <SpecNumber draft={draft} path={[...base, 'bulge', 'mass_Msun']} onChange={set} issues={issues} label="Bulge mass" />
              <SpecNumber draft={draft} path={[...base, 'bulge', 'scale_kpc']} onChange={set} issues={issues} label="Bulge scale radius" />
            </FieldRow>
          ) : null}
        </>
      ) : null}
      <Toggle
        label="Add a live dark halo of particles"
        value={Boolean(sys.halo)}
        onChange={(on) => set([...base, 'halo'], on ? HALO_PRESET : undefined)}
      />
      {sys.halo ? (
        <>
          <ChoiceChips
            label="Halo profile"
            value={String(getIn(sys, ['halo', 'profile']))}
            onChange={(v) => set([...base, 'halo', 'profile'], v)}
            choices={[
              { value: 'nfw', label: 'NFW', note: 'Cusp ρ ∝ 1/r, ρ ∝ 1/r³ further out, cut off smoothly beyond the truncation radius.' },
              { value: 'hernquist', label: 'Hernquist', note: 'Cusp ρ ∝ 1/r, ρ ∝ 1/r⁴ further out, cut sharply.' },
            ]}
          />
          <FieldRow>
            <SpecNumber draft={draft} path={[...base, 'halo', 'n']} onChange={set} issues={issues} label="Halo particles" />
            <SpecNumber draft={draft} path={[...base, 'halo', 'mass_Msun']} onChange={set} issues={issues} label="Halo mass" />
            <SpecNumber draft={draft} path={[...base, 'halo', 'scale_kpc']} onChange={set} issues={issues} label="Halo scale radius" />
            <SpecNumber draft={draft} path={[...base, 'halo', 'truncationRadius_kpc']} onChange={set} issues={issues} label="Halo truncation radius" />
          </FieldRow>
        </>
      ) : null}
    </View>
  );
}

/**
 * The particles come from a file sent through the upload path: the server reads it with the
 * same rules and limits as any table (line and column named in a refusal) and hands them back.
 */
function TableFields({ draft, set, issues }: Omit<Props, 'pairLaw'>) {
  const current = (getIn(draft, ['model', 'particles']) as Record<string, number>[]) ?? [];
  const upload = useParticleTableUpload();
  const [pickError, setPickError] = useState<string | null>(null);
  const [fileName, setFileName] = useState<string | null>(null);
  const issue = Object.entries(issues).find(([k]) => k.startsWith('model.particles'))?.[1];
  const choose = async () => {
    setPickError(null);
    try {
      const file = await pickTableFile(Infinity, ['.h5', 'application/x-hdf5']);
      if (!file) return;
      upload.mutate(file, {
        onSuccess: (r) => {
          setFileName(r.fileName);
          set(['model', 'particles'], r.particles);
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
        <Button label={current.length ? 'Choose another particle file' : 'Choose a particle file'} tone="secondary" busy={upload.isPending} onPress={() => void choose()} testID="field-model.particles" />
        <Txt variant="caption" color={problem ? colors.danger : colors.textMuted} role={problem ? 'alert' : undefined}>
          {problem ?? `${current.length} particles${fileName ? ` read from ${fileName}` : ''}`}
        </Txt>
      </View>
      <Txt variant="caption">CSV or columns separated by spaces, seven numbers a row (a header row and # comments are allowed), or a snapshot file (.h5) exported from a run: its last frame.</Txt>
      <Toggle label="Move to the centre-of-mass frame" value={getIn(draft, ['model', 'recentre']) !== false} onChange={(v) => set(['model', 'recentre'], v)} />
    </View>
  );
}

/** Chooses the initial conditions: model kind and its numbers. */
export function ModelEditor({ draft, set, issues, pairLaw }: Props) {
  const model = draft.model as Model;
  const kind = String(model.kind);
  const num = (key: string) => <SpecNumber key={key} draft={draft} path={['model', key]} onChange={set} issues={issues} />;
  const law = draft.law as LawSpec;
  const eqLaw = (getIn(model, ['equilibriumLaw']) ?? getIn(model, ['primary', 'equilibriumLaw']) ?? getIn(model, ['secondary', 'equilibriumLaw'])) as LawSpec | undefined;
  const eqChoice = !eqLaw ? 'own' : pairLaw && JSON.stringify(eqLaw) === JSON.stringify(pairLaw) ? 'pair' : 'first';

  return (
    <View style={formStyles.group}>
      <ChoiceChips
        label="Model"
        value={kind}
        onChange={(k) => set(['model'], MODEL_PRESETS[k])}
        choices={Object.keys(MODEL_PRESETS).map((k) => ({ value: k, label: MODEL_LABELS[k] ?? k, note: MODEL_NOTES[k] }))}
      />
      {kind === 'kepler' ? (
        <FieldRow>
          {num('mass1_Msun')}
          {num('mass2_Msun')}
          {num('semiMajorAxis_kpc')}
          {num('eccentricity')}
        </FieldRow>
      ) : kind === 'encounter' ? (
        <>
          {(['primary', 'secondary'] as const).map((member) => (
            <View key={member} style={styles.member}>
              <ChoiceChips
                label={member === 'primary' ? 'Primary system' : 'Secondary system'}
                value={String((model[member] as Model).kind)}
                onChange={(k) => set(['model', member], MODEL_PRESETS[k])}
                choices={SYSTEM_KINDS.map((k) => ({ value: k, label: MODEL_LABELS[k] }))}
              />
              <SystemFields draft={draft} base={['model', member]} set={set} issues={issues} />
            </View>
          ))}
          <FieldRow>
            {num('pericentre_kpc')}
            {num('initialSeparation_kpc')}
            {num('primaryTilt_deg')}
            {num('secondaryTilt_deg')}
          </FieldRow>
        </>
      ) : kind === 'table' ? (
        <TableFields draft={draft} set={set} issues={issues} />
      ) : (
        <SystemFields draft={draft} base={['model']} set={set} issues={issues} />
      )}
      {pairLaw && isSampled(model) ? (
        <ChoiceChips
          label="Velocities balanced for"
          value={eqChoice}
          onChange={(which) => set(['model'], withEquilibriumLaw(model, which === 'own' ? undefined : which === 'pair' ? pairLaw : law))}
          hint="Both runs start from the same positions. Balanced for its own law, each run starts in equilibrium, so what differs later comes from the laws; pinned to one law, both start from identical particles and the other run starts out of equilibrium."
          choices={[
            { value: 'own', label: 'each run’s own law' },
            { value: 'first', label: `${LAW_LABELS[law.kind] ?? law.kind} (first law)` },
            { value: 'pair', label: `${LAW_LABELS[pairLaw.kind] ?? pairLaw.kind} (second law)` },
          ]}
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  member: { gap: space.md, padding: space.md, borderWidth: 1, borderColor: colors.border, borderRadius: radius.md },
  pickRow: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
