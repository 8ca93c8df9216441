// The galaxy page starts a pair of runs from its newest Newtonian fit: the request names that fit
// and the halo with the lower BIC, and the comparison of the pair opens; a galaxy fitted only
// under laws without a halo offers no such button.
import { GalaxyView } from '../../components/galaxy/GalaxyView';
import { fitGalaxy, type FitLaw } from '../../shared/galaxy/fit';
import { inventedCurve } from '../../shared/galaxy/invented';
import { mockApi } from './support/api';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

const me = { id: 3, login: 'odile-brack', name: 'Odile Brack' };
beforeEach(() => resetNavigation());

const curve = inventedCurve(
  { disk: { mass_Msun: 3e10, scale_kpc: 2.5 } },
  Array.from({ length: 14 }, (_, i) => 0.9 * (i + 1)),
  (R, c) => Math.sqrt(0.5 * c.vDisk ** 2 + (110 ** 2 * R) / (R + 3)),
  (_R, v) => 0.04 * v + 2,
  4,
);

function detail(laws: FitLaw[]) {
  const results = fitGalaxy(curve, { laws });
  return {
    id: 5, name: 'Invented spiral C', owner: me, visibility: 'public', cohort: null, invented: true, points: 14, fileName: 'c.csv', fileBytes: 400,
    uploadedAt: new Date().toISOString(), canManage: false, mapping: { columns: {}, radiusUnit: 'kpc' }, curve,
    fits: [{ id: 17, request: { laws, a0: 'fixed', H0: 'fixed' }, results, requestedBy: me, createdAt: new Date().toISOString() }],
  };
}

test('a pair starts from the better halo fit and its comparison opens', async () => {
  const d = detail(['nfw', 'isothermal', 'mond-simple']);
  const halos = d.fits[0].results.laws.filter((l) => l.law === 'nfw' || l.law === 'isothermal');
  const better = halos.reduce((a, b) => (b.bic < a.bic ? b : a)).law;
  const calls = mockApi({
    'GET /api/galaxies/5': { body: d },
    'POST /api/galaxies/5/runs': { status: 201, body: { runs: [{ id: 'a', pairId: 'p-1' }, { id: 'b', pairId: 'p-1' }] } },
  });
  const { view } = render(<GalaxyView id={5} />);
  await settle();
  press(view.getByTestId('galaxy-run-pair'));
  await settle();
  expect(calls.find((c) => c.method === 'POST')!.body).toEqual({ fitId: 17, halo: better });
  expect(navigation.pushed).toEqual([{ pathname: '/compare', params: { pair: 'p-1' } }]);
});

test('no halo fit, no pair button', async () => {
  mockApi({ 'GET /api/galaxies/5': { body: detail(['mond-simple']) } });
  const { view } = render(<GalaxyView id={5} />);
  await settle();
  expect(view.getByTestId('fit-table')).toBeTruthy();
  expect(view.queryByTestId('galaxy-run-pair')).toBeNull();
});
