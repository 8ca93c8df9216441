import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { Worker } from 'node:worker_threads';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { RunOutput, RunSnapshot, type Run } from '../db/entities';
import { SNAPSHOT_FILE } from '../../shared/api/snapshots';
import { G } from '../../shared/engine/units';
import { storedParts } from './runs';
import type { FromThread, SnapshotFileHeader, ToThread } from './snapshotFileThread';

// A run's stored snapshots as one HDF5 file (layout in shared/api/snapshots.ts and README
// "Exports"). Frames are read from the database a batch at a time and written to a temporary
// file by a worker thread, so memory stays bounded whatever the run's size.

const BATCH_BYTES = 8 * 2 ** 20; // frames per database read and thread message, by bytes
const MAX_AT_ONCE = 2; // files being written at the same time, per server process
const FILE_OVERHEAD_BYTES = 64 * 1024; // HDF5 headers, attributes and the spec, generously

const LEGACY_NOTE =
  'This run was stored before Infall kept velocities, particle ids, masses and components with its snapshots: ' +
  'the file holds positions, steps and times only. Clone the run to compute everything again.';

let writing = 0;

export interface SnapshotFile {
  path: string;
  filename: string;
  bytes: number;
  /** Deletes the temporary file; call once the response is done. */
  remove(): void;
}

const bytesAs = <T extends Float32Array | Float64Array | Uint32Array>(Ctor: { new (b: ArrayBuffer): T }, b: Uint8Array): T => {
  const copy = new Uint8Array(b.byteLength);
  copy.set(b); // a Buffer slice may not sit on the alignment the typed array needs
  return new Ctor(copy.buffer);
};

export const snapshotFileName = (run: Run) =>
  `infall-${run.name.replace(/[^a-z0-9]+/gi, '-').replace(/^-|-$/g, '').toLowerCase().slice(0, 80) || run.id}-snapshots.h5`;

/** What the file will hold, or a clear refusal: no snapshots yet, or larger than the cap. */
export async function planSnapshotFile(em: EntityManager, run: Run, maxBytes: number) {
  const output = await em.findOne(RunOutput, { run: run.id });
  if (!output) {
    const why = run.status === 'queued' || run.status === 'running' ? `it is ${run.status}; export it when it has ended` : `it ${run.status} before storing any`;
    throw new ApiError('CONFLICT', `This run has no stored snapshots: ${why}`);
  }
  const frames = await em.find(RunSnapshot, { run: run.id }, { fields: ['frame', 'step', 'timeMyr'], orderBy: { frame: 'asc' }, disableIdentityMap: true });
  const withVelocities = await em.count(RunSnapshot, { run: run.id, velocities: { $ne: null } });
  const n = output.snapshotParticles;
  const velocities = frames.length > 0 && withVelocities === frames.length;
  const bytes = frames.length * n * (velocities ? 24 : 12) + frames.length * 12 + n * 13 + FILE_OVERHEAD_BYTES;
  if (bytes > maxBytes) {
    throw new ApiError('PAYLOAD_TOO_LARGE', `The snapshot file would be about ${Math.ceil(bytes / 2 ** 20)} MiB, over this server's ${Math.floor(maxBytes / 2 ** 20)} MiB limit for one download`);
  }
  return { output, frames, particles: n, velocities, bytes };
}

function headerFor(run: Run, plan: Awaited<ReturnType<typeof planSnapshotFile>>, file: string): SnapshotFileHeader {
  const { output, frames, particles, velocities } = plan;
  const parts = storedParts(output);
  const identity: SnapshotFileHeader['identity'] = parts && output.masses ? { ...parts, masses: bytesAs(Float64Array, output.masses as Uint8Array) } : null;
  const complete = velocities && identity !== null;
  return {
    path: file,
    attrs: {
      format: SNAPSHOT_FILE.format,
      format_version: SNAPSHOT_FILE.version,
      run_id: run.id,
      run_name: run.name,
      run_status: run.status,
      model: run.modelKind,
      law: run.lawKind,
      spec: JSON.stringify(run.spec),
      engine_version: output.engineVersion ?? 'not recorded',
      created_at: run.createdAt.toISOString(),
      finished_at: run.finishedAt ? run.finishedAt.toISOString() : '',
      exported_at: new Date().toISOString(),
      particles_in_run: run.particles,
      particles_in_file: particles,
      frames: frames.length,
      velocities_stored: velocities ? 1 : 0,
      length_units: 'kpc',
      velocity_units: 'km/s',
      mass_units: 'Msun',
      time_units: 'Myr',
      G_kpc_km2_s2_Msun: G,
      ...(complete ? {} : { note: LEGACY_NOTE }),
    },
    particles,
    steps: Uint32Array.from(frames, (f) => f.step),
    times_Myr: Float64Array.from(frames, (f) => f.timeMyr),
    velocities,
    identity,
  };
}

/** Talks to one writer thread: each request waits for its answer, so only a batch is in flight. */
function startThread(header: SnapshotFileHeader) {
  // A .ts entry file needs tsx's require hook in the thread, wherever the server was started from.
  const entry = path.join(__dirname, 'snapshotFileThread.ts');
  const worker = new Worker(`require(${JSON.stringify(require.resolve('tsx/cjs'))}); require(${JSON.stringify(entry)});`, { eval: true, workerData: header });
  let waiting: { resolve: (m: FromThread) => void; reject: (e: Error) => void } | null = null;
  let failure: Error | null = null;
  const fail = (e: Error) => {
    failure ??= e;
    waiting?.reject(failure);
    waiting = null;
  };
  worker.on('message', (m: FromThread) => {
    if (m.kind === 'error') return fail(new Error(`writing the snapshot file failed: ${m.message}`));
    waiting?.resolve(m);
    waiting = null;
  });
  worker.on('error', fail);
  worker.on('exit', () => fail(new Error('the snapshot file writer stopped early')));
  const next = () =>
    new Promise<FromThread>((resolve, reject) => {
      if (failure) return reject(failure);
      waiting = { resolve, reject };
    });
  return {
    ready: next(),
    send(msg: ToThread, transfer: ArrayBuffer[] = []) {
      const answer = next();
      worker.postMessage(msg, transfer);
      return answer;
    },
    stop: () => worker.terminate(),
  };
}

/**
 * Writes the run's snapshots to a temporary HDF5 file. At most MAX_AT_ONCE files are written
 * at a time; more get 503 and a message to try again.
 */
export async function writeSnapshotFile(em: EntityManager, run: Run, maxBytes: number): Promise<SnapshotFile> {
  const plan = await planSnapshotFile(em, run, maxBytes);
  if (writing >= MAX_AT_ONCE) throw new ApiError('UNAVAILABLE', 'The server is writing other snapshot files right now; try again in a minute');
  writing += 1;
  const file = path.join(os.tmpdir(), `infall-export-${randomUUID()}.h5`);
  const remove = () => fs.rm(file, { force: true }, () => undefined);
  const thread = startThread(headerFor(run, plan, file));
  try {
    await thread.ready;
    const n = plan.particles;
    const batch = Math.max(1, Math.floor(BATCH_BYTES / Math.max(1, n * 24)));
    for (let start = 0; start < plan.frames.length; start += batch) {
      const rows = await em.find(
        RunSnapshot,
        { run: run.id, frame: { $gte: start, $lt: start + batch } },
        { orderBy: { frame: 'asc' }, disableIdentityMap: true },
      );
      if (rows.length !== Math.min(batch, plan.frames.length - start)) throw new ApiError('CONFLICT', 'The run\'s snapshots changed while the file was being written; try again');
      const positions = new Float32Array(rows.length * n * 3);
      const velocities = plan.velocities ? new Float32Array(rows.length * n * 3) : null;
      rows.forEach((r, k) => {
        positions.set(bytesAs(Float32Array, r.positions as Uint8Array), k * n * 3);
        if (velocities) velocities.set(bytesAs(Float32Array, r.velocities as Uint8Array), k * n * 3);
      });
      await thread.send({ kind: 'frames', start, positions, velocities }, velocities ? [positions.buffer, velocities.buffer] : [positions.buffer]);
    }
    await thread.send({ kind: 'close' });
    return { path: file, filename: snapshotFileName(run), bytes: fs.statSync(file).size, remove };
  } catch (e) {
    remove();
    throw e;
  } finally {
    writing -= 1;
    await thread.stop();
  }
}
