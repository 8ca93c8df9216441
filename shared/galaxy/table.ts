// Rotation-curve tables: CSV or whitespace-separated text in, a checked curve
// out. Pure TypeScript so the server, the command line and the app share it.
// The browser build of the CSV parser carries its own Buffer, so it runs in the
// web app as well as under Node (Jest maps it to the CommonJS build).
import { parse } from 'csv-parse/browser/esm/sync';

/** The columns a rotation-curve table can carry. */
export const COLUMN_KEYS = ['radius', 'vObs', 'vErr', 'vGas', 'vDisk', 'vBulge'] as const;
export type ColumnKey = (typeof COLUMN_KEYS)[number];

/** Header names recognised for each column (compared lower-case, without spaces, _ or -). */
const HEADER_NAMES: Record<ColumnKey, string[]> = {
  radius: ['r', 'rad', 'radius', 'rkpc', 'rarcsec'],
  vObs: ['v', 'vobs', 'vrot', 'vc', 'speed', 'velocity'],
  vErr: ['dv', 'err', 'error', 'verr', 'errv', 'evobs', 'dvobs', 'sigma'],
  vGas: ['vgas', 'gas'],
  vDisk: ['vdisk', 'vdisc', 'disk', 'disc', 'vstar', 'vstars'],
  vBulge: ['vbulge', 'vbul', 'bulge'],
};

/** Without a header row, columns are read in this order (the first three are required). */
const POSITIONAL: ColumnKey[] = ['radius', 'vObs', 'vErr', 'vGas', 'vDisk', 'vBulge'];

export interface Measured {
  value: number;
  error?: number;
}

/** A parsed, checked rotation curve. Radii in kpc, speeds in km/s. */
export interface RotationCurve {
  radiusKpc: number[];
  vObs: number[];
  vErr: number[];
  /** Components at unit mass-to-light ratio; gas may be negative (signed v|v| convention). */
  vGas: number[] | null;
  vDisk: number[] | null;
  vBulge: number[] | null;
  distanceMpc?: Measured;
  inclinationDeg?: Measured;
}

export interface TableOptions {
  /** Largest accepted input in bytes (the person's quota). */
  maxBytes: number;
  /** Largest accepted number of data rows (the person's quota). */
  maxRows: number;
  /** Column for each key: 1-based column number or header name. Unset keys use the header or position. */
  columns?: Partial<Record<ColumnKey, number | string>>;
  /** Unit of the radius column; arcsec needs the distance. */
  radiusUnit?: 'kpc' | 'arcsec';
  distanceMpc?: Measured;
  inclinationDeg?: Measured;
}

/** A refusal that names where in the table the problem is. */
export class TableError extends Error {
  constructor(
    message: string,
    readonly line?: number,
    readonly column?: number,
  ) {
    super(line === undefined ? message : column === undefined ? `line ${line}: ${message}` : `line ${line}, column ${column}: ${message}`);
    this.name = 'TableError';
  }
}

/** One arcsecond in radians. */
const ARCSEC_RAD = Math.PI / (180 * 3600);

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const DECIMAL_COMMA = /^[+-]?\d+,\d+$/;
/** Leading characters a spreadsheet would run as a formula. */
const FORMULA_START = /^[=+\-@\t\r]/;

export interface TableCells {
  header: string[] | null;
  /** Data rows as strings with the 1-based line each came from. */
  rows: { line: number; cells: string[] }[];
}

/** Bytes of a string once written as UTF-8; null when it holds a lone surrogate (no UTF-8 form). */
function utf8Length(text: string): number | null {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      const next = text.charCodeAt(i + 1);
      if (!(next >= 0xdc00 && next <= 0xdfff)) return null;
      n += 4;
      i++;
    } else if (c >= 0xdc00 && c <= 0xdfff) return null;
    else n += 3;
  }
  return n;
}

/** Text of the input: bytes must be UTF-8 (decoded strictly); a string must have a UTF-8 form. Size is checked before decoding. */
function decode(input: Uint8Array | string, maxBytes: number): string {
  const size = typeof input === 'string' ? utf8Length(input) : input.length;
  if (size === null) throw new TableError('the text holds an unpaired surrogate; it is not valid Unicode text');
  if (size > maxBytes) throw new TableError(`the table is ${size} bytes; the limit is ${maxBytes}`);
  if (size === 0) throw new TableError('the table is empty');
  if (typeof input === 'string') return input;
  const nul = input.indexOf(0);
  if (nul >= 0) throw new TableError(`the file holds a NUL byte (at byte ${nul + 1}); it looks binary, not a text table`);
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(input);
  } catch {
    throw new TableError('the file is not UTF-8 text; save the table as UTF-8');
  }
}

/** Decode and split a table into cells, refusing binary, non-UTF-8 and oversized input. */
export function readTableCells(input: Uint8Array | string, limits: { maxBytes: number; maxRows: number }): TableCells {
  let text = decode(input, limits.maxBytes);
  const nul = text.indexOf('\u0000');
  if (nul >= 0) throw new TableError(`the text holds a NUL character (at character ${nul + 1}); it looks binary, not a text table`);
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const bad = /[\u0001-\u0008\u000b\u000c\u000e-\u001f\u007f]/.exec(text);
  if (bad) {
    const line = text.slice(0, bad.index).split('\n').length;
    throw new TableError(`control character U+${bad[0].charCodeAt(0).toString(16).padStart(4, '0')} is not allowed in a text table`, line);
  }

  const lines = text.split(/\r?\n/);
  const firstData = lines.find((l) => l.trim() !== '' && !l.trimStart().startsWith('#')) ?? '';
  // Semicolons first: a table written with decimal commas separates its cells by semicolons.
  const delimiter = firstData.includes(';') ? ';' : firstData.includes(',') ? ',' : null;
  // Whitespace tables: comments go, runs of spaces and tabs become one tab; lines keep their numbers.
  const source = delimiter ? text : lines.map((l) => l.replace(/#.*/, '').trim().replace(/[ \t]+/g, '\t')).join('\n');

  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(source, {
      delimiter: delimiter ?? '\t',
      comment: '#',
      skip_empty_lines: true,
      relax_column_count: true,
      relax_quotes: true,
      trim: delimiter !== null,
      info: true,
      to: limits.maxRows + 2,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (err) {
    const e = err as { lines?: number; message?: string };
    throw new TableError(`the table cannot be read as ${delimiter ? 'CSV' : 'whitespace-separated text'} (${e.message ?? String(err)})`, e.lines);
  }
  const rows = records.map((r) => ({ line: r.info.lines, cells: r.record }));
  let header: string[] | null = null;
  // A header is a first row with a cell that is not a number (a decimal comma still counts as one, to be named later).
  if (rows.length > 0 && rows[0].cells.some((c) => c.trim() !== '' && !NUMBER.test(c.trim()) && !DECIMAL_COMMA.test(c.trim()))) {
    header = rows.shift()!.cells.map((c) => c.trim());
    const formula = header.findIndex((c) => FORMULA_START.test(c));
    if (formula >= 0) throw new TableError(`"${header[formula]}" looks like a spreadsheet formula; refused`, records[0].info.lines, formula + 1);
  }
  if (rows.length > limits.maxRows) throw new TableError(`the table has more than ${limits.maxRows} data rows (the limit)`);
  if (rows.length === 0) throw new TableError('the table has no data rows');
  return { header, rows };
}

const normalise = (name: string) => name.toLowerCase().replace(/[\s_\-()[\]/.]/g, '').replace(/kms$/, '');

/** Which column (0-based) holds each key, from the mapping, then the header, then position. */
function locateColumns(header: string[] | null, width: number, mapping: TableOptions['columns']): Partial<Record<ColumnKey, number>> {
  const found: Partial<Record<ColumnKey, number>> = {};
  for (const key of COLUMN_KEYS) {
    const want = mapping?.[key];
    if (typeof want === 'number') {
      if (!Number.isInteger(want) || want < 1 || want > width) throw new TableError(`column ${want} for ${key} does not exist; the table has ${width} columns`);
      found[key] = want - 1;
    } else if (typeof want === 'string') {
      const at = header ? header.findIndex((h) => h === want || normalise(h) === normalise(want)) : -1;
      if (at < 0) throw new TableError(`no column named "${want}" for ${key}${header ? `; the header has ${header.join(', ')}` : '; the table has no header row'}`);
      found[key] = at;
    } else if (header) {
      const at = header.findIndex((h) => HEADER_NAMES[key].includes(normalise(h).replace(/(kpc|arcsec)$/, '') || normalise(h)));
      if (at >= 0) found[key] = at;
    } else {
      const at = POSITIONAL.indexOf(key);
      if (at < width) found[key] = at;
    }
  }
  for (const key of ['radius', 'vObs', 'vErr'] as const) {
    if (found[key] === undefined) {
      throw new TableError(`no ${key === 'radius' ? 'radius' : key === 'vObs' ? 'observed speed' : 'speed error'} column${header ? ` among ${header.join(', ')}; map it by name or number` : ''}`);
    }
  }
  return found;
}

/** One cell as a number, or a TableError naming its line and column (a formula or text refused). */
export function readNumber(cell: string | undefined, line: number, column: number): number {
  const text = (cell ?? '').trim();
  if (text === '') throw new TableError('the cell is empty', line, column);
  if (NUMBER.test(text)) {
    const value = Number(text);
    if (!Number.isFinite(value)) throw new TableError(`"${text.slice(0, 40)}" is too large to be a number here`, line, column);
    return value;
  }
  if (DECIMAL_COMMA.test(text)) throw new TableError(`"${text}" has a decimal comma; write ${text.replace(',', '.')}`, line, column);
  if (FORMULA_START.test(text)) throw new TableError(`"${text.slice(0, 40)}" looks like a spreadsheet formula; refused`, line, column);
  throw new TableError(`"${text.slice(0, 40)}" is not a number`, line, column);
}

function checkMeasured(name: string, m: Measured | undefined, positive: boolean): Measured | undefined {
  if (m === undefined) return undefined;
  if (!Number.isFinite(m.value) || (positive ? m.value <= 0 : m.value < 0)) throw new TableError(`${name} ${m.value} must be ${positive ? 'positive' : 'zero or more'}`);
  if (m.error !== undefined && !(Number.isFinite(m.error) && m.error > 0)) throw new TableError(`${name} error ${m.error} must be positive`);
  return m;
}

/** Parse and check a rotation-curve table. Throws TableError naming line and column. */
export function parseRotationCurve(input: Uint8Array | string, options: TableOptions): RotationCurve {
  const distanceMpc = checkMeasured('distance', options.distanceMpc, true);
  const inclinationDeg = checkMeasured('inclination', options.inclinationDeg, false);
  if (inclinationDeg && inclinationDeg.value > 90) throw new TableError(`inclination ${inclinationDeg.value} degrees must be at most 90`);
  const unit = options.radiusUnit ?? 'kpc';
  if (unit === 'arcsec' && !distanceMpc) throw new TableError('radii in arcsec need the distance in Mpc');
  const kpcPerUnit = unit === 'arcsec' ? distanceMpc!.value * 1000 * ARCSEC_RAD : 1;

  const { header, rows } = readTableCells(input, options);
  const width = Math.max(header?.length ?? 0, ...rows.map((r) => r.cells.length));
  const at = locateColumns(header, width, options.columns);
  const radiusName = header?.[at.radius!] ?? '';
  if (options.radiusUnit === undefined && /arcsec|″/i.test(radiusName)) {
    throw new TableError(`the radius column "${radiusName}" is in arcsec; say so (radius unit arcsec, with the distance) rather than have it read as kpc`);
  }
  const curve: RotationCurve = {
    radiusKpc: [],
    vObs: [],
    vErr: [],
    vGas: at.vGas === undefined ? null : [],
    vDisk: at.vDisk === undefined ? null : [],
    vBulge: at.vBulge === undefined ? null : [],
    ...(distanceMpc ? { distanceMpc } : {}),
    ...(inclinationDeg ? { inclinationDeg } : {}),
  };
  for (const { line, cells } of rows) {
    const value = (key: ColumnKey) => readNumber(cells[at[key]!], line, at[key]! + 1);
    const r = value('radius') * kpcPerUnit;
    const v = value('vObs');
    const dv = value('vErr');
    if (!(r > 0)) throw new TableError(`radius ${cells[at.radius!].trim()} must be positive`, line, at.radius! + 1);
    if (v < 0) throw new TableError(`observed speed ${v} must not be negative`, line, at.vObs! + 1);
    if (!(dv > 0)) throw new TableError(`speed error ${dv} must be positive`, line, at.vErr! + 1);
    const previous = curve.radiusKpc[curve.radiusKpc.length - 1];
    if (previous !== undefined && !(r > previous)) {
      throw new TableError(`radius ${cells[at.radius!].trim()} ${r === previous ? 'repeats the previous row' : 'is smaller than the previous row'}; rows must be sorted by increasing radius`, line, at.radius! + 1);
    }
    curve.radiusKpc.push(r);
    curve.vObs.push(v);
    curve.vErr.push(dv);
    curve.vGas?.push(value('vGas'));
    for (const key of ['vDisk', 'vBulge'] as const) {
      const list = curve[key];
      if (!list) continue;
      const s = value(key);
      if (s < 0) throw new TableError(`${key === 'vDisk' ? 'stellar disk' : 'bulge'} speed ${s} must not be negative`, line, at[key]! + 1);
      list.push(s);
    }
  }
  return curve;
}
