import { View } from 'react-native';
import type { LawSpec } from '../../shared/spec';
import { lawInfo } from '../../shared/engine';
import { QUMOND_GRID_SIZES } from '../../shared/engine/laws/qumond';
import { space } from '../../constants/theme';
import { LAW_PRESETS, type Path } from '../../hooks/runDraft';
import { enumOptions } from '../../hooks/specSchema';
import { ChoiceChips, FieldRow } from '../fields';
import { LAW_LABELS } from '../format';
import { Txt } from '../Txt';
import { INTERPOLATION_LABELS, PROFILE_LABELS } from '../spec/labels';
import { SpecNumber } from './SpecField';
import { styles as formStyles } from './formStyles';


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

/** Picks a force law and its parameters, with what the law conserves and where it holds. */
export function LawEditor({ label, law, onChange, issues, issuePrefix, exclude, testID }: LawEditorProps) {
  const holder = { law };
  const setParam = (path: Path, v: unknown) => onChange({ ...law, [path[path.length - 1]]: v } as LawSpec);
  let info: ReturnType<typeof lawInfo> | null = null;
  try {
    info = lawInfo(law);
  } catch {
    info = null; // parameters half-typed; the fields show what is wrong
  }
  const kinds = Object.keys(LAW_PRESETS).filter((k) => k !== exclude || k === law.kind);
  const num = (key: string) => <SpecNumber key={key} draft={holder} path={['law', key]} onChange={setParam} issues={issues} issueKey={`${issuePrefix}${key}`} />;
  return (
    <View style={formStyles.group} testID={testID}>
      <ChoiceChips label={label} value={law.kind} onChange={(k) => onChange(LAW_PRESETS[k])} choices={kinds.map((k) => ({ value: k, label: LAW_LABELS[k] ?? k }))} />
      {law.kind === 'halo' ? (
        <>
          <ChoiceChips label="Halo profile" value={law.profile} onChange={(p) => onChange({ ...law, profile: p as typeof law.profile })} choices={enumOptions(['law', 'profile'], holder).map((p) => ({ value: p, label: PROFILE_LABELS[p] ?? p }))} />
          <FieldRow>
            {num('scale_kpc')}
            {num('density_Msun_kpc3')}
          </FieldRow>
        </>
      ) : law.kind === 'mond' ? (
        <>
          <ChoiceChips label="Interpolating function" value={law.interpolation} onChange={(p) => onChange({ ...law, interpolation: p as typeof law.interpolation })} choices={enumOptions(['law', 'interpolation'], holder).map((p) => ({ value: p, label: INTERPOLATION_LABELS[p] ?? p }))} />
          <FieldRow>{num('a0_m_s2')}</FieldRow>
        </>
      ) : law.kind === 'qumond' ? (
        <>
          <ChoiceChips label="Interpolating function" value={law.interpolation} onChange={(p) => onChange({ ...law, interpolation: p as typeof law.interpolation })} choices={enumOptions(['law', 'interpolation'], holder).map((p) => ({ value: p, label: INTERPOLATION_LABELS[p] ?? p }))} />
          <ChoiceChips label="Grid nodes per side" value={law.grid} onChange={(g) => onChange({ ...law, grid: g })} choices={QUMOND_GRID_SIZES.map((g) => ({ value: g, label: `${g}³` }))} />
          <FieldRow>
            {num('a0_m_s2')}
            {num('box_kpc')}
          </FieldRow>
          <ChoiceChips
            label="External field"
            value={law.externalField_m_s2 ? 'constant' : 'none'}
            onChange={(v) => onChange({ ...law, externalField_m_s2: v === 'constant' ? [1.2e-10, 0, 0] : undefined })}
            choices={[{ value: 'none', label: 'none (isolated)' }, { value: 'constant', label: 'constant vector' }]}
          />
          {law.externalField_m_s2 ? (
            <FieldRow>
              {(['x', 'y', 'z'] as const).map((axis, i) => (
                <SpecNumber
                  key={axis}
                  draft={holder}
                  path={['law', 'externalField_m_s2', i]}
                  label={`External field ${axis} (m/s²)`}
                  onChange={(_, v) => onChange({ ...law, externalField_m_s2: law.externalField_m_s2!.map((c, k) => (k === i ? (v ?? 0) : c)) as [number, number, number] })}
                  issues={issues}
                  issueKey={`${issuePrefix}externalField_m_s2.${i}`}
                />
              ))}
            </FieldRow>
          ) : null}
        </>
      ) : law.kind === 'emergent' ? (
        <FieldRow>{num('H0_km_s_Mpc')}</FieldRow>
      ) : law.kind === 'yukawa' ? (
        <FieldRow>
          {num('alpha')}
          {num('lambda_kpc')}
        </FieldRow>
      ) : null}
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
