import type { SnapshotFrame } from '../shared/api/snapshots';
import { partLook } from '../shared/engine';

/** The layer of parts with no look of their own: drawn last, on top. */
const TOP_LAYER = Number.MAX_SAFE_INTEGER;

// The pure geometry of the particle animation: framing, scale bar, and the path text.

export type Projection = 'xy' | 'xz' | 'yz';
const AXES: Record<Projection, [number, number]> = { xy: [0, 1], xz: [0, 2], yz: [1, 2] };

export interface Framing {
  cx: number;
  cy: number;
  /** Half the side of the square shown, kpc. */
  half: number;
}

function percentile(values: Float64Array, q: number): number {
  const sorted = Float64Array.from(values).sort();
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] ?? 0;
}

/**
 * A fixed window for the whole run so motion reads as motion: centred on the first
 * snapshot's median, wide enough for 99% of particles in the first, middle and last
 * snapshots (a few escapers would otherwise shrink everything to a dot).
 */
export function frameWindow(frames: SnapshotFrame[], projection: Projection): Framing {
  if (!frames.length || frames[0].positions.length === 0) return { cx: 0, cy: 0, half: 1 };
  const [a, b] = AXES[projection];
  const first = frames[0].positions;
  const n = first.length / 3;
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    xs[i] = first[3 * i + a];
    ys[i] = first[3 * i + b];
  }
  const cx = percentile(xs, 0.5);
  const cy = percentile(ys, 0.5);
  const picks = [frames[0], frames[frames.length >> 1], frames[frames.length - 1]];
  const reach = new Float64Array(n * picks.length);
  picks.forEach((f, k) => {
    for (let i = 0; i < n; i++) reach[k * n + i] = Math.max(Math.abs(f.positions[3 * i + a] - cx), Math.abs(f.positions[3 * i + b] - cy));
  });
  const half = percentile(reach, 0.99) * 1.1;
  return { cx, cy, half: half > 0 ? half : 1 };
}

/** A length for the scale bar: 1, 2 or 5 times a power of ten, about a fifth of the view. */
export function scaleBarLength(half_kpc: number): number {
  const target = (2 * half_kpc) / 5;
  const p = 10 ** Math.floor(Math.log10(target));
  const m = target / p;
  return p * (m >= 5 ? 5 : m >= 2 ? 2 : 1);
}

let occupied = new Uint8Array(0);

/**
 * Every particle as a small square in one SVG path: one element per frame instead of
 * thousands keeps 5,000 particles above 30 frames per second on the web. Squares sit on
 * whole pixels (integers print fast, and crisp edges need no anti-aliasing), and a pixel
 * already drawn is skipped: in a dense centre that saves much of the path. With `next`,
 * positions are blended `fraction` of the way towards it; with `only`, one component's particles.
 * Where a canvas exists the view draws pixels instead (drawParticles); this is the fallback.
 */
export function particlePath(positions: Float32Array, next: Float32Array | null, fraction: number, projection: Projection, win: Framing, size: number, dot: number, only?: { component: Uint8Array; index: number }): string {
  const [a, b] = AXES[projection];
  const px = Math.round(size);
  const scale = size / (2 * win.half);
  const mid = size / 2;
  if (occupied.length < px * px) occupied = new Uint8Array(px * px);
  else occupied.fill(0, 0, px * px);
  const square = `h${dot}v${dot}h-${dot}z`;
  const n = positions.length / 3;
  const blend = next !== null && fraction > 0;
  let out = '';
  for (let i = 0; i < n; i++) {
    if (only && only.component[i] !== only.index) continue;
    let u = positions[3 * i + a];
    let v = positions[3 * i + b];
    if (blend) {
      u += (next![3 * i + a] - u) * fraction;
      v += (next![3 * i + b] - v) * fraction;
    }
    const x = Math.floor(mid + (u - win.cx) * scale);
    const y = Math.floor(mid - (v - win.cy) * scale);
    if (x < 0 || y < 0 || x >= px || y >= px || occupied[y * px + x]) continue;
    occupied[y * px + x] = 1;
    out += 'M' + x + ' ' + y + square;
  }
  return out;
}

/** Whole-pixel dots: big for a few bodies, small for thousands, single pixels for tens of thousands. */
export function dotSize(n: number): number {
  return n <= 16 ? 6 : n <= 300 ? 3 : n <= 20_000 ? 2 : 1;
}

/** A '#rrggbb' colour as one opaque RGBA pixel of a canvas's ImageData seen as a Uint32Array (little-endian). */
export function pixelColor(hex: string): number {
  const v = parseInt(hex.slice(1, 7), 16);
  return (0xff000000 | ((v & 0xff) << 16) | (v & 0xff00) | ((v >> 16) & 0xff)) >>> 0;
}

/**
 * Particle indices in drawing order, by the layer the model registry gives each part (a live
 * halo first, so the disk and bulge show on top of it); parts with no look of their own, and
 * particles of no listed part, are drawn last.
 */
export function drawOrder(component: Uint8Array, labels: string[]): Uint32Array {
  const layerOf = (p: number) => (p < labels.length ? (partLook(labels[p])?.layer ?? TOP_LAYER) : TOP_LAYER);
  const layers = [...new Set(labels.map((_, p) => layerOf(p)).concat(TOP_LAYER))].sort((a, b) => a - b);
  const order = new Uint32Array(component.length);
  let k = 0;
  for (const layer of layers) for (let i = 0; i < component.length; i++) if (layerOf(component[i]) === layer) order[k++] = i;
  return order;
}

/** The still part of the picture, `px` pixels square: the ground and the dashed centre lines. */
export function backdrop(px: number, ground: number, line: number): Uint32Array {
  const out = new Uint32Array(px * px).fill(ground);
  const mid = px >> 1;
  for (let i = 0; i < px; i++) {
    if (i % 8 >= 2) continue; // dashes two pixels long, six apart
    out[mid * px + i] = line;
    out[i * px + mid] = line;
  }
  return out;
}

/**
 * Every particle as a `dot`-pixel square of its component's colour, written straight into the
 * pixels of a `px`-square canvas: no path to build or parse, so 50,000 particles cost a loop
 * over typed arrays and one putImageData. Blending and framing as in particlePath.
 */
export function drawParticles(
  pixels: Uint32Array,
  px: number,
  positions: Float32Array,
  next: Float32Array | null,
  fraction: number,
  projection: Projection,
  win: Framing,
  dot: number,
  order: Uint32Array,
  component: Uint8Array,
  paint: Uint32Array,
): void {
  const [a, b] = AXES[projection];
  const scale = px / (2 * win.half);
  const mid = px / 2;
  const blend = next !== null && fraction > 0;
  const last = px - dot;
  for (let k = 0; k < order.length; k++) {
    const i = order[k];
    let u = positions[3 * i + a];
    let v = positions[3 * i + b];
    if (blend) {
      u += (next![3 * i + a] - u) * fraction;
      v += (next![3 * i + b] - v) * fraction;
    }
    const x = Math.floor(mid + (u - win.cx) * scale);
    const y = Math.floor(mid - (v - win.cy) * scale);
    if (x < 0 || y < 0 || x > last || y > last) continue;
    const c = paint[component[i]];
    for (let dy = 0; dy < dot; dy++) {
      const row = (y + dy) * px + x;
      for (let dx = 0; dx < dot; dx++) pixels[row + dx] = c;
    }
  }
}
