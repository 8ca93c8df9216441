// The run page's exports: the HDF5 button fetches the server's file and saves it under the
// run's name, or shows the server's reason; the JSON export describes what it holds.
import { SnapshotFileButton } from '../../components/run/SnapshotFileButton';
import { runJson } from '../../components/lib/exports';
import type { RunDetail } from '../../shared/api/contract';
import { mockApi } from './support/api';
import { press, render, settle } from './support/render';

const ID = '11111111-2222-4333-8444-555555555555';
const run = {
  id: ID, name: 'Wren test (invented)', status: 'finished', progress: 1, modelKind: 'plummer', lawKind: 'newton', particles: 3, steps: 20,
  costInteractions: 180, pairId: null, error: null, createdAt: '2026-12-01T10:00:00.000Z', startedAt: null, finishedAt: '2026-12-01T10:01:00.000Z',
  owner: { id: 7, login: 'teodora-vance', name: 'Teodora Vance' },
  spec: { version: 1 },
  output: { law: {}, timescales: {}, warnings: [], diagnostics: [], rotationCurves: {}, summary: {}, snapshotParticles: 3, frames: [{ frame: 0, step: 0, time_Myr: 0 }] },
} as unknown as RunDetail;

let saved: { name: string; blob: Blob }[] = [];
beforeEach(() => {
  saved = [];
  const blobs = new Map<string, Blob>();
  URL.createObjectURL = jest.fn((b: Blob) => {
    const url = `blob:${blobs.size}`;
    blobs.set(url, b);
    return url;
  });
  URL.revokeObjectURL = jest.fn();
  jest.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
    saved.push({ name: this.download, blob: blobs.get(this.href)! });
  });
});

test('the HDF5 button saves the bytes the server sends, named after the run', async () => {
  const bytes = Uint8Array.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]); // the HDF5 signature
  const calls = mockApi({ [`GET /api/runs/${ID}/snapshots.h5`]: { bytes } });
  const { view } = render(<SnapshotFileButton run={run} />);
  press(view.getByTestId('download-snapshots'));
  await settle();
  expect(calls.map((c) => `${c.method} ${c.path}`)).toEqual([`GET /api/runs/${ID}/snapshots.h5`]);
  expect(saved).toHaveLength(1);
  expect(saved[0].name).toBe('infall-wren-test-invented-snapshots.h5');
  expect(saved[0].blob.type).toBe('application/x-hdf5');
  const read = await new Promise<ArrayBuffer>((resolve) => {
    const r = new FileReader(); // jsdom's Blob has no arrayBuffer()
    r.onload = () => resolve(r.result as ArrayBuffer);
    r.readAsArrayBuffer(saved[0].blob);
  });
  expect(Array.from(new Uint8Array(read))).toEqual(Array.from(bytes));
});

test("the HDF5 button shows the server's reason when the file is refused, and saves nothing", async () => {
  mockApi({ [`GET /api/runs/${ID}/snapshots.h5`]: { status: 413, body: { error: { code: 'PAYLOAD_TOO_LARGE', message: "The snapshot file would be about 300 MiB, over this server's 160 MiB limit for one download" } } } });
  const { view } = render(<SnapshotFileButton run={run} />);
  press(view.getByTestId('download-snapshots'));
  await settle();
  expect(view.getByText(/over this server's 160 MiB limit/)).toBeTruthy();
  expect(saved).toHaveLength(0);
});

test('the JSON export says what each of its parts holds, with units', () => {
  const doc = JSON.parse(runJson(run));
  expect(doc).toMatchObject({ format: 'infall-run', format_version: 1 });
  expect(doc.units).toMatchObject({ length: 'kpc', velocity: 'km/s', mass: 'Msun', time: 'Myr', energy: 'Msun (km/s)^2' });
  const described = Object.keys(doc.contents).flatMap((k) => k.split(', '));
  const held = [...Object.keys(doc).filter((k) => !['format', 'format_version', 'contents', 'units', 'output'].includes(k)), ...Object.keys(doc.output).map((k) => `output.${k}`)];
  expect(held.filter((k) => !described.includes(k))).toEqual([]);
});

test('the JSON export carries what the velocities were balanced for and the initial Clausius ratio, and says where', () => {
  const equilibrium = { balancedFor: [{ system: 'plummer', law: 'newton', label: 'Newtonian', ownLaw: false }], ownLaw: false, initialClausiusRatio: 0.77 };
  const doc = JSON.parse(runJson({ ...run, output: { ...run.output, summary: { equilibrium } } } as unknown as RunDetail));
  expect(doc.output.summary.equilibrium).toEqual(equilibrium);
  expect(doc.contents['output.summary']).toMatch(/balancedFor.*ownLaw.*initialClausiusRatio/);
});
