// Infall's words and units for the fields of a run spec: the launch form, the run page and the
// compare page all read them from here.

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

// Also the order in which the run and compare pages list a spec's fields.
const LABELS: Record<string, string> = {
  primary: 'Primary',
  secondary: 'Secondary',
  particles: 'Uploaded particles',
  recentre: 'Moved to centre-of-mass frame',
  profile: 'Halo profile',
  interpolation: 'Interpolating function',
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
  bulge: 'Bulge',
  equilibriumLaw: 'Velocities balanced for',
  timestep_Myr: 'Timestep Δt',
  duration_Myr: 'Duration',
  softening_kpc: 'Softening ε',
  snapshotEvery: 'Snapshot every',
  diagnosticsEvery: 'Diagnostics every',
  seed: 'Random seed',
  theta: 'Opening angle θ',
  a0_m_s2: 'a₀',
  box_kpc: 'Grid box side',
  H0_km_s_Mpc: 'H₀',
  alpha: 'Strength α',
  lambda_kpc: 'Range λ',
  density_Msun_kpc3: 'Density ρ₀',
};

export const labelOf = (key: string) => LABELS[key] ?? key;

/** Position of a field in the listed order; unknown fields go last. */
export const fieldOrder = (key: string) => {
  const k = Object.keys(LABELS).indexOf(key);
  return k < 0 ? Number.MAX_SAFE_INTEGER : k;
};

export const INTEGRATOR_LABELS: Record<string, { label: string; note: string }> = {
  leapfrog: { label: 'Leapfrog (KDK)', note: 'Second order, symplectic: energy error stays bounded. The usual choice.' },
  yoshida4: { label: 'Yoshida 4th order', note: 'Fourth-order symplectic; three force evaluations per step.' },
  rk4: { label: 'RK4', note: 'Classical Runge–Kutta, not symplectic: energy drifts steadily. Useful as a foil.' },
};

export const SOLVER_LABELS: Record<string, { label: string; note: string }> = {
  direct: { label: 'Direct sum', note: 'Every pair, exact up to softening: cost grows as N².' },
  tree: { label: 'Barnes–Hut tree', note: 'Approximate far forces by cells: cost grows as N log N; error set by θ.' },
};

export const INTERPOLATION_LABELS: Record<string, string> = { simple: 'simple ν', standard: 'standard ν', rar: 'RAR ν' };
export const PROFILE_LABELS: Record<string, string> = { nfw: 'NFW', 'cored-isothermal': 'cored isothermal' };
