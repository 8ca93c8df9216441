// A worker thread that writes one snapshot file with h5wasm (an ESM-only WebAssembly build of
// the HDF5 library, loaded here so the server's event loop never blocks on it). The parent
// sends frames in batches and waits for each to be written, so neither side holds more than a
// batch; the file goes to disk as it is written.
import { parentPort, workerData } from 'node:worker_threads';
import { SNAPSHOT_FILE, type SnapshotDataset } from '../../shared/api/snapshots';

export interface SnapshotFileHeader {
  path: string;
  /** Root attributes: strings and whole numbers. */
  attrs: Record<string, string | number>;
  particles: number;
  steps: Uint32Array;
  times_Myr: Float64Array;
  velocities: boolean;
  /** Who the particles are; null for runs stored before this was kept. */
  identity: { ids: Uint32Array; masses: Float64Array; component: Uint8Array; labels: string[] } | null;
}

export type ToThread = { kind: 'frames'; start: number; positions: Float32Array; velocities: Float32Array | null } | { kind: 'close' };
export type FromThread = { kind: 'ready' } | { kind: 'written'; end: number } | { kind: 'closed' } | { kind: 'error'; message: string };

type H5 = typeof import('h5wasm');

async function main(header: SnapshotFileHeader): Promise<void> {
  const port = parentPort!;
  const h5: H5 = await import('h5wasm/node');
  await h5.ready;
  const file = new h5.File(header.path, 'w');
  const frames = header.steps.length;
  const n = header.particles;

  const describe = (ds: InstanceType<H5['Dataset']>, which: SnapshotDataset) => {
    ds.create_attribute('units', SNAPSHOT_FILE.datasets[which].units);
    ds.create_attribute('description', SNAPSHOT_FILE.datasets[which].description);
    return ds;
  };
  const small = (which: SnapshotDataset, data: Uint32Array | Float64Array | Uint8Array) =>
    describe(file.create_dataset({ name: SNAPSHOT_FILE.datasets[which].path, data }), which);
  // [frame, particle, xyz], one chunk per frame, sized now and filled batch by batch.
  const perFrame = (which: SnapshotDataset) => {
    const ds = file.create_dataset({ name: SNAPSHOT_FILE.datasets[which].path, data: new Float32Array(0), shape: [0, n, 3], maxshape: [frames, n, 3], chunks: [1, n, 3], dtype: '<f' });
    ds.resize([frames, n, 3]);
    return describe(ds, which);
  };

  for (const [k, v] of Object.entries(header.attrs)) {
    if (typeof v === 'number') file.create_attribute(k, v, null, Number.isInteger(v) ? '<i4' : '<d');
    else file.create_attribute(k, v);
  }
  file.create_group('particles');
  file.create_group('frames');
  if (header.identity) {
    small('id', header.identity.ids);
    small('mass', header.identity.masses);
    small('component', header.identity.component).create_attribute('labels', header.identity.labels);
  }
  small('step', header.steps);
  small('time', header.times_Myr);
  const position = perFrame('position');
  const velocity = header.velocities ? perFrame('velocity') : null;
  port.postMessage({ kind: 'ready' } satisfies FromThread);

  port.on('message', (msg: ToThread) => {
    try {
      if (msg.kind === 'close') {
        file.close();
        port.postMessage({ kind: 'closed' } satisfies FromThread);
        port.close();
        return;
      }
      const count = msg.positions.length / (3 * n);
      position.write_slice([[msg.start, msg.start + count]], msg.positions);
      if (velocity && msg.velocities) velocity.write_slice([[msg.start, msg.start + count]], msg.velocities);
      port.postMessage({ kind: 'written', end: msg.start + count } satisfies FromThread);
    } catch (e) {
      port.postMessage({ kind: 'error', message: e instanceof Error ? e.message : String(e) } satisfies FromThread);
    }
  });
}

if (parentPort) {
  main(workerData as SnapshotFileHeader).catch((e) => parentPort!.postMessage({ kind: 'error', message: e instanceof Error ? e.message : String(e) } satisfies FromThread));
}
