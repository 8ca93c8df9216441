import path from 'node:path';
import { Worker } from 'node:worker_threads';

export interface H5Dataset {
  shape: number[];
  dtype: string;
  value: unknown;
  attrs: Record<string, unknown>;
}
export interface H5Dump {
  attrs: Record<string, unknown>;
  groups: string[];
  datasets: Record<string, H5Dataset>;
}

/** Every attribute and dataset of an HDF5 file, read by h5wasm's reader. */
export function readHdf5(file: string): Promise<H5Dump> {
  return new Promise((resolve, reject) => {
    const entry = path.join(__dirname, 'hdf5Thread.ts');
    const w = new Worker(`require(${JSON.stringify(require.resolve('tsx/cjs'))}); require(${JSON.stringify(entry)});`, { eval: true, workerData: file });
    w.once('message', (m: { dump?: H5Dump; error?: string }) => (m.dump ? resolve(m.dump) : reject(new Error(m.error))));
    w.once('error', reject);
    w.once('exit', () => reject(new Error('the HDF5 reader thread stopped')));
  });
}
