import type { Sources } from './state';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { hypot, floor, sqrt, max, min } = Math;

/**
 * Spherically averaged mass profile of a particle set about a centre: the
 * particles sorted by radius are grouped into shells of equal count and the
 * density is taken as uniform inside each shell, so M(r) is smooth enough to
 * differentiate and behaves as r^3 at the centre.
 */
export interface RadialMassProfile {
  total_Msun: number;
  /** Outer radius of the outermost particle, kpc. */
  outerRadius_kpc: number;
  enclosedMass(r_kpc: number): number;
  /** dM/dr, Msun/kpc. */
  enclosedMassSlope(r_kpc: number): number;
}

/** Shell count: about sqrt(N) particles per shell, at most 64 shells (common practice for noisy profiles). */
const shellCount = (n: number): number => max(1, min(64, floor(sqrt(n))));

export function radialProfile(sources: Sources, cx: number, cy: number, cz: number): RadialMassProfile {
  const n = sources.m.length;
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) r[i] = hypot(sources.x[i] - cx, sources.y[i] - cy, sources.z[i] - cz);
  const order = Uint32Array.from({ length: n }, (_, i) => i).sort((a, b) => r[a] - r[b]);
  const shells = shellCount(n);
  const edges = new Float64Array(shells + 1);
  const mass = new Float64Array(shells + 1);
  let cumulative = 0;
  let k = 1;
  for (let s = 0; s < n; s++) {
    cumulative += sources.m[order[s]];
    if (s === floor((k * n) / shells) - 1) {
      edges[k] = r[order[s]];
      mass[k] = cumulative;
      k++;
    }
  }
  // Index of the shell holding radius rr (edges[k-1] <= rr < edges[k]), or shells+1 beyond the last.
  const shellOf = (rr: number): number => {
    let lo = 1, hi = shells + 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (edges[mid] > rr) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  };
  return {
    total_Msun: cumulative,
    outerRadius_kpc: edges[shells],
    enclosedMass(rr) {
      const s = shellOf(rr);
      if (s > shells) return cumulative;
      const a3 = edges[s - 1] ** 3, b3 = edges[s] ** 3;
      return mass[s - 1] + ((mass[s] - mass[s - 1]) * (rr ** 3 - a3)) / (b3 - a3);
    },
    enclosedMassSlope(rr) {
      const s = shellOf(rr);
      if (s > shells) return 0;
      const a3 = edges[s - 1] ** 3, b3 = edges[s] ** 3;
      return ((mass[s] - mass[s - 1]) * 3 * rr * rr) / (b3 - a3);
    },
  };
}
