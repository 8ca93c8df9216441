// Particle data as structure of arrays. Everything a run needs to continue is
// in ParticleState plus the step counter and RNG words (see simulation.ts), so
// a checkpoint is a handful of typed arrays.

/** Points in space, kpc. */
export interface Points {
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
}

/** Field sources: positions (kpc) and masses (Msun). */
export interface Sources extends Points {
  m: Float64Array;
}

/** Acceleration components, (km/s)^2/kpc. */
export interface Accelerations {
  ax: Float64Array;
  ay: Float64Array;
  az: Float64Array;
}

export interface ParticleState extends Sources, Accelerations {
  n: number;
  vx: Float64Array;
  vy: Float64Array;
  vz: Float64Array;
}

export function allocateParticles(n: number): ParticleState {
  const f = () => new Float64Array(n);
  return { n, x: f(), y: f(), z: f(), vx: f(), vy: f(), vz: f(), m: f(), ax: f(), ay: f(), az: f() };
}

export function allocateAccelerations(n: number): Accelerations {
  return { ax: new Float64Array(n), ay: new Float64Array(n), az: new Float64Array(n) };
}

export function totalMass(m: Float64Array): number {
  let s = 0;
  for (let i = 0; i < m.length; i++) s += m[i];
  return s;
}

/** Mass-weighted centre of positions (kpc) and of velocities (km/s). */
export function centreOfMass(p: ParticleState): { x: number; y: number; z: number; vx: number; vy: number; vz: number } {
  let M = 0, x = 0, y = 0, z = 0, vx = 0, vy = 0, vz = 0;
  for (let i = 0; i < p.n; i++) {
    const mi = p.m[i];
    M += mi;
    x += mi * p.x[i]; y += mi * p.y[i]; z += mi * p.z[i];
    vx += mi * p.vx[i]; vy += mi * p.vy[i]; vz += mi * p.vz[i];
  }
  return { x: x / M, y: y / M, z: z / M, vx: vx / M, vy: vy / M, vz: vz / M };
}

/** Moves positions and velocities into the centre-of-mass frame. */
export function shiftToCentreOfMassFrame(p: ParticleState): void {
  const c = centreOfMass(p);
  for (let i = 0; i < p.n; i++) {
    p.x[i] -= c.x; p.y[i] -= c.y; p.z[i] -= c.z;
    p.vx[i] -= c.vx; p.vy[i] -= c.vy; p.vz[i] -= c.vz;
  }
}

export function cloneParticles(p: ParticleState): ParticleState {
  return {
    n: p.n,
    x: p.x.slice(), y: p.y.slice(), z: p.z.slice(),
    vx: p.vx.slice(), vy: p.vy.slice(), vz: p.vz.slice(),
    m: p.m.slice(),
    ax: p.ax.slice(), ay: p.ay.slice(), az: p.az.slice(),
  };
}

/** Index of the first particle whose position or velocity is not finite, or -1. */
export function firstNonFinite(p: ParticleState): number {
  for (let i = 0; i < p.n; i++) {
    // x - x is NaN exactly when x is NaN or infinite: one test for both.
    if (p.x[i] - p.x[i] + p.y[i] - p.y[i] + p.z[i] - p.z[i] + p.vx[i] - p.vx[i] + p.vy[i] - p.vy[i] + p.vz[i] - p.vz[i] !== 0) return i;
  }
  return -1;
}
