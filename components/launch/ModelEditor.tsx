import { useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import type { LawSpec } from '../../shared/spec';
import { colors, fonts, radius, space } from '../../constants/theme';
import { getIn, isSampled, MODEL_PRESETS, SYSTEM_KINDS, withEquilibriumLaw, type Path } from '../../hooks/runDraft';
import { ChoiceChips, FieldRow, Toggle } from '../fields';
import { LAW_LABELS, MODEL_LABELS } from '../format';
import { parseNumberText } from '../numberText';
import { Txt } from '../Txt';
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
  table: 'Your own particles: one per line as x y z [kpc] vx vy vz [km/s] mass [M☉].',
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
    </View>
  );
}

const COLUMNS = ['x', 'y', 'z', 'vx', 'vy', 'vz', 'mass'];

/** Parses pasted particle rows (columns split by spaces, commas or semicolons); returns the particles or the first line that is wrong. */
export function parseParticleTable(text: string): { particles: Record<string, number>[] } | { error: string } {
  const particles: Record<string, number>[] = [];
  const lines = text.split(/\r?\n/);
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i].trim();
    if (!line || line.startsWith('#')) continue;
    const words = line.split(/[\s,;]+/);
    if (words.length !== 7) return { error: `Line ${i + 1}: expected 7 numbers (x y z vx vy vz mass), got ${words.length}: "${line.slice(0, 60)}"` };
    const v: number[] = [];
    for (const [j, word] of words.entries()) {
      const read = parseNumberText(word);
      if (read.state !== 'number') return { error: `Line ${i + 1}, ${COLUMNS[j]} "${word.slice(0, 30)}": ${read.state === 'invalid' ? read.problem : 'missing'}` };
      v.push(read.value);
    }
    const [x_kpc, y_kpc, z_kpc, vx_km_s, vy_km_s, vz_km_s, mass_Msun] = v;
    particles.push({ x_kpc, y_kpc, z_kpc, vx_km_s, vy_km_s, vz_km_s, mass_Msun });
  }
  return { particles };
}

function TableFields({ draft, set, issues }: Omit<Props, 'pairLaw'>) {
  const current = (getIn(draft, ['model', 'particles']) as Record<string, number>[]) ?? [];
  const [text, setText] = useState(() => current.map((p) => [p.x_kpc, p.y_kpc, p.z_kpc, p.vx_km_s, p.vy_km_s, p.vz_km_s, p.mass_Msun].join(' ')).join('\n'));
  const [error, setError] = useState<string | null>(null);
  const issue = Object.entries(issues).find(([k]) => k.startsWith('model.particles'))?.[1];
  return (
    <View style={formStyles.group}>
      <TextInput
        multiline
        value={text}
        onChangeText={(t) => {
          setText(t);
          const parsed = parseParticleTable(t);
          if ('error' in parsed) setError(parsed.error);
          else {
            setError(null);
            set(['model', 'particles'], parsed.particles);
          }
        }}
        accessibilityLabel="Particle table: x y z in kpc, vx vy vz in km/s, mass in solar masses, one particle per line"
        style={styles.table}
        testID="field-model.particles"
      />
      <Txt variant="caption" color={error || issue ? colors.danger : colors.textMuted}>
        {error ?? issue ?? `${current.length} particles read`}
      </Txt>
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
  table: { minHeight: 140, color: colors.text, fontFamily: fonts.mono, fontSize: 13, padding: space.md, backgroundColor: colors.surfaceRaised, borderRadius: radius.md, borderWidth: 1, borderColor: colors.border, textAlignVertical: 'top' },
});
