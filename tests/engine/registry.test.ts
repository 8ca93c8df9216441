import { z } from 'zod';
import {
  buildInitialConditions, defaultPairLaw, galaxyPairLaw, LAW_COLOUR_TOKENS, lawModules, lawPreset, lawSchema, modelComponents, modelModules,
  modelPreset, PART_COLOUR_TOKENS, partLook, precheck, referenceLaw, usesPotentialVirial,
} from '../../shared/engine';
import { parseRunSpec, runSpecSchema, type RunSpec } from '../../shared/spec';

// The registries are the product's one source for what it says about a law or a model:
// these checks keep every module complete, so forms, tables and plots generated from them
// have nothing to fill in by hand.

type Node = { title?: string; optionLabels?: Record<string, string>; enum?: unknown[]; properties?: Record<string, Node>; oneOf?: Node[]; anyOf?: Node[]; items?: Node; $ref?: string };

/** Every object property below `node` (through unions, arrays and $defs), with its path. */
function properties(node: Node, defs: Record<string, Node>, path: string, out: [string, Node][], seen = new Set<string>()): [string, Node][] {
  if (node.$ref) {
    const name = node.$ref.replace('#/$defs/', '');
    if (seen.has(name)) return out;
    return properties(defs[name], defs, path, out, new Set([...seen, name]));
  }
  for (const [key, child] of Object.entries(node.properties ?? {})) {
    out.push([`${path}.${key}`, child]);
    properties(child, defs, `${path}.${key}`, out, seen);
  }
  for (const alt of [...(node.oneOf ?? []), ...(node.anyOf ?? [])]) properties(alt, defs, path, out, seen);
  if (node.items) properties(node.items, defs, `${path}[]`, out, seen);
  return out;
}

const titleOf = (node: Node, defs: Record<string, Node>): string | undefined =>
  node.title ?? (node.$ref ? defs[node.$ref.replace('#/$defs/', '')]?.title : undefined) ?? [...(node.anyOf ?? []), ...(node.oneOf ?? [])].map((n) => titleOf(n, defs)).find(Boolean);

describe('field titles travel through the public JSON Schema conversion', () => {
  const json = z.toJSONSchema(runSpecSchema, { io: 'input', unrepresentable: 'any' }) as Node & { $defs?: Record<string, Node> };
  const defs = json.$defs ?? {};
  const props = properties(json, defs, 'spec', []);

  test('every field of every law and model (and of the spec) has a title, except the kind tags and the version', () => {
    const untitled = props.filter(([path, node]) => !/\.(kind|version)$/.test(path) && !titleOf(node, defs)).map(([path]) => path);
    expect(props.length).toBeGreaterThan(60);
    expect([...new Set(untitled)]).toEqual([]);
  });

  test('every enum field labels each of its options', () => {
    const enums = props.filter(([, node]) => Array.isArray(node.enum) && node.enum.length > 1);
    expect(enums.length).toBeGreaterThan(3);
    for (const [path, node] of enums) {
      expect([path, Object.keys(node.optionLabels ?? {}).sort()]).toEqual([path, node.enum!.map(String).sort()]);
    }
  });
});

describe('law modules', () => {
  test('each preset parses under its own schema, and each law takes a colour token of its own', () => {
    for (const m of lawModules()) expect(lawSchema.safeParse(lawPreset(m.kind)).success).toBe(true);
    const colours = lawModules().map((m) => m.colour);
    expect(new Set(colours).size).toBe(colours.length);
    for (const c of colours) expect(LAW_COLOUR_TOKENS).toContain(c);
  });

  test('roles: one reference law, which alone is judged by 2K/|W|; pairs default to a law other than the first', () => {
    const reference = referenceLaw();
    expect(lawModules().filter((m) => m.reference).map((m) => m.kind)).toEqual([reference.kind]);
    expect(lawModules().filter((m) => usesPotentialVirial(m.kind)).map((m) => m.kind)).toEqual([reference.kind]);
    for (const m of lawModules()) expect(defaultPairLaw(m.kind).kind).not.toBe(m.kind);
    expect(lawSchema.safeParse(galaxyPairLaw()).success).toBe(true);
  });
});

function specFor(model: unknown): RunSpec {
  const parsed = parseRunSpec({ version: 2, model, law: referenceLaw(), timestep_Myr: 0.5, duration_Myr: 1, softening_kpc: 0.1, snapshotEvery: 1 });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return parsed.spec;
}

describe('model modules', () => {
  test.each(modelModules().map((m) => [m.kind]))('%s: the preset is a valid model whose particles are the parts and count the module declares', (kind) => {
    const spec = specFor(modelPreset(kind));
    const m = modelModules().find((x) => x.kind === kind)!;
    const ic = buildInitialConditions(spec);
    expect(ic.components.map((c) => c.label)).toEqual(modelComponents(spec.model));
    expect(ic.particles.n).toBe(m.particleCount(spec.model));
    expect(ic.components.reduce((n, c) => n + c.count, 0)).toBe(ic.particles.n);
  });
});

test('named parts of the galaxy models have a look of their own, the live halo drawn beneath the disk and bulge', () => {
  const galaxy = specFor({ ...modelPreset('disk'), bulge: { mass_Msun: 1e10, scale_kpc: 0.5 }, halo: { profile: 'nfw', n: 100, mass_Msun: 1e11, scale_kpc: 10 } });
  const looks = modelComponents(galaxy.model).map((label) => partLook(label));
  for (const look of looks) expect(PART_COLOUR_TOKENS).toContain(look?.colour);
  const [disk, bulge, halo] = looks;
  expect(halo!.layer).toBeLessThan(Math.min(disk!.layer, bulge!.layer));
});

describe('law notes read the model\'s traits, not its kind', () => {
  const codes = (model: unknown, law: unknown) => {
    const parsed = parseRunSpec({ version: 2, model, law, timestep_Myr: 0.5, duration_Myr: 1, softening_kpc: 0.1, snapshotEvery: 1 });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
    return precheck(parsed.spec).warnings.map((w) => w.code);
  };
  const sphere = { ...modelPreset('plummer'), n: 200 };
  const encounter = { ...modelPreset('encounter'), primary: { ...sphere }, secondary: { ...sphere } };
  const disk = { ...modelPreset('disk'), n: 300 };

  test('a static halo warns that it sits at the origin only when two systems move through it', () => {
    expect(codes(encounter, lawPreset('halo'))).toContain('halo-fixed-at-origin');
    expect(codes(sphere, lawPreset('halo'))).not.toContain('halo-fixed-at-origin');
  });

  test('the field form of MOND warns that an encounter\'s systems are balanced on grids of their own unless box_kpc is set; a disk and a sphere are balanced on the run\'s grid', () => {
    const qumond = { ...lawPreset('qumond'), grid: 32 };
    expect(codes(encounter, qumond)).toContain('systems-balanced-on-own-grid');
    expect(codes(encounter, { ...qumond, box_kpc: 200 })).not.toContain('systems-balanced-on-own-grid');
    expect(codes(disk, qumond)).not.toContain('systems-balanced-on-own-grid');
    expect(codes(sphere, qumond)).not.toContain('systems-balanced-on-own-grid');
  });
});
