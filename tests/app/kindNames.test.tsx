import fs from 'node:fs';
import path from 'node:path';
import { memberKind, specJsonSchema } from '../../components/launch/schemaForm';

// Everything about a law or a model is read from the registries: no screen, hook, theme, route,
// service, worker or shared file outside the law and model folders spells out a law's or a
// model's kind, so a new module needs no edit outside its own file and its list line. The demo
// seed names the invented runs it makes.

const repo = path.resolve(__dirname, '../..');
const FOLDERS = ['app', 'components', 'hooks', 'constants', 'server', 'worker', 'shared'];
const ALLOWED = [
  /^shared\/engine\/laws\//,
  /^shared\/engine\/models\//,
  /^server\/db\/seed/,
  // A pair kernel's own loops, keyed by its kernel's name (DEVELOPERS.md, "Adding a pair kernel").
  /^shared\/engine\/solvers\/fast\//,
];
// Words that are the same strings but not kinds: a column alias and the mass-to-light priors of a
// rotation-curve table, a request field of the galaxy-run API.
const NOT_KINDS: [RegExp, string][] = [
  [/^shared\/galaxy\/(table|fit)\.ts$/, 'disk'],
  [/^server\/services\/galaxies\.ts$/, 'halo'],
];

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? sourceFiles(p) : /\.tsx?$/.test(e.name) ? [p] : [];
  });
}

const kinds = (key: string) => {
  const node = specJsonSchema().properties![key];
  return (node.oneOf ?? node.anyOf ?? []).map((m) => String(memberKind(m)));
};

it('no file outside the law and model folders names a law kind or a model kind', () => {
  const names = [...kinds('law'), ...kinds('model')];
  expect(names.length).toBeGreaterThan(4);
  const found: string[] = [];
  for (const file of FOLDERS.flatMap((f) => sourceFiles(path.join(repo, f)))) {
    const rel = path.relative(repo, file);
    if (ALLOWED.some((a) => a.test(rel))) continue;
    const lines = fs.readFileSync(file, 'utf8').split('\n');
    lines.forEach((line, i) => {
      for (const name of names) {
        if (NOT_KINDS.some(([f, word]) => f.test(rel) && word === name)) continue;
        if (new RegExp(`(['"\`])${name}\\1`).test(line)) found.push(`${rel}:${i + 1} names '${name}'`);
      }
    });
  }
  expect(found).toEqual([]);
});
