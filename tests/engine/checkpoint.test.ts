// A run carried on from a checkpoint gives the uninterrupted run's result, bit for bit.
import { runSimulation, type RunCheckpoint } from '../../shared/engine';
import { defaultRunSpec, type RunSpec } from '../../shared/spec';

const base = defaultRunSpec();
// 250 steps with samples every 7 and frames every 10, so checkpoints fall between samples too.
const spec: RunSpec = { ...base, model: { ...base.model, n: 120 } as RunSpec['model'], diagnosticsEvery: 7 };

test.each(['leapfrog', 'yoshida4', 'rk4'] as const)('%s: resuming from checkpoints taken every 37 steps reproduces the uninterrupted run exactly', (integrator) => {
  const s = { ...spec, integrator };
  const whole = runSimulation(s);
  const checkpoints: RunCheckpoint[] = [];
  runSimulation(s, { onCheckpoint: (c) => checkpoints.push(c), checkpointEvery: { steps: 37, ms: Infinity } });
  // Every 37 steps, plus one at the last step (the state an extension starts from).
  expect(checkpoints.map((c) => c.state.step)).toEqual([37, 74, 111, 148, 185, 222, 250]);

  for (const c of [checkpoints[0], checkpoints[3]]) {
    const resumed = runSimulation(s, { resumeFrom: c });
    // Same samples and frames, none twice, and the same summary (force evaluations included).
    expect(resumed.diagnostics).toEqual(whole.diagnostics);
    expect(resumed.snapshots).toEqual(whole.snapshots);
    expect(resumed.summary).toEqual(whole.summary);
    expect(resumed.rotationCurves).toEqual(whole.rotationCurves);
  }
  // The checkpoint handed out is a copy: resuming twice from it gives the same again.
  expect(runSimulation(s, { resumeFrom: checkpoints[3] }).snapshots).toEqual(whole.snapshots);
});

test('a finished run extended from its last checkpoint continues where it ended', () => {
  const short = { ...spec, duration_Myr: 30 }; // 150 steps
  let last: RunCheckpoint | undefined;
  runSimulation(short, { onCheckpoint: (c) => (last = c), checkpointEvery: { steps: Infinity, ms: Infinity } });
  expect(last!.state.step).toBe(150);
  const extended = runSimulation({ ...short, duration_Myr: 50 }, { resumeFrom: last });
  const whole = runSimulation(spec);
  expect(extended.summary.stepsCompleted).toBe(250);
  // The leapfrog state is a function of the step alone: the extended run's last frame is the long run's.
  expect(extended.snapshots[extended.snapshots.length - 1]).toEqual(whole.snapshots[whole.snapshots.length - 1]);
  // Its history keeps every earlier frame once, in order.
  const steps = extended.snapshots.map((f) => f.step);
  expect(new Set(steps).size).toBe(steps.length);
  expect(steps).toEqual([...steps].sort((a, b) => a - b));
});
