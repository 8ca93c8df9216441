// Wire format of a run's snapshot frames (GET /api/runs/:id/snapshots?format=2), our own.
// All little-endian; every section starts on a 4-byte boundary. README "Exports" has the table.
//   header    : 4 bytes ASCII "IFS2", uint32 frameCount F, uint32 particleCount N, uint32 labelBytes L
//   labels    : L bytes of printable ASCII, the component names joined by "\n", then zero padding to 4 bytes
//   component : uint8 x N, each particle's index into the labels, then zero padding to 4 bytes
//   per frame : float64 time_Myr, uint32 step, uint32 far-particle count K,
//               float64 min x, y, z, float64 max x, y, z (the frame's box, kpc),
//               uint16 x, y, z x N, then zero padding to 4 bytes,
//               uint32 index x K, float32 x, y, z x K (the particles outside the box, exactly)
// Inside the box a coordinate c is sent as q = round((c - min) / (max - min) * 65535) and read
// back as min + q * (max - min) / 65535: off by at most (max - min) / 131070 on each axis. The
// box is the bulk's, not the escapers': per axis at most 4 times the distance from the median
// that holds 98% of the particles, either side. The few outside it travel as float32. About six
// bytes per particle per frame, not twelve. The database and the HDF5 file keep the full float32
// positions; only the wire is quantised.

export const SNAPSHOT_WIRE_FORMAT = 2;
export const QUANTUM_STEPS = 65535;
/** The bulk: this fraction of particles, nearest the median on an axis (up to 2% may escape). */
const BULK = 0.98;
/** The box reaches this many times the bulk's distance from the median, per axis. */
export const BOX_REACH = 4;

export interface SnapshotFrame {
  step: number;
  time_Myr: number;
  positions: Float32Array; // x,y,z interleaved, kpc
}

/** Which part of the model each particle belongs to (disk, bulge, halo, primary ...). */
export interface ParticleParts {
  labels: string[];
  component: Uint8Array;
}

export interface SnapshotSet extends ParticleParts {
  frames: SnapshotFrame[];
}

const MAGIC = [0x49, 0x46, 0x53]; // "IFS", then the format version as one ASCII digit
const HEADER_BYTES = 16;
const FRAME_HEADER_BYTES = 64;
const SAMPLE = 4096; // particles the bulk's percentiles are taken from, evenly spread
const pad4 = (n: number) => (n + 3) & ~3;

/** The largest error of a decoded coordinate on each axis, kpc, for a frame box of this extent. */
export const quantisationError = (extent_kpc: number) => extent_kpc / (2 * QUANTUM_STEPS);

/** A frame's box on one axis: the bulk's reach around the median, within the particles' own extent. */
export function frameBox(positions: Float32Array, axis: number): { min: number; max: number } {
  const n = positions.length / 3;
  if (n === 0) return { min: 0, max: 0 };
  const stride = Math.max(1, Math.floor(n / SAMPLE));
  const sample = new Float64Array(Math.ceil(n / stride));
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const c = positions[3 * i + axis];
    if (c < lo) lo = c;
    if (c > hi) hi = c;
    if (i % stride === 0) sample[i / stride] = c;
  }
  sample.sort();
  const median = sample[sample.length >> 1];
  const dist = sample.map((c) => Math.abs(c - median)).sort();
  const reach = BOX_REACH * dist[Math.min(dist.length - 1, Math.floor(BULK * dist.length))];
  return { min: Math.max(lo, median - reach), max: Math.min(hi, median + reach) };
}

export function encodeSnapshots({ frames, labels, component }: SnapshotSet): Uint8Array {
  const n = frames.length ? frames[0].positions.length / 3 : component.length;
  for (const f of frames) {
    if (f.positions.length !== n * 3) throw new Error('every frame must hold the same particles');
  }
  if (component.length !== n) throw new Error(`the component list has ${component.length} entries for ${n} particles`);
  // Printable ASCII, so every JavaScript runtime (React Native's too) reads it without a text codec.
  const bad = labels.find((l) => !/^[\x20-\x7e]*$/.test(l));
  if (bad !== undefined) throw new Error(`component label ${JSON.stringify(bad)} is not printable ASCII`);
  const labelBytes = Uint8Array.from(labels.join('\n'), (c) => c.charCodeAt(0));
  const partsAt = HEADER_BYTES + pad4(labelBytes.length);
  const framesAt = partsAt + pad4(n);

  const encoded = frames.map((f, k) => {
    for (let i = 0; i < n * 3; i++) {
      if (!Number.isFinite(f.positions[i])) throw new Error(`frame ${k} (step ${f.step}) holds a coordinate that is not a finite number`);
    }
    const box = [0, 1, 2].map((a) => frameBox(f.positions, a));
    const far: number[] = [];
    for (let i = 0; i < n; i++) {
      if (box.some(({ min, max }, a) => f.positions[3 * i + a] < min || f.positions[3 * i + a] > max)) far.push(i);
    }
    const bytes = new Uint8Array(FRAME_HEADER_BYTES + pad4(n * 6) + far.length * 16);
    const view = new DataView(bytes.buffer);
    view.setFloat64(0, f.time_Myr, true);
    view.setUint32(8, f.step, true);
    view.setUint32(12, far.length, true);
    box.forEach(({ min, max }, a) => {
      view.setFloat64(16 + 8 * a, min, true);
      view.setFloat64(40 + 8 * a, max, true);
    });
    const scale = box.map(({ min, max }) => (max > min ? QUANTUM_STEPS / (max - min) : 0));
    const q = new Uint16Array(n * 3); // far particles' slots stay 0
    for (let i = 0; i < n * 3; i++) {
      const a = i % 3;
      q[i] = Math.min(QUANTUM_STEPS, Math.max(0, Math.round((f.positions[i] - box[a].min) * scale[a])));
    }
    // Written through a byte view of the array: correct on little-endian hosts, which every supported one is.
    bytes.set(new Uint8Array(q.buffer), FRAME_HEADER_BYTES);
    const farAt = FRAME_HEADER_BYTES + pad4(n * 6);
    far.forEach((i, j) => {
      view.setUint32(farAt + 4 * j, i, true);
      for (let a = 0; a < 3; a++) view.setFloat32(farAt + 4 * far.length + 12 * j + 4 * a, f.positions[3 * i + a], true);
    });
    return bytes;
  });

  const out = new Uint8Array(framesAt + encoded.reduce((s, b) => s + b.length, 0));
  const view = new DataView(out.buffer);
  out.set([...MAGIC, 0x30 + SNAPSHOT_WIRE_FORMAT]);
  view.setUint32(4, frames.length, true);
  view.setUint32(8, n, true);
  view.setUint32(12, labelBytes.length, true);
  out.set(labelBytes, HEADER_BYTES);
  out.set(component, partsAt);
  let at = framesAt;
  for (const b of encoded) {
    out.set(b, at);
    at += b.length;
  }
  return out;
}

export function decodeSnapshots(bytes: Uint8Array): SnapshotSet {
  if (bytes.byteLength < HEADER_BYTES) throw new Error('snapshot data is too short');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (!MAGIC.every((b, i) => view.getUint8(i) === b)) throw new Error('not Infall snapshot data (bad magic)');
  const version = view.getUint8(3) - 0x30;
  if (version !== SNAPSHOT_WIRE_FORMAT) {
    throw new Error(`snapshot data is in wire format ${version}; this app reads format ${SNAPSHOT_WIRE_FORMAT} (reload the page for the current app)`);
  }
  const count = view.getUint32(4, true);
  const n = view.getUint32(8, true);
  const labelLength = view.getUint32(12, true);
  const partsAt = HEADER_BYTES + pad4(labelLength);
  const framesAt = partsAt + pad4(n);
  const short = () => new Error('snapshot data length does not match its header');
  if (bytes.byteLength < framesAt + count * (FRAME_HEADER_BYTES + pad4(n * 6))) throw short();
  const labels = labelLength ? String.fromCharCode(...bytes.subarray(HEADER_BYTES, HEADER_BYTES + labelLength)).split('\n') : [];
  const component = bytes.slice(partsAt, partsAt + n);
  if (component.some((c) => c >= Math.max(1, labels.length))) throw new Error('a particle names a component the snapshot data does not list');
  const frames: SnapshotFrame[] = [];
  let at = framesAt;
  for (let k = 0; k < count; k++) {
    const far = view.getUint32(at + 12, true);
    const farAt = at + FRAME_HEADER_BYTES + pad4(n * 6);
    if (farAt + 16 * far > bytes.byteLength) throw short();
    const min = [0, 1, 2].map((a) => view.getFloat64(at + 16 + 8 * a, true));
    const step = [0, 1, 2].map((a) => (view.getFloat64(at + 40 + 8 * a, true) - min[a]) / QUANTUM_STEPS);
    // Copied first: the frame's offset in a fetched buffer need not suit a Uint16Array.
    const q = new Uint16Array(bytes.slice(at + FRAME_HEADER_BYTES, at + FRAME_HEADER_BYTES + n * 6).buffer);
    const positions = new Float32Array(n * 3);
    for (let i = 0; i < n; i++) {
      positions[3 * i] = min[0] + q[3 * i] * step[0];
      positions[3 * i + 1] = min[1] + q[3 * i + 1] * step[1];
      positions[3 * i + 2] = min[2] + q[3 * i + 2] * step[2];
    }
    for (let j = 0; j < far; j++) {
      const i = view.getUint32(farAt + 4 * j, true);
      if (i >= n) throw new Error('snapshot data names a particle it does not hold');
      for (let a = 0; a < 3; a++) positions[3 * i + a] = view.getFloat32(farAt + 4 * far + 12 * j + 4 * a, true);
    }
    frames.push({ time_Myr: view.getFloat64(at, true), step: view.getUint32(at + 8, true), positions });
    at = farAt + 16 * far;
  }
  if (at !== bytes.byteLength) throw short();
  return { labels, component, frames };
}

// The snapshot file (GET /api/runs/:id/snapshots.h5): HDF5, in a layout of Infall's own that
// README "Exports" describes. Every dataset carries `units` and `description` attributes.
export const SNAPSHOT_FILE = {
  format: 'infall-snapshots',
  version: 1,
  mime: 'application/x-hdf5',
  datasets: {
    id: { path: 'particles/id', units: '1', description: "the particle's index in the run's initial conditions" },
    mass: { path: 'particles/mass', units: 'Msun', description: 'particle mass (constant during the run)' },
    component: { path: 'particles/component', units: '1', description: "index into this dataset's `labels` attribute (disk, bulge, primary, ...)" },
    step: { path: 'frames/step', units: '1', description: 'integration step of each frame' },
    time: { path: 'frames/time', units: 'Myr', description: 'simulated time of each frame' },
    position: { path: 'frames/position', units: 'kpc', description: "x, y, z per frame and particle, in the run's coordinates" },
    velocity: { path: 'frames/velocity', units: 'km/s', description: 'vx, vy, vz per frame and particle' },
  },
} as const;

export type SnapshotDataset = keyof typeof SNAPSHOT_FILE.datasets;
