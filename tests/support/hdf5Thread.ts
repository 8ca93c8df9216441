// Reads a whole HDF5 file with h5wasm in a worker thread (h5wasm is ESM-only, Jest's module
// system is not) and posts back every attribute and dataset.
import { parentPort, workerData } from 'node:worker_threads';

async function main(path: string) {
  const h5 = await import('h5wasm/node');
  await h5.ready;
  const file = new h5.File(path, 'r');
  const attrsOf = (e: { attrs: Record<string, { value: unknown }> }) => Object.fromEntries(Object.entries(e.attrs).map(([k, a]) => [k, a.value]));
  const datasets: Record<string, unknown> = {};
  const groups: string[] = [];
  const walk = (g: InstanceType<typeof h5.Group>, prefix: string) => {
    for (const key of g.keys()) {
      const e = g.get(key);
      const name = `${prefix}${key}`;
      if (e instanceof h5.Dataset) datasets[name] = { shape: e.shape, dtype: e.dtype, value: e.value, attrs: attrsOf(e) };
      else if (e instanceof h5.Group) {
        groups.push(name);
        walk(e, `${name}/`);
      }
    }
  };
  walk(file, '');
  const dump = { attrs: attrsOf(file), groups, datasets };
  file.close();
  return dump;
}

main(workerData as string).then(
  (dump) => parentPort!.postMessage({ dump }),
  (e) => parentPort!.postMessage({ error: String(e) }),
);
