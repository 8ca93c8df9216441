// A worker thread that reads the particles of a snapshot file written by the export (HDF5, read
// with h5wasm, which is ESM-only and loads here so the server's event loop never waits on it):
// positions and velocities of the last frame, with the masses. It answers once and ends.
import { parentPort, workerData } from 'node:worker_threads';
import { SNAPSHOT_FILE, type SnapshotDataset } from '../../shared/api/snapshots';

export type ParticleFileAnswer =
  | { ok: true; positions: Float32Array; velocities: Float32Array; masses: Float64Array; timeMyr: number }
  | { ok: false; message: string };

async function read(path: string): Promise<ParticleFileAnswer> {
  const h5 = await import('h5wasm/node');
  await h5.ready;
  const file = new h5.File(path, 'r');
  try {
    const format = file.attrs.format?.value;
    if (format !== SNAPSHOT_FILE.format) return { ok: false, message: `this HDF5 file is not an Infall snapshot file (its format attribute is ${format === undefined ? 'missing' : `"${String(format)}"`})` };
    const dataset = (which: SnapshotDataset) => {
      const d = file.get(SNAPSHOT_FILE.datasets[which].path);
      return d instanceof h5.Dataset ? d : null;
    };
    const [position, velocity, mass, time] = [dataset('position'), dataset('velocity'), dataset('mass'), dataset('time')];
    if (!position || !time) return { ok: false, message: 'the snapshot file has no frames' };
    if (!velocity || !mass) return { ok: false, message: 'the snapshot file has no velocities or masses (a run stored before they were kept); it cannot start a run' };
    const [frames, n] = position.shape as number[];
    if (!frames || !n) return { ok: false, message: 'the snapshot file has no frames' };
    const last = frames - 1;
    return {
      ok: true,
      positions: Float32Array.from(position.slice([[last, last + 1]]) as Float32Array),
      velocities: Float32Array.from(velocity.slice([[last, last + 1]]) as Float32Array),
      masses: Float64Array.from(mass.value as Float64Array),
      timeMyr: Number((time.value as Float64Array)[last]),
    };
  } finally {
    file.close();
  }
}

if (parentPort) {
  read(workerData as string).then(
    (a) => parentPort!.postMessage(a),
    (e) => parentPort!.postMessage({ ok: false, message: `the HDF5 file cannot be read (${e instanceof Error ? e.message : String(e)})` } satisfies ParticleFileAnswer),
  );
}
