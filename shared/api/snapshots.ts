// Wire format of a run's snapshot frames (GET /api/runs/:id/snapshots), our own:
//   header  : 4 bytes ASCII "IFS1", uint32 frameCount, uint32 particleCount, uint32 reserved
//   per frame: float64 time_Myr, uint32 step, uint32 reserved, float32 x,y,z * particleCount
// All little-endian. Float32 keeps 12 bytes per particle per frame.

export interface SnapshotFrame {
  step: number;
  time_Myr: number;
  positions: Float32Array; // x,y,z interleaved
}

const MAGIC = [0x49, 0x46, 0x53, 0x31]; // "IFS1"
const HEADER_BYTES = 16;
const FRAME_HEADER_BYTES = 16;

export function encodeSnapshots(frames: SnapshotFrame[]): Uint8Array {
  const n = frames.length ? frames[0].positions.length / 3 : 0;
  for (const f of frames) {
    if (f.positions.length !== n * 3) throw new Error('every frame must hold the same particles');
  }
  const frameBytes = FRAME_HEADER_BYTES + n * 12;
  const buf = new ArrayBuffer(HEADER_BYTES + frames.length * frameBytes);
  const view = new DataView(buf);
  MAGIC.forEach((b, i) => view.setUint8(i, b));
  view.setUint32(4, frames.length, true);
  view.setUint32(8, n, true);
  frames.forEach((f, k) => {
    const at = HEADER_BYTES + k * frameBytes;
    view.setFloat64(at, f.time_Myr, true);
    view.setUint32(at + 8, f.step, true);
    for (let i = 0; i < n * 3; i++) view.setFloat32(at + FRAME_HEADER_BYTES + i * 4, f.positions[i], true);
  });
  return new Uint8Array(buf);
}

export function decodeSnapshots(bytes: Uint8Array): SnapshotFrame[] {
  if (bytes.byteLength < HEADER_BYTES) throw new Error('snapshot data is too short');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < 4; i++) {
    if (view.getUint8(i) !== MAGIC[i]) throw new Error('not Infall snapshot data (bad magic)');
  }
  const count = view.getUint32(4, true);
  const n = view.getUint32(8, true);
  const frameBytes = FRAME_HEADER_BYTES + n * 12;
  if (bytes.byteLength !== HEADER_BYTES + count * frameBytes) throw new Error('snapshot data length does not match its header');
  const frames: SnapshotFrame[] = [];
  for (let k = 0; k < count; k++) {
    const at = HEADER_BYTES + k * frameBytes;
    const positions = new Float32Array(n * 3);
    for (let i = 0; i < n * 3; i++) positions[i] = view.getFloat32(at + FRAME_HEADER_BYTES + i * 4, true);
    frames.push({ time_Myr: view.getFloat64(at, true), step: view.getUint32(at + 8, true), positions });
  }
  return frames;
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
