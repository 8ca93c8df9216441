// Plot series for a galaxy: the data with error bars, each law's fitted curve and its parts,
// residuals, and the radial acceleration relation. Pure, so it is tested without a screen.
import { colors, lawColor, palette } from '../../constants/theme';
import type { PlotMark, PlotSeries } from '../LinePlot';
import { fittedMassToLight, type FitLaw, type LawFit } from '../../shared/galaxy/fit';
import type { RotationCurve } from '../../shared/galaxy/table';
import { accelerationPoints, rarAcceleration, rarScatter, RAR_G_DAGGER_M_S2, type AccelerationPoint } from '../../shared/galaxy/rar';

/** One look per fitted law: colour from the law family, mark to tell members apart. */
export const FIT_LOOKS: Record<FitLaw, { color: string; mark: PlotMark; dashed?: boolean }> = {
  nfw: { color: lawColor('halo'), mark: 'square' },
  isothermal: { color: lawColor('newton'), mark: 'diamond' },
  'mond-simple': { color: lawColor('mond'), mark: 'triangle' },
  'mond-standard': { color: lawColor('qumond'), mark: 'triangle', dashed: true },
  'mond-rar': { color: palette.corona, mark: 'circle', dashed: true },
  emergent: { color: lawColor('emergent'), mark: 'circle' },
};

/** What each fitted model assumes, so a good or bad fit is read within its domain. */
export const FIT_VALIDITY: Record<FitLaw, string> = {
  nfw: 'Newtonian gravity with a rigid spherical NFW halo added to the baryons. A halo with two free parameters bends to most curves, so a good fit says little about the law itself.',
  isothermal: 'Newtonian gravity with a rigid, cored pseudo-isothermal halo. As flexible as the NFW fit; a core is preferred by many dwarf galaxies.',
  'mond-simple': 'Algebraic MOND on g_N = v_bar²/R in the disk plane: exact only for symmetric mass distributions, an approximation for a disk; no external field effect.',
  'mond-standard': 'As the simple form, with the standard interpolating function, which makes the transition to the deep-MOND regime sharper.',
  'mond-rar': 'As the simple form, with the interpolating function of the radial acceleration relation (g† = 1.20e-10 m/s²).',
  emergent: 'Spherical emergent gravity: valid for quasi-static, roughly spherical, isolated systems. The baryons are treated as spherical, which a thin disk is not, so this fit is an illustration.',
};

export function dataSeries(curve: RotationCurve): PlotSeries {
  return { id: 'data', label: 'observed', color: colors.text, x: curve.radiusKpc, y: curve.vObs, yError: curve.vErr, pointsOnly: true, mark: 'circle', group: 'data' };
}

/** The chosen fit's total curve and its parts (baryons scaled by the fitted mass-to-light ratios, and the law's extra). */
export function componentSeries(fit: LawFit): PlotSeries[] {
  const c = fit.curve;
  const look = FIT_LOOKS[fit.law];
  const parts: PlotSeries[] = [
    { id: 'fit-total', label: fit.label, color: look.color, x: c.radiusKpc, y: c.v, group: 'chosen fit' },
    { id: 'fit-baryons', label: 'all baryons', color: colors.textMuted, x: c.radiusKpc, y: c.vBaryons, dashed: true, group: 'chosen fit' },
  ];
  if (c.vGas) parts.push({ id: 'fit-gas', label: 'gas', color: '#9FB7FF', x: c.radiusKpc, y: c.vGas, dashed: true, mark: 'circle', group: 'chosen fit' });
  if (c.vDisk) parts.push({ id: 'fit-disk', label: 'stellar disk', color: palette.bloom, x: c.radiusKpc, y: c.vDisk, dashed: true, mark: 'square', group: 'chosen fit' });
  if (c.vBulge) parts.push({ id: 'fit-bulge', label: 'bulge', color: '#F28DC0', x: c.radiusKpc, y: c.vBulge, dashed: true, mark: 'diamond', group: 'chosen fit' });
  parts.push({ id: 'fit-extra', label: fit.law === 'nfw' || fit.law === 'isothermal' ? 'halo' : 'the law’s boost', color: look.color, x: c.radiusKpc, y: c.vExtra, dashed: true, mark: look.mark, group: 'chosen fit' });
  return parts;
}

/** Every other fit as one line each, off at first so the chosen one reads clearly. */
export function otherFitSeries(fits: LawFit[], chosen: FitLaw | null): PlotSeries[] {
  return fits
    .filter((f) => f.law !== chosen)
    .map((f) => ({ id: `fit-${f.law}`, label: f.label, color: FIT_LOOKS[f.law].color, x: f.curve.radiusKpc, y: f.curve.v, mark: FIT_LOOKS[f.law].mark, dashed: FIT_LOOKS[f.law].dashed, group: 'other fits', hidden: true }));
}

export function residualSeries(fits: LawFit[]): PlotSeries[] {
  return fits.map((f) => ({ id: `res-${f.law}`, label: f.label, color: FIT_LOOKS[f.law].color, x: f.curve.radiusKpc, y: f.curve.residuals, mark: FIT_LOOKS[f.law].mark, pointsOnly: true }));
}

export interface RarGalaxy {
  name: string;
  curve: RotationCurve;
  fit: LawFit | null;
}

export interface RarPlotData {
  series: PlotSeries[];
  points: AccelerationPoint[];
  scatter: ReturnType<typeof rarScatter>;
}

/**
 * Observed against baryonic acceleration for one galaxy or several, with the published relation
 * (McGaugh, Lelli & Schombert 2016, g† = 1.20e-10 m/s²) and the line of no missing mass.
 */
export function rarSeries(galaxies: RarGalaxy[]): RarPlotData {
  const all: AccelerationPoint[] = [];
  const marks: PlotMark[] = ['circle', 'square', 'triangle', 'diamond'];
  const palettes = [colors.text, palette.drift, palette.infall, '#C59BFF', palette.bloom, '#F28DC0'];
  const series: PlotSeries[] = galaxies.map((g, i) => {
    const pts = accelerationPoints(g.curve, fittedMassToLight(g.fit?.params ?? []));
    all.push(...pts);
    return { id: `rar-${i}`, label: g.name, color: palettes[i % palettes.length], x: pts.map((p) => p.gBar), y: pts.map((p) => p.gObs), yError: pts.map((p) => p.gObsErr), pointsOnly: true, mark: marks[i % marks.length], group: 'data' };
  });
  if (all.length) {
    const lo = Math.min(...all.map((p) => p.gBar)) / 2;
    const hi = Math.max(...all.map((p) => p.gBar)) * 2;
    const xs = Array.from({ length: 60 }, (_, k) => lo * (hi / lo) ** (k / 59));
    series.push({ id: 'rar-relation', label: `published relation (g† = ${RAR_G_DAGGER_M_S2.toExponential(2)} m/s²)`, color: palette.corona, x: xs, y: xs.map((g) => rarAcceleration(g)), group: 'relations' });
    series.push({ id: 'rar-unity', label: 'g_obs = g_bar (no missing mass)', color: colors.textFaint, x: xs, y: xs, dashed: true, group: 'relations' });
  }
  return { series, points: all, scatter: rarScatter(all) };
}
