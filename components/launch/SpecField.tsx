import { fieldBounds } from '../../hooks/specSchema';
import { getIn, type Path } from '../../hooks/runDraft';
import { NumberField } from '../fields';

// Units read from the field names of the spec (kpc, Msun, Myr, ...), longest suffix first.
const UNITS: [string, string][] = [
  ['_Msun_kpc3', 'M☉/kpc³'],
  ['_km_s_Mpc', 'km/s/Mpc'],
  ['_m_s2', 'm/s²'],
  ['_km_s', 'km/s'],
  ['_Msun', 'M☉'],
  ['_kpc', 'kpc'],
  ['_Myr', 'Myr'],
  ['_deg', '°'],
];

export function unitOf(key: string): string | undefined {
  if (key === 'snapshotEvery' || key === 'diagnosticsEvery') return 'steps';
  return UNITS.find(([suffix]) => key.endsWith(suffix))?.[1];
}

const LABELS: Record<string, string> = {
  n: 'Particles N',
  mass_Msun: 'Mass',
  scale_kpc: 'Scale radius a',
  truncationRadius_kpc: 'Truncation radius',
  scaleLength_kpc: 'Scale length R_d',
  scaleHeight_kpc: 'Scale height z₀',
  toomreQ: 'Toomre Q',
  mass1_Msun: 'Mass 1',
  mass2_Msun: 'Mass 2',
  semiMajorAxis_kpc: 'Semi-major axis',
  eccentricity: 'Eccentricity',
  pericentre_kpc: 'Pericentre',
  initialSeparation_kpc: 'Starting separation',
  primaryTilt_deg: 'Primary tilt',
  secondaryTilt_deg: 'Secondary tilt',
  timestep_Myr: 'Timestep Δt',
  duration_Myr: 'Duration',
  softening_kpc: 'Softening ε',
  snapshotEvery: 'Snapshot every',
  diagnosticsEvery: 'Diagnostics every',
  seed: 'Random seed',
  theta: 'Opening angle θ',
  a0_m_s2: 'a0',
  box_kpc: 'Grid box side',
  H0_km_s_Mpc: 'H0',
  alpha: 'Strength α',
  lambda_kpc: 'Range λ',
  density_Msun_kpc3: 'Density ρ₀',
};

export const labelOf = (key: string) => LABELS[key] ?? key;

export interface SpecNumberProps {
  /** The object the path starts from (the draft spec, or `{ law }` for a pair's second law). */
  draft: unknown;
  path: Path;
  onChange: (path: Path, v: number | undefined) => void;
  issues: Record<string, string>;
  /** This field's key in `issues` when it is not the dotted path (the pair's second law). */
  issueKey?: string;
  label?: string;
}

/** A number of the run spec with its unit, range and description taken from the shared schema. */
export function SpecNumber({ draft, path, onChange, issues, issueKey = path.join('.'), label }: SpecNumberProps) {
  const key = String(path[path.length - 1]);
  const b = fieldBounds(path, draft);
  const value = getIn(draft, path);
  const unit = unitOf(key);
  return (
    <NumberField
      label={label ?? labelOf(key)}
      value={typeof value === 'number' ? value : undefined}
      onChange={(v) => onChange(path, v)}
      unit={unit}
      min={b.min}
      max={b.max}
      exclusiveMin={b.exclusiveMin}
      integer={b.integer}
      optional={b.optional}
      hint={b.description}
      error={issues[issueKey]}
      testID={`field-${issueKey}`}
    />
  );
}
