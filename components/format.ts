// How numbers, counts and ages read across the app.

/** Short number for read-outs: 3 significant digits, powers of ten when far from 1. */
export function formatValue(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(digits - 1).replace('e+', 'e');
  return String(Number(v.toPrecision(digits)));
}

function trimmedExponent(v: number): string {
  const [m, e] = v.toExponential(6).split('e');
  return `${Number(m)}e${Number(e)}`;
}

/** A range limit: 100 000, 1e15, 1.2e-10, 0.5. */
export function formatBound(v: number): string {
  const a = Math.abs(v);
  if (Number.isInteger(v) && a < 1e9) return formatCount(v);
  if (a >= 1e5 || (a > 0 && a < 1e-3)) return trimmedExponent(v);
  return String(v);
}

/** A number as it is typed: large and tiny ones in e-notation so they stay readable. */
export function formatInput(v: number | undefined): string {
  if (v === undefined || !Number.isFinite(v)) return '';
  const a = Math.abs(v);
  return a >= 1e6 || (a > 0 && a < 1e-3) ? trimmedExponent(v) : String(v);
}

/** Whole counts with thin grouping: 5 000, 1 200 000. */
export function formatCount(n: number): string {
  return Math.round(n).toString().replace(/\B(?=(\d{3})+(?!\d))/g, '\u2009');
}

/** Pair interactions in words people can compare: 3.2 M, 1.5 G. */
export function formatInteractions(n: number): string {
  const units: [number, string][] = [
    [1e12, 'T'],
    [1e9, 'G'],
    [1e6, 'M'],
    [1e3, 'k'],
  ];
  for (const [size, sym] of units) if (Math.abs(n) >= size) return `${Number((n / size).toPrecision(3))} ${sym}`;
  return String(Math.round(n));
}

export function formatAge(iso: string, now = Date.now()): string {
  const s = Math.max(0, Math.round((now - Date.parse(iso)) / 1000));
  if (s < 60) return 'just now';
  const m = Math.round(s / 60);
  if (m < 60) return `${m} min ago`;
  const h = Math.round(m / 60);
  if (h < 36) return `${h} h ago`;
  const d = Math.round(h / 24);
  if (d < 60) return `${d} days ago`;
  return new Date(iso).toISOString().slice(0, 10);
}

/** A token's expiry as people read it: 'expires in 12 days', 'expired 2026-11-30'. */
export function formatExpiry(iso: string, now = Date.now()): string {
  const ms = Date.parse(iso) - now;
  if (ms <= 0) return `expired ${new Date(iso).toISOString().slice(0, 10)}`;
  const h = Math.round(ms / 3_600_000);
  if (h < 36) return `expires in ${Math.max(1, h)} h`;
  const d = Math.round(h / 24);
  return d < 60 ? `expires in ${d} days` : `expires ${new Date(iso).toISOString().slice(0, 10)}`;
}

export function formatDuration(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s < 90) return `${s} s`;
  const m = Math.round(s / 60);
  return m < 90 ? `${m} min` : `${(m / 60).toFixed(1)} h`;
}

/** Model kinds as people say them. */
export const MODEL_LABELS: Record<string, string> = {
  kepler: 'Kepler pair',
  plummer: 'Plummer sphere',
  hernquist: 'Hernquist sphere',
  disk: 'Exponential disk',
  encounter: 'Encounter',
  table: 'Uploaded particles',
};

/** Short law names for lists and tags; the engine's lawInfo gives the full label. */
export const LAW_LABELS: Record<string, string> = {
  newton: 'Newton',
  halo: 'Newton + halo',
  mond: 'MOND (algebraic)',
  qumond: 'MOND (field, QUMOND)',
  emergent: 'Emergent',
  yukawa: 'Yukawa',
};
