// Plot series for a galaxy: the data with error bars, each law's fitted curve and its parts,
// residuals, and the radial acceleration relation. Pure, so it is tested without a screen.
import { colors, lawColor, palette } from '../../constants/theme';
import { lawInfo, lawModules } from '../../shared/engine';
import type { PlotMark, PlotSeries } from '../LinePlot';
import { fittedMassToLight, type FitLaw, type LawFit } from '../../shared/galaxy/fit';
import type { RotationCurve } from '../../shared/galaxy/table';
import { accelerationPoints, rarAcceleration, rarScatter, RAR_G_DAGGER_M_S2, type AccelerationPoint } from '../../shared/galaxy/rar';

export interface FitLook {
  /** The family's name, from its law module. */
  label: string;
  color: string;
  mark: PlotMark;
  dashed?: boolean;
  /** What the fitted model assumes, so a good or bad fit is read within its domain. */
  note: string;
  /** What the fitted speed adds to the baryons'. */
  extra: string;
}

const MARKS: PlotMark[] = ['square', 'diamond', 'triangle', 'circle'];

/** Each fit family's look, read from the law module that declares it: the law's colour, a mark (and dashes after the first) per family of that law. */
const LOOKS = new Map<string, FitLook>(
  lawModules().flatMap((m) =>
    (m.fits ?? []).map((f, k): [string, FitLook] => [
      f.id,
      {
        label: f.label,
        color: lawColor(m.kind),
        mark: MARKS[k % MARKS.length],
        dashed: k > 0,
        extra: f.extra === 'boost' ? 'the law’s boost' : 'dark halo',
        note:
          f.extra === 'boost'
            ? `${lawInfo(m.schema.parse(m.preset)).validity} Fitted here to the baryons' curve in the disk plane.`
            : 'Newtonian gravity with a rigid halo added to the baryons. A halo with free parameters bends to most curves, so a good fit says little about the law itself.',
      },
    ]),
  ),
);

/** The look of a fit family by its stored id; a family no law declares any more reads as its id, in grey. */
export const fitLook = (id: string): FitLook => LOOKS.get(id) ?? { label: id, color: palette.dust, mark: 'circle', note: '', extra: 'beyond the baryons' };

export function dataSeries(curve: RotationCurve): PlotSeries {
  return { id: 'data', label: 'observed', color: colors.text, x: curve.radiusKpc, y: curve.vObs, yError: curve.vErr, pointsOnly: true, mark: 'circle', group: 'data' };
}

/** The chosen fit's total curve and its parts (baryons scaled by the fitted mass-to-light ratios, and the law's extra). */
export function componentSeries(fit: LawFit): PlotSeries[] {
  const c = fit.curve;
  const look = fitLook(fit.law);
  const parts: PlotSeries[] = [
    { id: 'fit-total', label: fit.label, color: look.color, x: c.radiusKpc, y: c.v, group: 'chosen fit' },
    { id: 'fit-baryons', label: 'all baryons', color: colors.textMuted, x: c.radiusKpc, y: c.vBaryons, dashed: true, group: 'chosen fit' },
  ];
  if (c.vGas) parts.push({ id: 'fit-gas', label: 'gas', color: '#9FB7FF', x: c.radiusKpc, y: c.vGas, dashed: true, mark: 'circle', group: 'chosen fit' });
  if (c.vDisk) parts.push({ id: 'fit-disk', label: 'stellar disk', color: palette.bloom, x: c.radiusKpc, y: c.vDisk, dashed: true, mark: 'square', group: 'chosen fit' });
  if (c.vBulge) parts.push({ id: 'fit-bulge', label: 'bulge', color: '#F28DC0', x: c.radiusKpc, y: c.vBulge, dashed: true, mark: 'diamond', group: 'chosen fit' });
  parts.push({ id: 'fit-extra', label: look.extra, color: look.color, x: c.radiusKpc, y: c.vExtra, dashed: true, mark: look.mark, group: 'chosen fit' });
  return parts;
}

/** Every other fit as one line each, off at first so the chosen one reads clearly. */
export function otherFitSeries(fits: LawFit[], chosen: FitLaw | null): PlotSeries[] {
  return fits
    .filter((f) => f.law !== chosen)
    .map((f) => ({ id: `fit-${f.law}`, label: f.label, color: fitLook(f.law).color, x: f.curve.radiusKpc, y: f.curve.v, mark: fitLook(f.law).mark, dashed: fitLook(f.law).dashed, group: 'other fits', hidden: true }));
}

export function residualSeries(fits: LawFit[]): PlotSeries[] {
  return fits.map((f) => ({ id: `res-${f.law}`, label: f.label, color: fitLook(f.law).color, x: f.curve.radiusKpc, y: f.curve.residuals, mark: fitLook(f.law).mark, pointsOnly: true }));
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
