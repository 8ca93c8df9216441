import { act } from 'react';
import { ParticleView } from '../../components/ParticleView';
import { PlaybackControls } from '../../components/PlaybackControls';
import { backdrop, drawOrder, drawParticles, frameWindow, particlePath, pixelColor, scaleBarLength } from '../../components/particles';
import { Playhead } from '../../components/lib/playhead';
import type { SnapshotFrame } from '../../shared/api/snapshots';
import { componentColor } from '../../constants/theme';
import { press, render } from './support/render';

const frame = (time_Myr: number, xyz: number[]): SnapshotFrame => ({ step: time_Myr, time_Myr, positions: Float32Array.from(xyz) });

describe('particle path', () => {
  const win = { cx: 0, cy: 0, half: 10 };

  it('draws one square per visible particle on whole pixels', () => {
    const d = particlePath(Float32Array.from([0, 0, 0, 5, 5, 0]), null, 0, 'xy', win, 200, 2);
    expect(d).toBe('M100 100h2v2h-2zM150 50h2v2h-2z');
  });

  it('skips particles outside the window and pixels already drawn', () => {
    const d = particlePath(Float32Array.from([0, 0, 0, 0.01, -0.01, 0, 50, 0, 0]), null, 0, 'xy', win, 200, 2);
    expect(d.match(/M/g)).toHaveLength(1);
  });

  it('projects onto the chosen plane and blends towards the next snapshot', () => {
    const a = Float32Array.from([0, 0, -5]);
    const b = Float32Array.from([0, 0, 5]);
    expect(particlePath(a, b, 0.5, 'xz', win, 200, 2)).toBe('M100 100h2v2h-2z');
    expect(particlePath(a, b, 0, 'xz', win, 200, 2)).toBe('M100 150h2v2h-2z');
  });

  it('frames 99% of the particles, so one escaper does not shrink the view', () => {
    const xyz: number[] = [];
    for (let i = 0; i < 200; i++) xyz.push(Math.cos(i), Math.sin(i), 0);
    xyz.push(1000, 0, 0);
    const w = frameWindow([frame(0, xyz)], 'xy');
    expect(w.half).toBeLessThan(2);
    expect(scaleBarLength(w.half)).toBeGreaterThan(0);
  });
});

describe('canvas pixels', () => {
  const win = { cx: 0, cy: 0, half: 10 };

  it('packs a colour as the RGBA bytes of one ImageData pixel', () => {
    const px = new Uint32Array([pixelColor('#86B4FF')]);
    expect(Array.from(new Uint8Array(px.buffer))).toEqual([0x86, 0xb4, 0xff, 0xff]);
  });

  it("writes each particle's square in its component's colour, the halo under the rest", () => {
    const pixels = new Uint32Array(20 * 20);
    const component = Uint8Array.from([0, 1, 1]); // a disk particle and a halo particle on the same spot, another halo one apart
    const labels = ['disk', 'halo'];
    const order = drawOrder(component, labels);
    expect(Array.from(order)).toEqual([1, 2, 0]);
    const positions = Float32Array.from([0, 0, 0, 0, 0, 0, 5, 5, 0]);
    drawParticles(pixels, 20, positions, null, 0, 'xy', win, 2, order, component, Uint32Array.from([7, 9]));
    expect(pixels[10 * 20 + 10]).toBe(7); // the disk, drawn after the halo beneath it
    expect(pixels[11 * 20 + 11]).toBe(7);
    expect(pixels[5 * 20 + 15]).toBe(9);
    expect(pixels.filter((p) => p !== 0)).toHaveLength(8);
  });

  it('blends towards the next snapshot and leaves particles outside the view undrawn', () => {
    const pixels = new Uint32Array(20 * 20);
    const order = Uint32Array.from([0, 1]);
    const a = Float32Array.from([0, 0, 0, 50, 0, 0]);
    const b = Float32Array.from([0, 10, 0, 50, 0, 0]);
    drawParticles(pixels, 20, a, b, 0.5, 'xy', win, 1, order, new Uint8Array(2), Uint32Array.from([3]));
    expect(pixels[5 * 20 + 10]).toBe(3);
    expect(pixels.filter((p) => p !== 0)).toHaveLength(1);
  });

  it('has dashed centre lines on the ground', () => {
    const base = backdrop(16, 1, 2);
    expect(Array.from(base.subarray(8 * 16, 8 * 16 + 10))).toEqual([2, 2, 1, 1, 1, 1, 1, 1, 2, 2]);
    expect(base[8 + 16 * 9]).toBe(2);
    expect(base[3 * 16 + 3]).toBe(1);
  });
});

describe('ParticleView with its controls', () => {
  const frames = [frame(0, [0, 0, 0, 1, 0, 0]), frame(10, [0, 1, 0, 2, 0, 0]), frame(20, [0, 2, 0, 3, 0, 0])];

  it('steps through snapshots and redraws the particles', () => {
    const ph = new Playhead();
    act(() => ph.setTimes(frames.map((f) => f.time_Myr)));
    const { container, view } = render(
      <>
        <ParticleView frames={frames} playhead={ph} projection="xy" color="#fff" label="Test run" />
        <PlaybackControls playhead={ph} times={frames.map((f) => f.time_Myr)} projection="xy" onProjection={() => undefined} />
      </>,
    );
    const cloud = () => container.querySelector('[data-testid="particle-cloud"]')!.getAttribute('d');
    const before = cloud();
    expect(view.getByTestId('playhead-readout').textContent).toBe('t = 0.0 Myr · 1/3');
    press(view.getByLabelText('Next snapshot'));
    expect(view.getByTestId('playhead-readout').textContent).toBe('t = 10.0 Myr · 2/3');
    expect(cloud()).not.toBe(before);
    expect(view.getByLabelText('Test run: 2 particles projected on the xy plane, view 4.4 kpc across')).toBeTruthy();
  });

  it('draws each model part in its own colour with a legend of the parts', () => {
    const ph = new Playhead();
    act(() => ph.setTimes(frames.map((f) => f.time_Myr)));
    const parts = { labels: ['disk', 'bulge'], component: Uint8Array.from([0, 1]) };
    const { container, view } = render(<ParticleView frames={frames} parts={parts} playhead={ph} projection="xy" color="#fff" label="Test run" />);
    const fills = Array.from(container.querySelectorAll('path')).map((p) => p.getAttribute('fill'));
    expect(fills).toEqual([componentColor('disk', 0, 2, '#fff'), componentColor('bulge', 1, 2, '#fff')]);
    expect(new Set(fills).size).toBe(2);
    expect(view.getByTestId('particle-legend').textContent).toBe('disk · 1bulge · 1');
  });

  it('plays and pauses', () => {
    const ph = new Playhead();
    act(() => ph.setTimes([0, 10, 20]));
    const { view } = render(<PlaybackControls playhead={ph} times={[0, 10, 20]} projection="xy" onProjection={() => undefined} />);
    press(view.getByLabelText('Play animation'));
    expect(ph.playing).toBe(true);
    expect(view.getByLabelText('Pause animation')).toBeTruthy();
    press(view.getByLabelText('Pause animation'));
    expect(ph.playing).toBe(false);
  });
});
