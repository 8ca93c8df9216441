import { act } from 'react';
import { ParticleView } from '../../components/ParticleView';
import { PlaybackControls } from '../../components/PlaybackControls';
import { frameWindow, particlePath, scaleBarLength } from '../../components/particles';
import { Playhead } from '../../hooks/playback';
import type { SnapshotFrame } from '../../shared/api/snapshots';
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
