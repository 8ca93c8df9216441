import { within } from '@testing-library/dom';
import { balancedPaths, withEquilibriumLaw } from '../../components/launch/draft';
import { LawEditor } from '../../components/launch/LawEditor';
import { ModelEditor } from '../../components/launch/ModelEditor';
import { fieldKind, memberKind, nodeAt, numberBounds, specJsonSchema, startValue, titleOf, type JsonNode } from '../../components/launch/schemaForm';
import { defaultRunSpec, runSpecSchema, type LawSpec } from '../../shared/spec';
import { render } from './support/render';

// The launch form knows the spec only through its JSON Schema: these checks walk every law and
// model the schema holds, so a new module is covered the day it is registered.

const root = specJsonSchema();
const members = (key: 'law' | 'model') => root.properties![key].oneOf ?? root.properties![key].anyOf ?? [];
const lawMembers = members('law');
const modelMembers = members('model');
const kindOf = (m: JsonNode) => String(memberKind(m));

/** A spec built around the default one, with the given model and law. */
const specWith = (parts: { model?: unknown; law?: unknown }) => ({ ...defaultRunSpec(), ...parts });

/** Every optional object or tuple of a member, as paths below it. */
function optionalParts(node: JsonNode): string[] {
  return Object.entries(node.properties ?? {})
    .filter(([key, child]) => !(node.required ?? []).includes(key) && (fieldKind(child) === 'object' || fieldKind(child) === 'tuple'))
    .map(([key]) => key);
}

describe('the JSON Schema the launch form is drawn from', () => {
  it('holds every law and model as a member named by its kind', () => {
    expect(lawMembers.length).toBeGreaterThanOrEqual(2);
    expect(modelMembers.length).toBeGreaterThanOrEqual(2);
    for (const m of [...lawMembers, ...modelMembers]) expect(typeof memberKind(m)).toBe('string');
  });

  it('resolves a path through a union by the value\'s kind, and a tuple by index', () => {
    const withDisk = modelMembers.find((m) => Object.values(m.properties ?? {}).some((c) => fieldKind(c) === 'union'));
    expect(withDisk).toBeDefined(); // a model made of systems (an encounter)
    const [unionKey] = Object.entries(withDisk!.properties!).find(([, c]) => fieldKind(c) === 'union')!;
    const systems = (withDisk!.properties![unionKey].oneOf ?? withDisk!.properties![unionKey].anyOf)!;
    for (const system of systems) {
      const value = { model: { kind: kindOf(withDisk!), [unionKey]: { kind: kindOf(system) } } };
      for (const [key, child] of Object.entries(system.properties!)) {
        if (key === 'kind') continue;
        expect(nodeAt(['model', unionKey, key], value)?.node).toEqual(child);
      }
    }
    const withTuple = lawMembers.find((m) => Object.values(m.properties ?? {}).some((c) => fieldKind(c) === 'tuple'));
    if (withTuple) {
      const [key, tuple] = Object.entries(withTuple.properties!).find(([, c]) => fieldKind(c) === 'tuple')!;
      expect(nodeAt(['law', key, 1], { law: { kind: kindOf(withTuple) } })?.node).toEqual(tuple.prefixItems![1]);
    }
    expect(nodeAt(['law', 'nothing-here'], { law: { kind: kindOf(lawMembers[0]) } })).toBeNull();
  });

  it('reads bounds as the schema states them: an exclusive minimum, an integer, no maximum for the safe-integer limit', () => {
    const n = nodeAt(['snapshotEvery'], defaultRunSpec())!.node;
    expect(numberBounds(n)).toMatchObject({ min: 1, exclusiveMin: false, integer: true, max: undefined });
    const dt = nodeAt(['timestep_Myr'], defaultRunSpec())!.node;
    expect(numberBounds(dt)).toMatchObject({ min: 0, exclusiveMin: true, integer: false });
    expect(runSpecSchema.safeParse({ ...defaultRunSpec(), timestep_Myr: 0 }).success).toBe(false);
  });

  it('starts every law, and every optional part of every law and model, from a value the schema accepts', () => {
    for (const law of lawMembers) {
      const value = startValue(law) as Record<string, unknown>;
      expect(runSpecSchema.safeParse(specWith({ law: value })).success).toBe(true);
      for (const part of optionalParts(law)) {
        const parsed = runSpecSchema.safeParse(specWith({ law: { ...value, [part]: startValue(law.properties![part]) } }));
        expect({ law: kindOf(law), part, ok: parsed.success }).toEqual({ law: kindOf(law), part, ok: true });
      }
    }
    let modelParts = 0;
    for (const model of modelMembers) {
      const value = startValue(model) as Record<string, unknown>;
      for (const part of optionalParts(model)) {
        // Each optional part on its own, added to a model the schema accepts.
        const base = specWith({ model: value });
        if (!runSpecSchema.safeParse(base).success) continue; // a model whose start needs a preset (rows from a file)
        const parsed = runSpecSchema.safeParse(specWith({ model: { ...value, [part]: startValue(model.properties![part]) } }));
        expect({ model: kindOf(model), part, ok: parsed.success }).toEqual({ model: kindOf(model), part, ok: true });
        modelParts++;
      }
    }
    expect(modelParts).toBeGreaterThan(0);
  });

  it('finds the systems whose velocities a law balances, and pins or frees them all', () => {
    for (const model of modelMembers) {
      const value = startValue(model) as Record<string, unknown>;
      const systems = balancedPaths(value);
      const direct = Boolean(model.properties!.equilibriumLaw);
      if (direct) expect(systems).toEqual([[]]);
      const law = startValue(lawMembers[0]) as LawSpec;
      const pinned = withEquilibriumLaw(value, law);
      for (const p of systems) expect(p.reduce<any>((o, k) => o[k], pinned).equilibriumLaw).toEqual(law);
      const freed = withEquilibriumLaw(pinned, undefined);
      expect(JSON.stringify(freed)).not.toContain('equilibriumLaw');
    }
    expect(modelMembers.some((m) => balancedPaths(startValue(m)).length > 1)).toBe(true); // an encounter's two systems
    expect(modelMembers.some((m) => balancedPaths(startValue(m)).length === 0)).toBe(true); // particles that bring their velocities
  });
});

describe('the law and model editors', () => {
  const field = (container: HTMLElement, key: string) => container.querySelector(`[data-testid="field-${key}"]`);

  it('draw every registered law from its schema: a field per number, chips per enum, a switch per optional part', () => {
    for (const member of lawMembers) {
      const law = startValue(member) as LawSpec;
      const { container, unmount } = render(<LawEditor label="Law" law={law} onChange={() => {}} issues={{}} issuePrefix="law." testID="law" />);
      const view = within(container);
      for (const [key, child] of Object.entries(member.properties!)) {
        if (key === 'kind') continue;
        const kind = fieldKind(child);
        if (kind === 'number') expect({ law: law.kind, key, drawn: Boolean(field(container, `law.${key}`)) }).toEqual({ law: law.kind, key, drawn: true });
        if (kind === 'choice') expect(view.getByRole('radiogroup', { name: titleOf(key, child) })).toBeTruthy();
        if (kind === 'tuple') expect(view.getByRole('switch', { name: titleOf(key, child) })).toBeTruthy();
      }
      unmount();
    }
  });

  it('draw every registered model from its schema, systems of a union included', () => {
    for (const member of modelMembers) {
      const model = startValue(member) as Record<string, unknown>;
      const draft = specWith({ model }) as unknown as Record<string, unknown>;
      const { container, unmount } = render(<ModelEditor draft={draft} set={() => {}} issues={{}} pairLaw={null} />);
      const view = within(container);
      for (const [key, child] of Object.entries(member.properties!)) {
        if (key === 'kind' || key === 'equilibriumLaw') continue;
        const kind = fieldKind(child);
        const optional = !(member.required ?? []).includes(key);
        if (kind === 'number') expect({ model: model.kind, key, drawn: Boolean(field(container, `model.${key}`)) }).toEqual({ model: model.kind, key, drawn: true });
        if ((kind === 'object' || kind === 'tuple') && optional) expect(view.getByRole('switch', { name: titleOf(key, child) })).toBeTruthy();
        if (kind === 'union') {
          expect(view.getByRole('radiogroup', { name: titleOf(key, child) })).toBeTruthy();
          const system = nodeAt(['model', key], draft)!.node;
          const chosen = (system.oneOf ?? system.anyOf)!.find((m) => memberKind(m) === (model[key] as { kind: string }).kind)!;
          for (const [inner, c] of Object.entries(chosen.properties!)) if (fieldKind(c) === 'number') expect(field(container, `model.${key}.${inner}`)).not.toBeNull();
        }
      }
      unmount();
    }
  });
});
