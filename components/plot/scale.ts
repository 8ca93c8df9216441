import { scaleLinear, scaleLog } from 'd3-scale';

// Linear and log scales for the plots. Tick positions and round domains come from d3-scale;
// only the tick labels are Infall's own.

export interface AxisTick {
  value: number;
  /** A log axis puts a tick at every 1…9 × 10ⁿ but labels only some of them. */
  labelled: boolean;
}

export interface Scale {
  (v: number): number;
  domain: [number, number];
  log: boolean;
  ticks(count?: number): AxisTick[];
}

/** Rounds a linear domain outwards to tick steps and a log one to whole decades; guards against zero width. */
export function niceDomain(lo: number, hi: number, log: boolean): [number, number] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return log ? [1, 10] : [0, 1];
  if (log) {
    if (hi <= lo) return [lo / 2, lo * 2];
    const [a, b] = scaleLog().domain([lo, hi]).nice().domain();
    return [a, b];
  }
  if (hi === lo) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    return [lo - pad, hi + pad];
  }
  // Pulling the ends in by a hair keeps 200.0000001 from widening the axis to 220.
  const hair = (hi - lo) * 1e-7;
  const [a, b] = scaleLinear().domain([lo + hair, hi - hair]).nice(5).domain();
  return [a, b];
}

export function makeScale(domain: [number, number], range: [number, number], log = false): Scale {
  const d3s = log ? scaleLog().domain(domain).range(range) : scaleLinear().domain(domain).range(range);
  const s = ((v: number) => d3s(v)) as Scale;
  s.domain = domain;
  s.log = log;
  s.ticks = (count = 5) => {
    // An axis whose width overflows, or a log axis reaching zero or subnormal numbers, gets no
    // ticks (d3 would throw).
    const [a, b] = domain;
    if (!(Number.isFinite(b - a) && b - a > 1e-290 && (!log || (a >= 1e-300 && b <= 1e300)))) return [];
    const values = d3s.ticks(count);
    if (!log) return values.map((value) => ({ value, labelled: true }));
    // d3's log tick format leaves out the labels of crowded sub-decade ticks; asked for half as
    // many labels as ticks, it labels 1, 2 and 10 within one decade, only powers of ten beyond.
    const keep = scaleLog().domain(domain).tickFormat(count / 2);
    return values.map((value) => ({ value, labelled: keep(value) !== '' }));
  };
  return s;
}

/** Tick labels: plain numbers when they read well, otherwise powers of ten (all of a log axis alike). */
export function formatTick(v: number, ticks: number[], log = false): string {
  if (!Number.isFinite(v)) return '—';
  if (v === 0) return '0';
  const biggest = Math.max(...ticks.map(Math.abs));
  const smallest = Math.min(...ticks.map(Math.abs));
  if (biggest >= 1e5 || biggest < 1e-3 || (log && (smallest < 1e-2 || biggest >= 1e4))) {
    const [m, e] = v.toExponential(2).split('e');
    const mant = String(Number(m));
    return mant === '1' ? `1e${Number(e)}` : mant === '-1' ? `-1e${Number(e)}` : `${mant}e${Number(e)}`;
  }
  return String(Number(v.toPrecision(4)));
}
