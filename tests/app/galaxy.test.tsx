// The import screen and the galaxy page, rendered to the DOM with a scripted API: the picked
// table is read and previewed with the shared parser, errors name line and column, the
// upload carries the mapping; the page plots data, fits, residuals and the RAR.
import { TextDecoder as NodeTextDecoder } from 'node:util';
import { GalaxyImport } from '../../components/galaxy/GalaxyImport';
import { GalaxyView } from '../../components/galaxy/GalaxyView';
import { ModelEditor } from '../../components/launch/ModelEditor';
import { fitGalaxy } from '../../shared/galaxy/fit';
import { inventedCurve } from '../../shared/galaxy/invented';
import { accelFromSI } from '../../shared/engine/units';
import { mockApi } from './support/api';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';

// Browsers have TextDecoder (the table parser decodes with it); this jsdom does not.
(globalThis as { TextDecoder?: unknown }).TextDecoder ??= NodeTextDecoder;

jest.mock('expo-router', () => require('./support/expoRouter'));

let mockNextFile: File | null = null;
jest.mock('expo-document-picker', () => ({
  getDocumentAsync: jest.fn(async () => (mockNextFile ? { canceled: false, assets: [{ name: mockNextFile.name, size: mockNextFile.size, uri: 'blob:x', lastModified: 0, file: mockNextFile }] } : { canceled: true, assets: null })),
}));

const me = { id: 3, login: 'odile-brack', name: 'Odile Brack' };
const limits = { maxUploadBytes: 4096, maxUploadRows: 100 };

beforeEach(() => resetNavigation());

function importApi() {
  return mockApi({
    'GET /api/galaxies': { body: { galaxies: [], limits } },
    'GET /api/cohorts': { body: { cohorts: [] } },
    'POST /api/galaxies': { status: 201, body: { id: 42 } },
  });
}

test('a picked table is previewed, its columns mapped, and uploaded with the mapping', async () => {
  const calls = importApi();
  mockNextFile = new File(['# invented\nspeed,radius,err\n30,0.5,3\n50,1.0,2.5\n62,2.0,2\n'], 'dwarf.csv', { type: 'text/csv' });
  const { view } = render(<GalaxyImport />);
  await settle();
  press(view.getByTestId('galaxy-pick'));
  await settle();
  expect(view.getByTestId('galaxy-file').textContent).toMatch(/dwarf\.csv · \d+ bytes/);
  // The header names the columns, so "auto" already reads them right.
  expect(view.getByTestId('galaxy-preview-summary').textContent).toMatch(/^3 points from 0\.5 to 2 kpc; components: none\./);
  expect(view.getByTestId('galaxy-preview')).toBeTruthy();
  // Mapping the radius onto the error column is read the same way the server would, and refused.
  const radiusGroup = view.getByRole('radiogroup', { name: 'Radius' });
  press(radiusGroup.querySelector('[aria-label="err"]')!);
  expect(view.getByTestId('galaxy-table-error').textContent).toBe('line 4, column 3: radius 2.5 is smaller than the previous row; rows must be sorted by increasing radius');
  press(radiusGroup.querySelector('[aria-label="auto"]')!);
  expect(view.queryByTestId('galaxy-table-error')).toBeNull();
  expect((view.getByTestId('galaxy-name') as HTMLInputElement).value).toBe('dwarf');
  press(view.getByTestId('galaxy-upload'));
  await settle();
  const post = calls.find((c) => c.method === 'POST' && c.path === '/api/galaxies')!;
  const form = post.body as FormData;
  expect(form.get('name')).toBe('dwarf');
  expect(JSON.parse(String(form.get('mapping')))).toEqual({ columns: {}, radiusUnit: 'kpc' });
  expect(form.get('visibility')).toBe('private');
  expect((form.get('file') as File).name).toBe('dwarf.csv');
  expect(navigation.replaced).toEqual([{ pathname: '/galaxies/[id]', params: { id: '42' } }]);
});

test('a malformed table shows the parser’s error with line and column, and cannot be uploaded', async () => {
  const calls = importApi();
  mockNextFile = new File(['R,V,dV\n0.5,30,3\n1.0,=CMD(),2\n'], 'bad.csv');
  const { view } = render(<GalaxyImport />);
  await settle();
  press(view.getByTestId('galaxy-pick'));
  await settle();
  expect(view.getByTestId('galaxy-table-error').textContent).toMatch(/line 3, column 2: .*formula/);
  expect(view.getByTestId('galaxy-upload').getAttribute('aria-disabled')).toBe('true');
  press(view.getByTestId('galaxy-upload'));
  await settle();
  expect(calls.some((c) => c.method === 'POST')).toBe(false);
});

test('a file over the upload limit is refused before it is read', async () => {
  importApi();
  mockNextFile = new File(['1,2,3\n'.repeat(1000)], 'big.csv');
  const { view } = render(<GalaxyImport />);
  await settle();
  press(view.getByTestId('galaxy-pick'));
  await settle();
  expect(view.getByText(/the file is 6.?000 bytes; your upload limit is 4.?096/)).toBeTruthy();
  expect(view.queryByTestId('galaxy-file')).toBeNull();
});

test('the galaxy page plots the data, the fits with their parts, residuals and the RAR, and says what the models are', async () => {
  const curve = inventedCurve(
    { disk: { mass_Msun: 2e10, scale_kpc: 2 }, gas: { mass_Msun: 5e9, scale_kpc: 4 } },
    Array.from({ length: 12 }, (_, i) => 0.8 * (i + 1)),
    (R, c) => {
      const gN = (c.vGas ** 2 + 0.5 * c.vDisk ** 2) / R;
      return Math.sqrt(R * gN * (0.5 + Math.sqrt(0.25 + accelFromSI(1.2e-10) / gN)));
    },
    (_R, v) => 0.04 * v + 2,
    3,
  );
  const results = fitGalaxy(curve, { laws: ['mond-simple', 'nfw'] });
  const detail = {
    id: 5, name: 'Invented spiral B', owner: me, visibility: 'public', cohort: null, invented: true, points: 12, fileName: 'b.csv', fileBytes: 400,
    uploadedAt: new Date().toISOString(), canManage: false, mapping: { columns: {}, radiusUnit: 'kpc' }, curve,
    fits: [{ id: 9, request: { laws: ['mond-simple', 'nfw'], a0: 'fixed', H0: 'fixed' }, results, requestedBy: me, createdAt: new Date().toISOString() }],
  };
  const calls = mockApi({ 'GET /api/galaxies/5': { body: detail }, 'GET /api/cohorts': { body: { cohorts: [] } }, 'POST /api/galaxies/5/fits': { status: 201, body: detail.fits[0] } });
  const { view } = render(<GalaxyView id={5} />);
  await settle();
  expect(view.getByText(/An invented galaxy/)).toBeTruthy();
  expect(view.getByText(/^Numerical models\./)).toBeTruthy();
  // Data with error bars, the preferred fit and its parts in the legend.
  const plot = view.getByTestId('galaxy-curve');
  expect(plot.querySelectorAll('path').length).toBeGreaterThan(5);
  expect(view.getByLabelText('observed, points with round marks with error bars')).toBeTruthy();
  expect(view.getByTestId('legend-fit-disk')).toBeTruthy();
  expect(view.getByTestId('legend-fit-gas')).toBeTruthy();
  expect(view.getByTestId('galaxy-residuals')).toBeTruthy();
  expect(view.getByTestId('legend-rar-relation').textContent).toMatch(/g† = 1\.20e-10 m\/s²/);
  expect(view.getByTestId('rar-scatter').textContent).toMatch(/^Scatter about the relation: [\d.]+ dex rms, mean offset -?[\d.]+ dex, over 12 points\.$/);
  const preferred = results.laws.find((l) => l.law === results.verdict.preferred)!;
  expect(view.getByTestId('fit-table').textContent).toContain(`Preferred by BIC (lower is better): ${preferred.label}`);
  expect(view.getAllByText(/Fitted here to the baryons' curve in the disk plane\.$/).length).toBeGreaterThan(0);
  // Sharing and deleting are for the owner only.
  expect(view.queryByText('Sharing')).toBeNull();
  press(view.getByTestId('fit-run'));
  await settle();
  const post = calls.find((c) => c.method === 'POST')!;
  expect(post.body).toEqual({ laws: ['nfw', 'isothermal', 'mond-simple', 'mond-standard', 'mond-rar', 'emergent'], a0: 'fixed', H0: 'fixed' });
});

test('the new-run form takes its particle table from a file sent through the upload path', async () => {
  const particles = [{ x_kpc: 1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 50, vz_km_s: 0, mass_Msun: 1e9 }];
  let refuse = false;
  const calls = mockApi({
    'POST /api/particle-tables': () =>
      refuse ? { status: 400, body: { error: { code: 'BAD_REQUEST', message: 'file: line 2, column 7: "4e" is not a number', field: 'file' } } } : { body: { fileName: 'pair.csv', particles } },
  });
  const set = jest.fn();
  const draft = { model: { kind: 'table', particles: [], recentre: true }, law: { kind: 'newton' } };
  mockNextFile = new File(['1 0 0 0 50 0 1e9\n'], 'pair.csv');
  const { view } = render(<ModelEditor draft={draft as never} set={set} issues={{}} pairLaw={null} />);
  press(view.getByTestId('field-model.particles'));
  await settle();
  expect(((calls[0].body as FormData).get('file') as File).name).toBe('pair.csv');
  expect(set).toHaveBeenCalledWith(['model', 'particles'], particles);
  refuse = true;
  press(view.getByTestId('field-model.particles'));
  await settle();
  expect(view.getByRole('alert').textContent).toBe('file: line 2, column 7: "4e" is not a number');
});
