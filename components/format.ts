import { groupDigits } from '../shared/spec/limits';

// How numbers, counts and ages read across the app. Every helper takes any number, finite
// or not, and any string for dates, without throwing: a stored run with extreme or missing
// values must still draw (a blank page is worse than a dash).

/** What stands for a number that is missing or not finite. */
const NONE = '—';

/** ±Infinity as a sign, NaN and missing as a dash. */
const notFinite = (v: number | null | undefined) => (v === Infinity ? '∞' : v === -Infinity ? '−∞' : NONE);

/** Short number for read-outs: 3 significant digits, powers of ten when far from 1. */
export function formatValue(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return NONE;
  if (v === 0) return '0';
  // toPrecision and toExponential throw outside their ranges.
  const d = Number.isFinite(digits) ? Math.min(21, Math.max(1, Math.round(digits))) : 3;
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(d - 1).replace('e+', 'e');
  return String(Number(v.toPrecision(d)));
}

function trimmedExponent(v: number, digits = 7): string {
  const [m, e] = v.toExponential(digits - 1).split('e');
  return `${Number(m)}e${Number(e)}`;
}

/** A range limit: 100 000, 1e15, 1.2e-10, 0.5, and a whole limit no shorter form holds exactly: 4 294 967 295. */
export function formatBound(v: number): string {
  if (!Number.isFinite(v)) return notFinite(v);
  const a = Math.abs(v);
  // A limit shown rounded would refuse, in words, a value the schema takes (the seed's 4294967295 as 4.294967e9).
  if (Number.isInteger(v) && (a < 1e9 || (Number.isSafeInteger(v) && Number(trimmedExponent(v)) !== v))) return formatCount(v);
  if (a >= 1e5 || (a > 0 && a < 1e-3)) return trimmedExponent(v);
  return String(v);
}

/** A number as it is typed: large and tiny ones in e-notation so they stay readable. */
export function formatInput(v: number | undefined): string {
  if (v === undefined || !Number.isFinite(v)) return '';
  const a = Math.abs(v);
  return a >= 1e6 || (a > 0 && a < 1e-3) ? trimmedExponent(v) : String(v);
}

/** Whole counts with thin grouping: 5 000, 1 200 000 (beyond 1e21, e-notation). */
export function formatCount(n: number): string {
  if (!Number.isFinite(n)) return notFinite(n);
  if (Math.abs(n) >= 1e21) return trimmedExponent(n);
  return groupDigits(n);
}

/** Pair interactions in words people can compare: 3.2 M, 1.5 G. */
export function formatInteractions(n: number): string {
  if (!Number.isFinite(n)) return notFinite(n);
  if (Math.abs(n) >= 1e15) return trimmedExponent(n, 3);
  const units: [number, string][] = [
    [1e12, 'T'],
    [1e9, 'G'],
    [1e6, 'M'],
    [1e3, 'k'],
  ];
  for (const [size, sym] of units) if (Math.abs(n) >= size) return `${Number((n / size).toPrecision(3))} ${sym}`;
  return String(Math.round(n));
}

/** A date as its ISO day, or the dash when it does not parse. */
function isoDay(ms: number): string {
  return Number.isFinite(ms) && Math.abs(ms) <= 8.64e15 ? new Date(ms).toISOString().slice(0, 10) : NONE;
}

export function formatAge(iso: string, now = Date.now()): string {
  if (!Number.isFinite(Date.parse(iso)) || !Number.isFinite(now)) return NONE;
  const s = Math.max(0, Math.round((now - Date.parse(iso)) / 1000));
  if (s < 60) return 'just now';
  const m = Math.round(s / 60);
  if (m < 60) return `${m} min ago`;
  const h = Math.round(m / 60);
  if (h < 36) return `${h} h ago`;
  const d = Math.round(h / 24);
  if (d < 60) return `${d} days ago`;
  return isoDay(Date.parse(iso));
}

/** A token's expiry as people read it: 'expires in 12 days', 'expired 2026-11-30'. */
export function formatExpiry(iso: string, now = Date.now()): string {
  const ms = Date.parse(iso) - now;
  if (!Number.isFinite(ms)) return NONE;
  if (ms <= 0) return `expired ${isoDay(Date.parse(iso))}`;
  const h = Math.round(ms / 3_600_000);
  if (h < 36) return `expires in ${Math.max(1, h)} h`;
  const d = Math.round(h / 24);
  return d < 60 ? `expires in ${d} days` : `expires ${isoDay(Date.parse(iso))}`;
}

export function formatDuration(ms: number): string {
  if (!Number.isFinite(ms)) return notFinite(ms);
  const s = Math.max(0, Math.round(ms / 1000)); // clocks that disagree give no negative times
  if (s < 90) return `${s} s`;
  const m = Math.round(s / 60);
  const h = m / 60;
  return m < 90 ? `${m} min` : `${h < 1e5 ? h.toFixed(1) : formatValue(h)} h`;
}

