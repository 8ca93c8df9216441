import fs from 'node:fs';
import path from 'node:path';
import { memberKind, specJsonSchema } from '../../components/launch/schemaForm';

// The app reads everything about a law or a model from the registries: no screen, hook or theme
// file spells out a law's or a model's kind, so a new module needs no edit outside its own file.

const repo = path.resolve(__dirname, '../..');
const APP_FOLDERS = ['app', 'components', 'hooks', 'constants'];

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

it('no app file names a law kind or a model kind', () => {
  const names = [...kinds('law'), ...kinds('model')];
  expect(names.length).toBeGreaterThan(4);
  const found: string[] = [];
  for (const file of APP_FOLDERS.flatMap((f) => sourceFiles(path.join(repo, f)))) {
    const lines = fs.readFileSync(file, 'utf8').split('\n');
    lines.forEach((line, i) => {
      for (const name of names) if (new RegExp(`(['"\`])${name}\\1`).test(line)) found.push(`${path.relative(repo, file)}:${i + 1} names '${name}'`);
    });
  }
  expect(found).toEqual([]);
});
