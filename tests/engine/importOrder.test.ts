import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';

// The law and model modules import each other through the registries (a disk samples with
// a law; a law's notes read a model's traits), so there are import cycles. A module that
// reads a cycle partner's value while it initialises breaks only for some entry points
// (a worker, a browser bundle). Each file is loaded here first, in a fresh module cache;
// tsx turns such a read into a "before initialization" error.
const root = join(__dirname, '../..');
const dirs = ['shared/engine/laws', 'shared/engine/models', 'shared/spec', 'shared/galaxy'];
const files = dirs.flatMap((d) => readdirSync(join(root, d)).filter((f) => f.endsWith('.ts')).map((f) => join(root, d, f)));

const script = `
const failures = [];
for (const file of JSON.parse(process.argv[1])) {
  for (const k of Object.keys(require.cache)) delete require.cache[k];
  try { require(file); } catch (e) { failures.push(file + ': ' + e.message); }
}
process.stdout.write(JSON.stringify(failures));
`;

test('every law, model, spec and galaxy module initialises when it is the first one loaded', () => {
  expect(files.length).toBeGreaterThan(30);
  const r = spawnSync(process.execPath, ['--import', 'tsx', '-e', script, JSON.stringify(files)], { cwd: root, encoding: 'utf8' });
  expect(r.stderr).toBe('');
  expect(JSON.parse(r.stdout)).toEqual([]);
}, 60_000);
