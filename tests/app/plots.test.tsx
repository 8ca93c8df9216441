import { LinePlot } from '../../components/LinePlot';
import { formatTick, linearTicks, logTicks, makeScale, niceDomain } from '../../components/plot/scale';
import { render } from './support/render';

describe('plot scales', () => {
  it('puts round ticks inside the domain', () => {
    expect(linearTicks(0, 1, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(linearTicks(-3, 7, 5)).toEqual([-2, 0, 2, 4, 6]);
  });

  it('gives powers of ten on a log axis spanning many decades', () => {
    expect(logTicks(1e-8, 1e-2)).toEqual([1e-8, 1e-7, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2]);
    expect(formatTick(1e-5, [1e-8, 1e-2], true)).toBe('1e-5');
  });

  it('does not widen a domain for float noise at its end', () => {
    expect(niceDomain(0, 200.0000001, false)).toEqual([0, 200]);
  });

  it('maps the domain onto the range, log or linear', () => {
    const lin = makeScale([0, 10], [0, 100]);
    expect(lin(2.5)).toBeCloseTo(25);
    const log = makeScale([1, 100], [0, 100], true);
    expect(log(10)).toBeCloseTo(50);
  });
});

describe('LinePlot', () => {
  const series = [
    { id: 'a', label: 'Newtonian', color: '#fff', x: [0, 50, 100], y: [1e-6, 1e-5, 1e-4] },
    { id: 'b', label: 'MOND (simple nu)', color: '#f90', x: [0, 50, 100], y: [null, 2e-5, 3e-4], dashed: true },
  ];

  it('draws one line per series, with axis titles carrying units and a legend', () => {
    const { container, view } = render(<LinePlot series={series} xLabel="time [Myr]" yLabel="|ΔE / E₀|" yLog accessibilityLabel="Energy drift" />);
    expect(view.getByText('time [Myr]')).toBeTruthy();
    expect(view.getByText('|ΔE / E₀|')).toBeTruthy();
    expect(view.getByLabelText('Newtonian')).toBeTruthy();
    expect(view.getByLabelText('MOND (simple nu), dashed line')).toBeTruthy();
    const lines = [...container.querySelectorAll('path')].filter((p) => p.getAttribute('fill') === 'none');
    expect(lines).toHaveLength(2);
    // The gap (null) starts the second line at its second point.
    expect((lines[1].getAttribute('d') ?? '').match(/M/g)).toHaveLength(1);
    expect(view.getByText('1e-4')).toBeTruthy();
  });

  it('says so when there is nothing to plot', () => {
    const { view } = render(<LinePlot series={[]} xLabel="R [kpc]" yLabel="v [km/s]" accessibilityLabel="Rotation curve" emptyText="Nothing measured yet" />);
    expect(view.getByText('Nothing measured yet')).toBeTruthy();
  });
});
