// The sample fit from the galaxy list and the sample page, rendered to the DOM with a scripted
// API: ticked galaxies are sent as one request and the page opened; the page shows per law the
// shared parameter with its 1 sigma, the summed chi^2 and the BIC from a real joint fit.
import { GalaxiesView } from '../../components/galaxy/GalaxiesView';
import { SampleView } from '../../components/galaxy/SampleView';
import { fitSample } from '../../shared/galaxy/fit';
import { formatValue } from '../../components/format';
import { inventedCurve } from '../../shared/galaxy/invented';
import { accelFromSI } from '../../shared/engine/units';
import type { GalaxySampleRecord, GalaxySummary } from '../../shared/api/galaxies';
import { mockApi } from './support/api';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

const me = { id: 3, login: 'odile-brack', name: 'Odile Brack' };
beforeEach(() => resetNavigation());

const summary = (id: number, name: string): GalaxySummary => ({ id, name, owner: me, visibility: 'private', cohort: null, invented: true, points: 12, fileName: 'c.csv', fileBytes: 100, uploadedAt: new Date().toISOString(), canManage: true });

test('ticked galaxies are fitted as one sample and its page opened', async () => {
  const calls = mockApi({
    'GET /api/galaxies': { body: { galaxies: [summary(5, 'Invented A'), summary(6, 'Invented B'), summary(7, 'Invented C')], limits: { maxUploadBytes: 1, maxUploadRows: 1 } } },
    'GET /api/galaxies/5': { status: 404, body: { error: { code: 'NOT_FOUND', message: 'x' } } },
    'GET /api/galaxies/7': { status: 404, body: { error: { code: 'NOT_FOUND', message: 'x' } } },
    'POST /api/galaxy-samples': { status: 201, body: { id: 31 } },
    'GET /api/galaxy-samples': { body: { samples: [{ id: 30, galaxies: [{ id: 5, name: 'Invented A (made up)' }, { id: 6, name: 'Invented B' }], laws: ['nfw', 'mond-simple'], createdAt: new Date().toISOString() }] } },
  });
  const { view } = render(<GalaxiesView />);
  await settle();
  // Earlier sample fits are listed with their galaxies and laws.
  expect(view.getByText(/^Invented A, Invented B · Newtonian \+ NFW halo, MOND \(simple ν\) · /)).toBeTruthy();
  press(view.getByRole('checkbox', { name: 'Add Invented A to the acceleration relation' }));
  await settle();
  expect(view.getByText('Tick at least two galaxies.')).toBeTruthy();
  press(view.getByRole('checkbox', { name: 'Add Invented C to the acceleration relation' }));
  await settle();
  press(view.getByTestId('sample-fit'));
  await settle();
  const post = calls.find((c) => c.method === 'POST' && c.path === '/api/galaxy-samples')!;
  expect(post.body).toEqual({ galaxyIds: [5, 7], laws: ['nfw', 'mond-simple', 'mond-standard', 'mond-rar', 'emergent'], a0: 'free', H0: 'free' });
  expect(navigation.pushed).toEqual([{ pathname: '/galaxies/samples/[id]', params: { id: '31' } }]);
});

test('the sample page shows the shared a0 ± 1σ, the summed χ² and the BIC of each law', async () => {
  const a0 = accelFromSI(1.2e-10);
  const mond = (R: number, c: { vGas: number; vDisk: number }) => {
    const gN = (c.vGas ** 2 + 0.5 * c.vDisk ** 2) / R;
    return Math.sqrt(R * gN * (0.5 + Math.sqrt(0.25 + a0 / gN)));
  };
  const galaxies = [1, 2].map((k) => ({
    name: `Invented ${k}`,
    curve: inventedCurve({ disk: { mass_Msun: k * 2e10, scale_kpc: 2 }, gas: { mass_Msun: 5e9, scale_kpc: 4 } }, Array.from({ length: 12 }, (_, i) => 0.8 * (i + 1)), mond, (_R, v) => 0.04 * v + 2, 40 + k),
  }));
  const results = fitSample(galaxies, { laws: ['mond-simple', 'isothermal'], a0: 'free' });
  const record: GalaxySampleRecord = { id: 31, request: { galaxyIds: [5, 7], laws: ['mond-simple', 'isothermal'], a0: 'free', H0: 'fixed' }, galaxies: [{ id: 5, name: 'Invented 1' }, { id: 7, name: 'Invented 2' }], results, requestedBy: me, createdAt: new Date().toISOString() };
  mockApi({ 'GET /api/galaxy-samples/31': { body: record } });
  const { view } = render(<SampleView id={31} />);
  await settle();
  const mondFit = results.laws.find((l) => l.law === 'mond-simple')!;
  const row = view.getByTestId('sample-law-mond-simple');
  expect(row.textContent).toMatch(/shared a0 = [0-9.e+-]+ ± [0-9.e+-]+ m\/s\^2/);
  expect(row.querySelector(`[aria-label^="summed chi squared"]`)!.getAttribute('aria-label')).toContain(`over ${mondFit.points} points`);
  expect(row.querySelector(`[aria-label^="summed chi squared"]`)!.getAttribute('aria-label')).toContain(`BIC ${formatValue(mondFit.bic)}`);
  // The cored halo has no shared parameter, and says so.
  expect(view.getByTestId('sample-law-isothermal').textContent).toMatch(/No shared parameter/);
  expect(view.getByTestId('sample-results').textContent).toMatch(/Preferred by the sample's BIC/);
  expect(view.getByText('Invented 2 (#7)')).toBeTruthy();
});
