// Seeded generator for initial conditions: xoshiro128** over four 32-bit
// words, seeded through splitmix32. Its whole state is a Uint32Array(4), so a
// checkpoint can store it and a resumed run draws exactly the same numbers.

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { imul, sqrt, log, cos, PI } = Math;

export type RngState = Uint32Array;

export function seedRng(seed: number): RngState {
  const state = new Uint32Array(4);
  let s = seed >>> 0;
  for (let k = 0; k < 4; k++) {
    s = (s + 0x9e3779b9) >>> 0;
    let t = s;
    t = imul(t ^ (t >>> 16), 0x85ebca6b);
    t = imul(t ^ (t >>> 13), 0xc2b2ae35);
    state[k] = (t ^ (t >>> 16)) >>> 0;
  }
  // An all-zero state would stay zero forever.
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1;
  return state;
}

const rotl = (v: number, k: number): number => ((v << k) | (v >>> (32 - k))) >>> 0;

export function nextUint32(st: RngState): number {
  const result = imul(rotl(imul(st[1], 5) >>> 0, 7), 9) >>> 0;
  const t = (st[1] << 9) >>> 0;
  st[2] ^= st[0];
  st[3] ^= st[1];
  st[1] ^= st[2];
  st[0] ^= st[3];
  st[2] ^= t;
  st[3] = rotl(st[3], 11);
  return result;
}

/** Uniform double in [0, 1) with 53 random bits. */
export function uniform(st: RngState): number {
  const hi = nextUint32(st) >>> 5;
  const lo = nextUint32(st) >>> 6;
  return (hi * 67_108_864 + lo) / 9_007_199_254_740_992;
}

/** A rejection sampler gives up after this many draws for one value instead of spinning for ever (our own bound). */
export const MAX_REJECTION_DRAWS = 1_000_000;

/** The error a sampler throws when it gives up: names the draw and the likely cause. */
export function rejectionGaveUp(what: string): Error {
  return new Error(`initial conditions: no acceptable ${what} in ${MAX_REJECTION_DRAWS} draws; the model's truncation radius is probably far below its scale radius`);
}

/** Uniform double in (0, 1): safe under logarithms. */
export function uniformOpen(st: RngState): number {
  let u = uniform(st);
  while (u === 0) u = uniform(st);
  return u;
}

/** Standard normal deviate (Box-Muller; the second deviate is dropped so the state stays four words). */
export function normal(st: RngState): number {
  const u = uniformOpen(st);
  const v = uniform(st);
  return sqrt(-2 * log(u)) * cos(2 * PI * v);
}

/** Random unit vector, isotropic. */
export function isotropicDirection(st: RngState): [number, number, number] {
  const cosT = 2 * uniform(st) - 1;
  const sinT = sqrt(Math.max(0, 1 - cosT * cosT));
  const phi = 2 * PI * uniform(st);
  return [sinT * cos(phi), sinT * Math.sin(phi), cosT];
}
