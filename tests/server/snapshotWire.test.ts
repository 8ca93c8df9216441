// The binary frame format of GET /api/runs/:id/snapshots?format=2 (shared/api/snapshots.ts):
// positions travel as 16-bit steps of each frame's box (the bulk's, escapers travel exactly), so
// the decoded error is bounded and must stay below one pixel of the widest screen the view is drawn on.
import { decodeSnapshots, encodeSnapshots, frameBox, quantisationError, QUANTUM_STEPS, type SnapshotFrame } from '../../shared/api/snapshots';
import { buildInitialConditions } from '../../shared/engine';
import { frameWindow } from '../../components/particles';
import { spec } from '../bench/specs';
import { syntheticSnapshots } from '../e2e/support/syntheticRun';

/** Per axis: the largest decoded error inside the frame's box, the box's extent, and whether every particle outside it came back exactly. */
function errors(sent: SnapshotFrame, got: SnapshotFrame) {
  const boxes = [0, 1, 2].map((a) => frameBox(sent.positions, a));
  const inside = (i: number) => boxes.every(({ min, max }, a) => sent.positions[3 * i + a] >= min && sent.positions[3 * i + a] <= max);
  const n = sent.positions.length / 3;
  let farExact = true;
  let far = 0;
  const worst = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) {
      const e = Math.abs(got.positions[3 * i + a] - sent.positions[3 * i + a]);
      if (inside(i)) worst[a] = Math.max(worst[a], e);
      else farExact &&= e === 0;
    }
    if (!inside(i)) far++;
  }
  return { far, farExact, axes: boxes.map(({ min, max }, a) => ({ worst: worst[a], extent: max - min, edge: Math.max(Math.abs(min), Math.abs(max)) })) };
}

describe('snapshot wire format 2', () => {
  test('round-trips steps, times and components, each coordinate in the box within half a 16-bit step, the rest exactly', () => {
    const set = syntheticSnapshots(3000, 8);
    // An escaper far out in the last frame travels as float32 and leaves the box to the bulk.
    set.frames[7].positions[0] = 480;
    const got = decodeSnapshots(encodeSnapshots(set));
    expect(got.labels).toEqual(['disk', 'bulge', 'halo']);
    expect(Array.from(got.component)).toEqual(Array.from(set.component));
    expect(got.frames.map((f) => [f.step, f.time_Myr])).toEqual(set.frames.map((f) => [f.step, f.time_Myr]));
    set.frames.forEach((f, k) => {
      const e = errors(f, got.frames[k]);
      expect(e.farExact).toBe(true);
      for (const { worst, extent, edge } of e.axes) {
        // Half a step of (max - min) / 65535, plus float32 rounding of the decoded value (2^-24 relative).
        expect(worst).toBeLessThanOrEqual(quantisationError(extent) + edge * 2 ** -23);
        expect(worst).toBeGreaterThan(0); // it is quantised: a test of exact copies would pass anything
      }
    });
    expect(got.frames[7].positions[0]).toBe(480);
    expect(errors(set.frames[7], got.frames[7]).far).toBeGreaterThanOrEqual(1);
  });

  test('escapers do not coarsen the bulk: with 1% of particles thousands of kpc out, the error stays below a 4k pixel', () => {
    const set = syntheticSnapshots(20_000, 1);
    const f = set.frames[0];
    for (let i = 0; i < 200; i++) f.positions.set([(i % 2 ? 1 : -1) * (1000 + 25 * i), 3000 - 20 * i, 40 * i - 4000], 3 * (i * 97));
    const got = decodeSnapshots(encodeSnapshots(set)).frames[0];
    const e = errors(f, got);
    expect(e.farExact).toBe(true);
    expect(e.far).toBeGreaterThanOrEqual(200);
    expect(e.far).toBeLessThan(400); // the box holds the bulk: escapers and a thin tail only
    const pixel = (2 * frameWindow([f], 'xy').half) / 3840;
    for (const { worst, extent } of e.axes) {
      expect(extent).toBeLessThan(200); // the full extent is 8,000 kpc
      expect(quantisationError(extent)).toBeLessThan(pixel);
      expect(worst).toBeLessThan(pixel);
    }
  });

  test('a 2,000-particle disk run of 11 frames takes at most 8 bytes a particle a frame', () => {
    const set = syntheticSnapshots(2000, 11);
    const bytes = encodeSnapshots(set).byteLength;
    // 6 bytes of positions, the 64-byte frame header and the per-particle component byte spread over the frames.
    expect(bytes / (2000 * 11)).toBeLessThanOrEqual(8);
    expect(bytes / (2000 * 11)).toBeGreaterThan(6);
  });

  test('the error stays below one pixel of a 3840-pixel-wide view of an engine-built disk and bulge', () => {
    const ic = buildInitialConditions(
      spec({ name: 'wire check', model: { kind: 'disk', n: 5000, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } }, law: { kind: 'newton' }, solver: { kind: 'direct' }, timestep_Myr: 0.5, duration_Myr: 1, softening_kpc: 0.1, snapshotEvery: 1, seed: 3 }),
    );
    const { x, y, z, n } = ic.particles;
    const positions = new Float32Array(3 * n);
    for (let i = 0; i < n; i++) positions.set([x[i], y[i], z[i]], 3 * i);
    const frame = { step: 0, time_Myr: 0, positions };
    const component = new Uint8Array(n);
    ic.components.forEach((c, k) => component.fill(k, c.start, c.start + c.count));
    const got = decodeSnapshots(encodeSnapshots({ frames: [frame], labels: ic.components.map((c) => c.label), component }));
    expect(got.labels).toEqual(['disk', 'bulge']);
    const e = errors(frame, got.frames[0]);
    expect(e.farExact).toBe(true);
    for (const projection of ['xy', 'xz'] as const) {
      // The app's view: its window across 3840 pixels (a 4k screen's full width, the most it could get).
      const pixel = (2 * frameWindow([frame], projection).half) / 3840;
      for (const { worst, extent } of e.axes) {
        expect(quantisationError(extent)).toBeLessThan(pixel);
        expect(worst).toBeLessThan(pixel);
      }
    }
    expect(QUANTUM_STEPS).toBe(65535);
  });

  test('data of another format version, a wrong length or a non-finite coordinate gives a clear error', () => {
    const bytes = encodeSnapshots(syntheticSnapshots(10, 2));
    const v1 = bytes.slice();
    v1[3] = 0x31; // "IFS1", the float32 layout this format replaced
    expect(() => decodeSnapshots(v1)).toThrow('snapshot data is in wire format 1; this app reads format 2 (reload the page for the current app)');
    const foreign = bytes.slice();
    foreign[0] = 0x50;
    expect(() => decodeSnapshots(foreign)).toThrow('not Infall snapshot data (bad magic)');
    expect(() => decodeSnapshots(bytes.slice(0, bytes.length - 4))).toThrow('snapshot data length does not match its header');
    expect(() => decodeSnapshots(Uint8Array.from([...bytes, 0, 0, 0, 0]))).toThrow('snapshot data length does not match its header');
    const set = syntheticSnapshots(10, 2);
    set.frames[1].positions[4] = NaN;
    expect(() => encodeSnapshots(set)).toThrow('frame 1 (step 10) holds a coordinate that is not a finite number');
    expect(() => encodeSnapshots({ ...set, component: new Uint8Array(9) })).toThrow('the component list has 9 entries for 10 particles');
  });
});
