// The playback clock of the animations, outside React.

export const PLAYBACK_SPEEDS = [0.25, 0.5, 1, 2, 4] as const;
/** At 1× the animation shows this many snapshots per second. */
const SNAPSHOTS_PER_SECOND = 12;

/**
 * A playhead over simulated time (Myr), advanced once per animation frame. It lives outside
 * React state so only what reads it re-renders each frame, and one playhead can drive several
 * views: the compare page plays two runs in step this way.
 */
export class Playhead {
  time = 0;
  playing = false;
  speed = 1;
  /** Blend positions between snapshots (smooth) or hold each snapshot (exact). */
  blend = true;
  private times: readonly number[] = [];
  private listeners = new Set<() => void>();
  private handle: number | null = null;
  private last: number | null = null;

  get start(): number {
    return this.times.length ? this.times[0] : 0;
  }
  get end(): number {
    return this.times.length ? this.times[this.times.length - 1] : 0;
  }
  get frameCount(): number {
    return this.times.length;
  }
  setTimes(times: readonly number[]): void {
    const same = times.length === this.times.length && times.every((t, i) => t === this.times[i]);
    if (same) return;
    this.times = times;
    this.pause();
    this.time = this.start;
    this.emit();
  }

  subscribe = (fn: () => void): (() => void) => {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  };

  play(): void {
    if (this.playing || this.times.length < 2 || typeof requestAnimationFrame === 'undefined') return;
    if (this.time >= this.end) this.time = this.start;
    this.playing = true;
    this.last = null;
    this.handle = requestAnimationFrame(this.tick);
    this.emit();
  }

  pause(): void {
    if (this.handle !== null) cancelAnimationFrame(this.handle);
    this.handle = null;
    if (this.playing) {
      this.playing = false;
      this.emit();
    }
  }

  toggle(): void {
    if (this.playing) this.pause();
    else this.play();
  }

  seek(t: number): void {
    this.time = Math.min(this.end, Math.max(this.start, t));
    this.emit();
  }

  /** Moves by whole snapshots (for step buttons and keyboards). */
  step(by: number): void {
    const { index } = locateFrame(this.times, this.time);
    const next = Math.min(this.times.length - 1, Math.max(0, index + by));
    this.pause();
    this.seek(this.times[next] ?? 0);
  }

  setSpeed(s: number): void {
    this.speed = s;
    this.emit();
  }

  setBlend(on: boolean): void {
    this.blend = on;
    this.emit();
  }

  dispose(): void {
    this.pause();
    this.listeners.clear();
  }

  private rate(): number {
    const n = this.times.length;
    return n > 1 ? ((this.end - this.start) / (n - 1)) * SNAPSHOTS_PER_SECOND * this.speed : 0;
  }

  private tick = (now: number) => {
    if (this.last !== null) {
      let t = this.time + ((now - this.last) / 1000) * this.rate();
      const span = this.end - this.start;
      if (t > this.end) t = span > 0 ? this.start + ((t - this.start) % span) : this.start; // loop
      this.time = t;
      this.emit();
    }
    this.last = now;
    this.handle = requestAnimationFrame(this.tick);
  };

  private emit(): void {
    for (const fn of this.listeners) fn();
  }
}

/** Index of the last snapshot at or before t, and how far t is towards the next one. */
export function locateFrame(times: readonly number[], t: number): { index: number; fraction: number } {
  const last = times.length - 1;
  if (last < 0 || t <= times[0]) return { index: 0, fraction: 0 };
  if (t >= times[last]) return { index: last, fraction: 0 };
  let lo = 0;
  let hi = last;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (times[mid] <= t) lo = mid;
    else hi = mid;
  }
  const gap = times[lo + 1] - times[lo];
  return { index: lo, fraction: gap > 0 ? (t - times[lo]) / gap : 0 };
}
