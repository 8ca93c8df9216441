// Infall's words and units for the fields of a run spec that their schemas do not carry: the
// launch form, the run page and the compare page read titles from the schema first.

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
  return UNITS.find(([suffix]) => key.endsWith(suffix))?.[1];
}

/** What each integrator is for; its name comes from the schema's option labels. */
export const INTEGRATOR_NOTES: Record<string, string> = {
  leapfrog: 'Second order, symplectic: energy error stays bounded. The usual choice.',
  yoshida4: 'Fourth-order symplectic; three force evaluations per step.',
  rk4: 'Classical Runge–Kutta, not symplectic: energy drifts steadily. Useful as a foil.',
};

export const SOLVER_LABELS: Record<string, { label: string; note: string }> = {
  direct: { label: 'Direct sum', note: 'Every pair, exact up to softening: cost grows as N².' },
  tree: { label: 'Barnes–Hut tree', note: 'Approximate far forces by cells: cost grows as N log N; error set by θ.' },
};
