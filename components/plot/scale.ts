// Small linear and log scales with readable ticks, for the plots.

export interface Scale {
  (v: number): number;
  domain: [number, number];
  log: boolean;
  ticks(count?: number): number[];
}

function niceStep(span: number, count: number): number {
  const raw = span / Math.max(1, count);
  const power = 10 ** Math.floor(Math.log10(raw));
  const err = raw / power;
  return power * (err >= 7.07 ? 10 : err >= 3.16 ? 5 : err >= 1.41 ? 2 : 1);
}

export function linearTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const step = niceStep(hi - lo, count);
  const out: number[] = [];
  // Rounding to the step's precision keeps 0.30000000000000004 out of labels.
  // toFixed takes at most 100 digits; a step under 1e-99 keeps its own value.
  const digits = Math.max(0, -Math.floor(Math.log10(step)) + 1);
  const first = Math.ceil(lo / step) * step;
  // Counted, not accumulated: at 1e16 adding a step of 1 changes nothing and would never end.
  for (let i = 0; i <= 4 * count + 2; i++) {
    const v = first + i * step;
    if (!(v <= hi + step * 1e-9)) break;
    out.push(digits <= 100 ? Number(v.toFixed(digits)) : v);
  }
  return out;
}

export function logTicks(lo: number, hi: number): number[] {
  const a = Math.floor(Math.log10(lo));
  const b = Math.ceil(Math.log10(hi));
  // A log axis of zero, negative or infinite ends has no ticks (the loop would never end).
  if (!Number.isFinite(a) || !Number.isFinite(b)) return [];
  const decades = b - a;
  const mult = decades <= 1 ? [1, 2, 5] : decades <= 3 ? [1, 3] : [1];
  const every = decades > 8 ? Math.ceil(decades / 6) : 1;
  const out: number[] = [];
  for (let e = a; e <= b; e += every) for (const m of mult) {
    const v = Number(`${m}e${e}`); // exact: 1 * 10 ** -5 is 9.999999999999999e-6
    if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) out.push(v);
  }
  return out;
}

/** Widens a linear domain to round ends; a log domain is kept, only guarded against zero width. */
export function niceDomain(lo: number, hi: number, log: boolean): [number, number] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return log ? [1, 10] : [0, 1];
  if (log) {
    if (hi <= lo) return [lo / 2, lo * 2];
    return [lo, hi];
  }
  if (hi === lo) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    return [lo - pad, hi + pad];
  }
  const step = niceStep(hi - lo, 5);
  // The tolerance keeps 200.0000001 from widening the axis to 250.
  return [Math.floor(lo / step + 1e-6) * step, Math.ceil(hi / step - 1e-6) * step];
}

export function makeScale(domain: [number, number], range: [number, number], log = false): Scale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  const t = log ? Math.log10 : (v: number) => v;
  const t0 = t(d0);
  const span = t(d1) - t0 || 1;
  const s = ((v: number) => r0 + ((t(v) - t0) / span) * (r1 - r0)) as Scale;
  s.domain = domain;
  s.log = log;
  s.ticks = (count = 5) => (log ? logTicks(d0, d1) : linearTicks(d0, d1, count));
  return s;
}

/** Tick labels: plain numbers when they read well, otherwise powers of ten (all of a log axis alike). */
export function formatTick(v: number, ticks: number[], log = false): string {
  if (v === 0) return '0';
  if (!Number.isFinite(v)) return v === Infinity ? '∞' : v === -Infinity ? '−∞' : '—';
  const biggest = Math.max(...ticks.map(Math.abs));
  const smallest = Math.min(...ticks.map(Math.abs));
  if (biggest >= 1e5 || biggest < 1e-3 || (log && (smallest < 1e-2 || biggest >= 1e4))) {
    const [m, e] = v.toExponential(2).split('e');
    const mant = String(Number(m));
    return mant === '1' ? `1e${Number(e)}` : mant === '-1' ? `-1e${Number(e)}` : `${mant}e${Number(e)}`;
  }
  return String(Number(v.toPrecision(4)));
}
