import { fitLook } from '../../components/galaxy/series';
import { componentColor, lawColor, palette } from '../../constants/theme';
import { partLook, fitFamilies, lawModules, lawName, LIVE_HALO_PRESET, modelModules, modelName } from '../../shared/engine';

// Names and colours come from the registries: every registered law and model has its own, and a
// kind no module has (a stored run of a retired law) still reads and draws.

describe('names and colours read from the registries', () => {
  it('gives every law its own colour from its token, and grey to a kind no module has', () => {
    const colours = lawModules().map((m) => lawColor(m.kind));
    for (const c of colours) expect(c).toMatch(/^#[0-9A-F]{6}$/i);
    expect(new Set(colours).size).toBe(lawModules().length);
    expect(colours).not.toContain(palette.dust);
    expect(lawColor('retired-law')).toBe(palette.dust);
  });

  it('names laws and models as their modules do, and an unknown kind as itself', () => {
    for (const m of lawModules()) expect(lawName(m.kind)).toBe(m.shortLabel);
    for (const m of modelModules()) expect(modelName(m.kind)).toBe(m.label);
    expect(lawName('retired-law')).toBe('retired-law');
    expect(modelName('retired-model')).toBe('retired-model');
  });

  it('colours a named model part by its look, whatever its place, and a part with none by the run or the series', () => {
    const run = '#010203';
    // Every part the registered models make, a live halo switched on where a model may carry one.
    const labels = new Set(modelModules().flatMap((m) => [...m.components(m.preset), ...(m.schema.shape.halo ? m.components({ ...m.preset, halo: LIVE_HALO_PRESET }) : [])]));
    const looked = [...labels].filter((l) => partLook(l));
    expect(looked.length).toBeGreaterThan(1);
    for (const label of looked) {
      expect(componentColor(label, 0, 1, run)).not.toBe(run);
      expect(componentColor(label, 4, 6, run)).toBe(componentColor(label, 0, 2, run));
    }
    expect(new Set(looked.map((l) => componentColor(l, 0, 2, run))).size).toBe(new Set(looked.map((l) => partLook(l)!.colour)).size);
    expect(componentColor('a part with no look', 0, 1, run)).toBe(run);
    expect(componentColor('a part with no look', 1, 2, run)).not.toBe(run);
  });

  it('draws every fit family in its law\'s colour, the families of one law told apart by mark', () => {
    for (const m of lawModules()) {
      const looks = (m.fits ?? []).map((f) => fitLook(f.id));
      for (const look of looks) expect(look.color).toBe(lawColor(m.kind));
      expect(new Set(looks.map((l) => `${l.mark}${l.dashed}`)).size).toBe(looks.length);
    }
    expect(fitFamilies().every((f) => fitLook(f.id).label === f.label)).toBe(true);
    expect(fitLook('retired-fit').color).toBe(palette.dust);
  });
});
