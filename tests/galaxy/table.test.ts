// Rotation-curve tables: what is accepted, and that every refusal names the problem and where it is.
import { parseRotationCurve, readTableCells, TableError } from '../../shared/galaxy/table';

const limits = { maxBytes: 10_000, maxRows: 50 };

function refusal(input: Uint8Array | string, options: Partial<Parameters<typeof parseRotationCurve>[1]> = {}): TableError {
  try {
    parseRotationCurve(input, { ...limits, ...options });
  } catch (err) {
    expect(err).toBeInstanceOf(TableError);
    return err as TableError;
  }
  throw new Error('the table was accepted');
}

describe('rotation-curve tables', () => {
  test('CSV with a header maps columns by name, in any order, with units in the names', () => {
    const curve = parseRotationCurve('# invented galaxy\nVobs (km/s),R_kpc,e_Vobs,Vdisk,Vgas,Vbul\n30,0.5,3,20,5,1\n50,1.0,2.5,35,-4,2\n', limits);
    expect(curve.radiusKpc).toEqual([0.5, 1]);
    expect(curve.vObs).toEqual([30, 50]);
    expect(curve.vErr).toEqual([3, 2.5]);
    expect(curve.vDisk).toEqual([20, 35]);
    expect(curve.vGas).toEqual([5, -4]);
    expect(curve.vBulge).toEqual([1, 2]);
  });

  test('whitespace text without a header reads R, V, dV, gas, disk, bulge by position', () => {
    const curve = parseRotationCurve('0.5  30 3   5\n\n1.0\t50   3  8 # a comment\n', limits);
    expect(curve.radiusKpc).toEqual([0.5, 1]);
    expect(curve.vGas).toEqual([5, 8]);
    expect(curve.vDisk).toBeNull();
  });

  test('radii in arcsec are turned into kpc with the distance (1 arcsec at 10 Mpc = 48.48 pc, small-angle)', () => {
    const curve = parseRotationCurve('10 30 3\n20 40 3\n', { ...limits, radiusUnit: 'arcsec', distanceMpc: { value: 10, error: 1 } });
    expect(curve.radiusKpc[0]).toBeCloseTo(0.48481, 5);
    expect(curve.distanceMpc).toEqual({ value: 10, error: 1 });
    expect(refusal('10 30 3\n', { radiusUnit: 'arcsec' }).message).toMatch(/arcsec need the distance/);
    expect(refusal('R_arcsec,V,dV\n10,30,3\n').message).toMatch(/the radius column "R_arcsec" is in arcsec; say so/);
    expect(parseRotationCurve('R_arcsec,V,dV\n10,30,3\n', { ...limits, radiusUnit: 'arcsec', distanceMpc: { value: 10 } }).radiusKpc[0]).toBeCloseTo(0.48481, 5);
  });

  test('an explicit mapping by number or name overrides the header', () => {
    const curve = parseRotationCurve('a,b,c\n1,30,3\n2,40,4\n', { ...limits, columns: { radius: 1, vObs: 'b', vErr: 3 } });
    expect(curve.vObs).toEqual([30, 40]);
    expect(refusal('a,b,c\n1,30,3\n', { columns: { radius: 1, vObs: 'speed', vErr: 3 } }).message).toMatch(/no column named "speed"/);
    expect(refusal('a,b,c\n1,30,3\n', { columns: { radius: 9 } }).message).toMatch(/column 9 for radius does not exist/);
  });

  test('a bad cell is named by line and column', () => {
    const err = refusal('R,V,dV\n1,30,3\n2,40,3\n3,50,3\n4,60,3\n5,70,3\n6,abc,3\n');
    expect(err.message).toBe('line 7, column 2: "abc" is not a number');
    expect([err.line, err.column]).toEqual([7, 2]);
    expect(refusal('R,V,dV\n1,30\n').message).toBe('line 2, column 3: the cell is empty');
    expect(refusal('R,V,dV\n1,1e999,3\n').message).toBe('line 2, column 2: "1e999" is too large to be a number here');
    expect(refusal('R;V;dV\n1;30,5;3\n').message).toBe('line 2, column 2: "30,5" has a decimal comma; write 30.5');
    expect(refusal('1;30,5;3\n').message).toBe('line 1, column 2: "30,5" has a decimal comma; write 30.5');
  });

  test('errors must be positive; radii positive, sorted, without repeats', () => {
    expect(refusal('R,V,dV\n1,30,0\n').message).toMatch(/^line 2, column 3: speed error 0 must be positive/);
    expect(refusal('R,V,dV\n1,30,-2\n').message).toMatch(/speed error -2 must be positive/);
    expect(refusal('R,V,dV\n0,30,2\n').message).toMatch(/^line 2, column 1: radius 0 must be positive/);
    expect(refusal('R,V,dV\n1,30,2\n1,31,2\n').message).toMatch(/^line 3, column 1: radius 1 repeats the previous row/);
    expect(refusal('R,V,dV\n2,30,2\n1,31,2\n').message).toMatch(/^line 3, column 1: .*smaller than the previous row/);
    expect(refusal('R,V,dV,Vdisk\n1,30,2,-5\n').message).toMatch(/stellar disk speed -5 must not be negative/);
  });

  test('formula injection is refused, negative numbers are not mistaken for it', () => {
    for (const cell of ['=1+2', '+cmd', '-2+3', '@SUM(A1)']) {
      expect(refusal(`R,V,dV\n1,${cell},3\n`).message).toBe(`line 2, column 2: "${cell}" looks like a spreadsheet formula; refused`);
    }
    expect(refusal('R,=HYPERLINK("x"),dV\n1,2,3\n').message).toMatch(/formula/);
    expect(parseRotationCurve('R,Vgas,V,dV\n1,-3.5e0,30,3\n', limits).vGas).toEqual([-3.5]);
  });

  test('binary, non-UTF-8 and control characters are refused', () => {
    expect(refusal(new Uint8Array([0x31, 0x2c, 0x32, 0x00, 0x33])).message).toMatch(/NUL byte.*binary/);
    // "1,2,3" then Latin-1 "é" (0xE9) alone: not valid UTF-8.
    expect(refusal(new Uint8Array([0x31, 0x2c, 0x32, 0x2c, 0x33, 0x0a, 0xe9, 0x0a])).message).toMatch(/not UTF-8/);
    expect(refusal('R,V,dV\n1,2,3\u0007\n').message).toMatch(/^line 2: control character U\+0007/);
    expect(refusal('R,V,dV\n1,2\u0000,3\n').message).toMatch(/NUL character/);
    expect(refusal('R,V,dV\n1,2,3\ud800\n').message).toMatch(/unpaired surrogate/);
    // A UTF-8 byte-order mark is fine.
    expect(parseRotationCurve(new Uint8Array([0xef, 0xbb, 0xbf, ...new TextEncoder().encode('R,V,dV\n1,2,3\n')]), limits).vObs).toEqual([2]);
  });

  test('size and row limits are the caller’s (the quota)', () => {
    const rows = Array.from({ length: 60 }, (_, i) => `${i + 1},30,3`).join('\n');
    expect(refusal(rows).message).toMatch(/more than 50 data rows/);
    expect(refusal(rows, { maxBytes: 100 }).message).toMatch(/bytes; the limit is 100$/);
    // Size counts UTF-8 bytes, also for text handed in as a string: 19 characters, "é" two bytes each, 22 bytes.
    expect(refusal('R,V,dV\n1,2,3 # ééé\n', { maxBytes: 20 }).message).toBe('the table is 22 bytes; the limit is 20');
    expect(refusal('').message).toMatch(/empty/);
    expect(refusal('# only a comment\n').message).toMatch(/no data rows/);
    expect(readTableCells(rows, { maxBytes: 10_000, maxRows: 60 }).rows).toHaveLength(60);
  });

  test('metadata is checked', () => {
    expect(refusal('1 2 3\n', { inclinationDeg: { value: 120 } }).message).toMatch(/inclination 120/);
    expect(refusal('1 2 3\n', { distanceMpc: { value: 5, error: 0 } }).message).toMatch(/distance error 0 must be positive/);
  });
});
