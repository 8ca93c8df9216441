import { LinePlot } from '../../components/LinePlot';
import { formatTick, makeScale, niceDomain } from '../../components/plot/scale';
import { RotationCurvePlot } from '../../components/run/RotationCurvePlot';
import type { PlottedRun } from '../../components/run/DiagnosticsPlots';
import type { RunOutputView } from '../../components/lib/runOutput';
import { press, render } from './support/render';

describe('plot scales', () => {
  it('puts round ticks inside the domain', () => {
    expect(makeScale([0, 1], [0, 100]).ticks(5).map((t) => t.value)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(makeScale([-3, 7], [0, 100]).ticks(5).map((t) => t.value)).toEqual([-2, 0, 2, 4, 6]);
  });

  it('labels powers of ten on a log axis spanning many decades', () => {
    const ticks = makeScale([1e-8, 1e-2], [0, 100], true).ticks(5);
    expect(ticks.filter((t) => t.labelled).map((t) => t.value)).toEqual([1e-8, 1e-7, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2]);
    expect(formatTick(1e-5, [1e-8, 1e-2], true)).toBe('1e-5');
  });

  it('keeps a log axis readable over less than a decade: ticks at 1…9 × 10ⁿ, only some labelled', () => {
    const ticks = makeScale([1e-7, 1e-6], [0, 100], true).ticks(5);
    expect(ticks.map((t) => t.value)).toEqual([1e-7, 2e-7, 3e-7, 4e-7, 5e-7, 6e-7, 7e-7, 8e-7, 9e-7, 1e-6]);
    expect(ticks.filter((t) => t.labelled).map((t) => t.value)).toEqual([1e-7, 2e-7, 1e-6]);
    const twoDecades = makeScale([1e-6, 1e-4], [0, 100], true).ticks(5);
    expect(twoDecades.filter((t) => t.labelled).map((t) => t.value)).toEqual([1e-6, 1e-5, 1e-4]);
  });

  it('rounds domains outwards, but not for float noise at an end', () => {
    expect(niceDomain(0, 200.0000001, false)).toEqual([0, 200]);
    expect(niceDomain(0.3, 97, false)).toEqual([0, 100]);
    expect(niceDomain(3e-9, 2e-4, true)).toEqual([1e-9, 1e-3]);
  });

  it('maps the domain onto the range, log or linear', () => {
    const lin = makeScale([0, 10], [0, 100]);
    expect(lin(2.5)).toBeCloseTo(25);
    const log = makeScale([1, 100], [0, 100], true);
    expect(log(10)).toBeCloseTo(50);
  });
});

const linesOf = (container: HTMLElement) => [...container.querySelectorAll('path')].filter((p) => p.getAttribute('fill') === 'none');

describe('LinePlot', () => {
  const series = [
    { id: 'a', label: 'Newtonian', color: '#fff', x: [0, 50, 100], y: [1e-6, 1e-5, 1e-4] },
    { id: 'b', label: 'MOND (simple ν)', color: '#f90', x: [0, 50, 100], y: [null, 2e-5, 3e-4], dashed: true, mark: 'triangle' as const },
  ];

  it('draws one line per series, with axis titles carrying units and a legend', () => {
    const { container, view } = render(<LinePlot series={series} xLabel="time [Myr]" yLabel="|ΔE / E₀|" yLog accessibilityLabel="Energy drift" />);
    expect(view.getByText('time [Myr]')).toBeTruthy();
    expect(view.getByText('|ΔE / E₀|')).toBeTruthy();
    expect(view.getByLabelText('Newtonian, solid line')).toBeTruthy();
    expect(view.getByLabelText('MOND (simple ν), dashed line with triangle marks')).toBeTruthy();
    const lines = linesOf(container);
    expect(lines).toHaveLength(2);
    // The gap (null) starts the second line at its second point.
    expect((lines[1].getAttribute('d') ?? '').match(/M/g)).toHaveLength(1);
    // Its two points carry a triangle each, filled in the series colour.
    const marks = [...container.querySelectorAll('path')].filter((p) => p.getAttribute('fill') === '#f90');
    expect((marks.map((m) => m.getAttribute('d')).join('').match(/Z/g) ?? []).length).toBeGreaterThanOrEqual(2);
    expect(view.getByText('1e-4')).toBeTruthy();
  });

  it('switches a series off and on from its legend entry, keeping the axes', () => {
    const { container, view } = render(<LinePlot series={series} xLabel="time [Myr]" yLabel="drift" yLog accessibilityLabel="Energy drift" />);
    const entry = view.getByRole('button', { name: 'Newtonian, solid line' });
    expect(entry.getAttribute('aria-pressed')).toBe('true');
    press(entry);
    expect(entry.getAttribute('aria-pressed')).toBe('false');
    expect(linesOf(container).map((l) => l.getAttribute('stroke'))).toEqual(['#f90']);
    expect(view.getByText('1e-6')).toBeTruthy(); // the hidden series still sets the range
    press(entry);
    expect(entry.getAttribute('aria-pressed')).toBe('true');
    expect(linesOf(container)).toHaveLength(2);
  });

  it('says so when there is nothing to plot', () => {
    const { view } = render(<LinePlot series={[]} xLabel="R [kpc]" yLabel="v [km/s]" accessibilityLabel="Rotation curve" emptyText="Nothing measured yet" />);
    expect(view.getByText('Nothing measured yet')).toBeTruthy();
  });
});

describe('the rotation-curve panel', () => {
  const curve = (time_Myr: number, v: number) => ({ step: 0, time_Myr, radii_kpc: [1, 2, 3], meanAzimuthal_km_s: [v - 20, v - 10, v - 5], particleCounts: [10, 10, 10], circular_km_s: [v, v + 5, v + 8] });
  const output = (kind: string, label: string, v: number) =>
    ({
      law: { kind, label, hasPotential: kind !== 'mond' },
      rotationCurves: {
        initial: curve(0, v),
        final: curve(100, v),
        analytic: { radii_kpc: [1, 2, 3], curves: [{ law: kind, label, v_km_s: [v, v + 2, v + 3] }, { law: 'newton', label: 'Newtonian', v_km_s: [v - 30, v - 35, v - 40] }] },
      },
    }) as unknown as RunOutputView;
  const runs: PlottedRun[] = [
    { id: 'm', label: 'MOND', color: '#f90', out: output('mond', 'MOND (simple ν)', 120) },
    { id: 'e', label: 'Emergent', color: '#6cc', out: output('emergent', 'Emergent gravity', 110) },
  ];

  it('tells measured, from-forces and analytic curves apart by group, line and mark, four at first', () => {
    const { container, view } = render(<RotationCurvePlot runs={runs} />);
    for (const g of ['from the law’s field (forces)', 'measured from particles', 'analytic, initial mass model']) expect(view.getByRole('group', { name: g })).toBeTruthy();
    expect(view.getByRole('button', { name: 'MOND · √(R g), solid line with square marks' })).toBeTruthy();
    expect(view.getByRole('button', { name: 'MOND · mean v_φ, solid line with round marks' })).toBeTruthy();
    expect(view.getByRole('button', { name: 'MOND (simple ν), dashed line with triangle marks' })).toBeTruthy();
    const reference = view.getByRole('button', { name: 'Newtonian (reference), dashed line with diamond marks' });
    // Seven curves: each run's √(R g), analytic and particle curves, and one Newtonian reference.
    const entries = view.getAllByRole('button').filter((b: HTMLElement) => b.hasAttribute('aria-pressed'));
    expect(entries).toHaveLength(7);
    expect(entries.filter((e: HTMLElement) => e.getAttribute('aria-pressed') === 'true')).toHaveLength(4);
    expect(linesOf(container)).toHaveLength(4);
    expect(view.getByText('3 of 7 curves start hidden; press a legend entry to show or hide its curve.')).toBeTruthy();
    expect(reference.getAttribute('aria-pressed')).toBe('false');
    press(reference);
    expect(linesOf(container)).toHaveLength(5);
  });
});
