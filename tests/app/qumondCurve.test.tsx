import { RotationCurvePlot } from '../../components/run/RotationCurvePlot';
import type { PlottedRun } from '../../components/run/DiagnosticsPlots';
import { render } from './support/render';

// A disk run under the field form of MOND: its curve from forces against the algebraic preview.
const radii = [1, 2, 3, 4];
const measured = { time_Myr: 0, radii_kpc: radii, circular_km_s: [90, 150, 180, 195], meanAzimuthal_km_s: [80, 140, 175, 190] };
const run = {
  id: 'q',
  label: 'disk',
  color: '#E07B3A',
  out: {
    law: { kind: 'qumond' },
    rotationCurves: {
      initial: measured,
      final: measured,
      analytic: {
        radii_kpc: radii,
        curves: [
          { law: 'qumond', label: 'QUMOND (simple ν)', v_km_s: [100, 160, 185, 196] },
          { law: 'newton', label: 'Newtonian', v_km_s: [95, 140, 150, 150] },
        ],
      },
    },
  },
} as unknown as PlottedRun;

describe('rotation curve of a field-form MOND run', () => {
  it('labels the preview as the algebraic form and draws the gap between the two forms', () => {
    const { view } = render(<RotationCurvePlot runs={[run]} />);
    expect(view.getByLabelText(/^algebraic form \(preview of QUMOND \(simple ν\)\), dashed line/)).toBeTruthy();
    expect(view.getByLabelText(/^field form − algebraic form, /)).toBeTruthy();
  });
});
