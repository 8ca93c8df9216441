// The code's shape, read from its imports: every package it imports is declared, routers are
// mounted in one place, and the worker's database writes live in the worker.
import fs from 'node:fs';
import path from 'node:path';
import { builtinModules } from 'node:module';
import ts from 'typescript';

const root = path.resolve(__dirname, '../..');
const SKIP = new Set(['node_modules', '.git', 'dist', '.data', '.test-data', '.expo']);

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(path.join(root, dir), { withFileTypes: true }).flatMap((e) => {
    const rel = path.join(dir, e.name);
    if (e.isDirectory()) return SKIP.has(e.name) ? [] : sourceFiles(rel);
    return /\.[cm]?[jt]sx?$/.test(e.name) && !e.name.endsWith('.d.ts') ? [rel] : [];
  });
}

/** What a file imports (static, dynamic, require, type-only), as written. */
const importsOf = (file: string): string[] =>
  ts.preProcessFile(fs.readFileSync(path.join(root, file), 'utf8'), true, true).importedFiles.map((f) => f.fileName);

/** A relative import resolved to a repository path without its extension. */
const resolved = (file: string, spec: string) => path.join(path.dirname(file), spec).replace(/\.[cm]?[jt]sx?$/, '');

const files = sourceFiles('.');
const underServer = files.filter((f) => f.startsWith('server/'));

test('every package the code imports is declared in package.json', () => {
  const pkg = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as { dependencies: object; devDependencies: object };
  const declared = new Set([...Object.keys(pkg.dependencies), ...Object.keys(pkg.devDependencies)]);
  const undeclared = files.flatMap((file) =>
    importsOf(file)
      .filter((spec) => !spec.startsWith('.') && !spec.startsWith('node:') && !spec.includes('${'))
      .map((spec) => spec.split('/').slice(0, spec.startsWith('@') ? 2 : 1).join('/'))
      .filter((name) => !builtinModules.includes(name) && !declared.has(name))
      .map((name) => `${file}: ${name}`),
  );
  expect(undeclared).toEqual([]);
});

/** The routers a file imports: names ending in "Router" taken from server/routes/. */
function routersImportedBy(file: string): string[] {
  const source = ts.createSourceFile(file, fs.readFileSync(path.join(root, file), 'utf8'), ts.ScriptTarget.ES2022);
  return source.statements.flatMap((st) => {
    if (!ts.isImportDeclaration(st) || !ts.isStringLiteral(st.moduleSpecifier)) return [];
    const from = st.moduleSpecifier.text;
    const bindings = st.importClause?.namedBindings;
    if (!from.startsWith('.') || !resolved(file, from).startsWith('server/routes/') || !bindings || !ts.isNamedImports(bindings)) return [];
    return bindings.elements.map((e) => e.name.text).filter((name) => name.endsWith('Router'));
  });
}

test('routers are mounted by server/app.ts alone; the auth module brings only its own', () => {
  const elsewhere = underServer.filter((f) => f !== 'server/app.ts').flatMap((f) => routersImportedBy(f).map((r) => `${f}: ${r}`));
  expect(elsewhere).toEqual(['server/auth/index.ts: authRouter']);
  // app.ts mounts every other router the routes folder makes.
  const made = underServer.filter((f) => f.startsWith('server/routes/')).flatMap((f) => [...fs.readFileSync(path.join(root, f), 'utf8').matchAll(/export function (\w+Router)\(/g)].map((m) => m[1]));
  expect(new Set(routersImportedBy('server/app.ts'))).toEqual(new Set(made.filter((r) => r !== 'authRouter')));
});

test('server code never imports the worker, and each service module is used by the server', () => {
  const serverImports = underServer.flatMap((file) => importsOf(file).filter((s) => s.startsWith('.')).map((s) => ({ file, target: resolved(file, s) })));
  expect(serverImports.filter(({ target }) => target.startsWith('worker/')).map(({ file }) => file)).toEqual([]);
  const services = underServer.filter((f) => f.startsWith('server/services/')).map((f) => f.replace(/\.ts$/, ''));
  const usedByServer = new Set(serverImports.filter(({ file, target }) => file.replace(/\.ts$/, '') !== target).map(({ target }) => target));
  expect(services.filter((s) => !usedByServer.has(s))).toEqual([]);
});
