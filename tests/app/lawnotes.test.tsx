import { LawNotes } from '../../components/run/LawNotes';
import { lawInfo } from '../../shared/engine';
import { render } from './support/render';

test('the algebraic MOND notes say plainly that momentum, energy and centre drift mean nothing there, and point N-body runs to the field form', () => {
  const info = lawInfo({ kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 });
  const { view } = render(<LawNotes info={info} />);
  expect(view.getByText('Meaningful in these runs')).toBeTruthy();
  expect(view.getByText('Not meaningful in these runs')).toBeTruthy();
  expect(view.getByText(/^Total momentum, energy, and the drift of the centre of mass/)).toBeTruthy();
  expect(view.getByText(/Rotation curves/)).toBeTruthy();
  expect(view.getByText(/For N-body runs use the field form/)).toBeTruthy();
});

test('a law without artefacts of its form shows no such block', () => {
  const { view } = render(<LawNotes info={lawInfo({ kind: 'newton' })} />);
  expect(view.queryByText('Not meaningful in these runs')).toBeNull();
});

test('the emergent notes say how the apparent dark mass is balanced', () => {
  const { view } = render(<LawNotes info={lawInfo({ kind: 'emergent', H0_km_s_Mpc: 70 })} />);
  expect(view.getByText(/density centre/)).toBeTruthy();
  expect(view.getByText(/net pull.* is removed by subtracting the same acceleration/)).toBeTruthy();
});
