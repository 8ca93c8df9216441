import { useState } from 'react';
import { colors, seriesColors } from '../../constants/theme';
import { ChoiceChips } from '../fields';
import { formatValue } from '../format';
import { LinePlot, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import { Txt } from '../Txt';
import type { PlottedRun } from './DiagnosticsPlots';
import { useGalaxy } from '../../hooks/galaxies';
import { isReferenceLaw, lawModule } from '../../shared/engine';

type When = 'now' | 'initial' | 'final';

const GROUPS = { observed: 'observed galaxy (±1σ)', forces: 'from the law’s field (forces)', measured: 'measured from particles', analytic: 'analytic, initial mass model' };
const MAX_SHOWN = 4;

/** The law module's words when its analytic curve only approximates its field ("algebraic form"); none for a kind no module has. */
function approximation(kind: string): string | undefined {
  try {
    return lawModule(kind).approximateCurve;
  } catch {
    return undefined;
  }
}

const isReference = (kind: string) => {
  try {
    return isReferenceLaw(kind);
  } catch {
    return false;
  }
};

/** The curve at the snapshot on screen, per run id: circular speed from the law's field. */
export type FrameCurves = Record<string, { time_Myr: number; radii_kpc: number[]; circular_km_s: number[] } | null>;

/**
 * Rotation curves over the analytic ones: at the snapshot on screen (circular speed from the
 * law's field of the stored particles), or as measured at the start or end of each run (also
 * the particles' mean azimuthal speed).
 */
export function RotationCurvePlot({ runs, atFrame }: { runs: PlottedRun[]; atFrame?: FrameCurves }) {
  const frameReady = Boolean(atFrame && runs.every((r) => atFrame[r.id]));
  // Until someone picks, follow the snapshot on screen when that can be measured.
  const [choice, setChoice] = useState<When | null>(null);
  const picked = choice ?? (frameReady ? 'now' : 'final');
  const when: When = picked === 'now' && !frameReady ? 'final' : picked;
  const single = runs.length === 1;
  // A run built from a galaxy shows that galaxy's observed curve, when the viewer may see the galaxy.
  const galaxy = useGalaxy(runs.find((r) => r.galaxyId)?.galaxyId ?? 0).data;
  const observed: PlotSeries[] = galaxy
    ? [{ id: 'observed', label: 'observed', color: colors.text, x: galaxy.curve.radiusKpc, y: galaxy.curve.vObs, yError: galaxy.curve.vErr, pointsOnly: true, mark: 'circle', group: GROUPS.observed }]
    : [];
  // Each kind of curve has its own group, line and mark, so they are told apart without colour.
  const forces: PlotSeries[] = [];
  const analytic: PlotSeries[] = [];
  const measured: PlotSeries[] = [];
  let reference: PlotSeries | null = null;
  let t = 0;
  for (const r of runs) {
    const tag = single ? '' : `${r.label} · `;
    if (when === 'now') {
      const c = atFrame![r.id]!;
      t = c.time_Myr;
      forces.push({ id: `${r.id}-now`, label: `${tag}√(R g) at this snapshot`, color: r.color, x: c.radii_kpc, y: c.circular_km_s, mark: 'square', group: GROUPS.forces });
    } else {
      const m = r.out.rotationCurves[when];
      t = m.time_Myr;
      forces.push({ id: `${r.id}-vc`, label: `${tag}√(R g)`, color: r.color, x: m.radii_kpc, y: m.circular_km_s, mark: 'square', group: GROUPS.forces });
      // Each bin at its particles' mass-weighted radius (runs stored before that existed: the bin centre).
      measured.push({ id: `${r.id}-vphi`, label: `${tag}mean v_φ`, color: r.color, x: m.meanRadius_kpc ?? m.radii_kpc, y: m.meanAzimuthal_km_s, mark: 'circle', group: GROUPS.measured });
      (m.byComponent ?? []).forEach((part, k) =>
        measured.push({ id: `${r.id}-vphi-${part.label}`, label: `${tag}mean v_φ, ${part.label}`, color: single ? seriesColors[(k + 2) % seriesColors.length] : r.color, x: part.meanRadius_kpc, y: part.meanAzimuthal_km_s, mark: 'circle', dashed: !single, group: GROUPS.measured }),
      );
    }
    const a = r.out.rotationCurves.analytic;
    for (const c of a.curves) {
      const curve = { x: a.radii_kpc, y: c.v_km_s, dashed: true, group: GROUPS.analytic };
      if (c.law === r.out.law.kind) {
        // A law with no closed-form curve previews an approximation of its field, so the gap to the
        // curve from forces is the law's own effect (largest for disks), shown rather than hidden.
        const approx = approximation(c.law);
        const label = approx ? `${approx} (preview of ${c.label})` : c.label;
        analytic.push({ ...curve, id: `${r.id}-a-${c.law}`, label, color: r.color, mark: 'triangle' });
        const fromForces = when === 'now' ? null : r.out.rotationCurves[when];
        if (approx && fromForces && fromForces.radii_kpc.length === a.radii_kpc.length && fromForces.radii_kpc.every((R, k) => Math.abs(R - a.radii_kpc[k]) <= 1e-9 * R)) {
          analytic.push({ id: `${r.id}-approximation-gap`, label: `${tag}field form − ${approx}`, color: colors.textMuted, x: a.radii_kpc, y: a.radii_kpc.map((_, k) => fromForces.circular_km_s[k] - c.v_km_s[k]), group: GROUPS.analytic, mark: 'diamond' });
        }
      } else if (isReference(c.law) && !reference && !runs.some((o) => isReference(o.out.law.kind))) reference = { ...curve, id: 'analytic-reference', label: `${c.label} (reference)`, color: colors.textFaint, mark: 'diamond' };
    }
  }
  // At most four curves show at first: the observed galaxy and the laws' own before the particles' and the reference.
  const byPriority = [...observed, ...forces, ...analytic, ...measured, ...(reference ? [reference] : [])];
  const series: PlotSeries[] = byPriority.map((s, k) => ({ ...s, hidden: k >= MAX_SHOWN }));
  const choices = [
    ...(frameReady ? [{ value: 'now' as const, label: 'this snapshot' }] : []),
    { value: 'initial' as const, label: 'start' },
    { value: 'final' as const, label: 'end' },
  ];
  const note =
    when === 'now'
      ? `At t = ${formatValue(t)} Myr, from the law's field of the stored particles.`
      : `Measured about the density centre at t = ${formatValue(t)} Myr, from particles within one bin width of its plane (all, and each component on its own); analytic curves are the initial mass model under each law.`;
  const hiddenCount = series.filter((s) => s.hidden).length;
  const source = galaxy ? ` Observed points: ${galaxy.name}, with 1σ error bars.` : '';
  return (
    <Panel title="Rotation curve" note={note + source} right={<ChoiceChips compact value={when} onChange={setChoice} choices={choices} />}>
      {hiddenCount ? <Txt variant="caption">{`${hiddenCount} of ${series.length} curves start hidden; press a legend entry to show or hide its curve.`}</Txt> : null}
      <LinePlot series={series} xLabel="radius R [kpc]" yLabel="speed [km/s]" yFromZero accessibilityLabel={`Rotation curves ${when === 'now' ? `at t = ${formatValue(t)} Myr` : `at the ${when === 'initial' ? 'start' : 'end'} of the run`}`} testID="plot-rotation" />
    </Panel>
  );
}
