// Threads: one large direct-sum run, one large tree run and one field-form MOND
// run through the worker's pool, each alone on one thread and then split across
// two, with the results compared bit for bit.
// Each is timed several times, alternating, and the fastest counts: on a shared
// machine the slow timings measure the neighbours (common benchmarking practice).
import fs from 'node:fs';
import { Worker } from 'node:worker_threads';
import { RunPool, SPLIT_MIN_PARTICLES } from '../../worker/pool';
import type { RunResult } from '../../shared/engine';
import type { RunSpec } from '../../shared/spec';
import { buildOctree, planOctree, treeFieldRange, treeWorkUnits } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { allocateAccelerations } from '../../shared/engine/state';
import { plummerParticles, plummerRun } from './specs';

export interface ThreadFigures {
  n: number;
  steps: number;
  threads: number;
  /** Timings of each, alternating; the fastest of each makes the speed-up. */
  repeats: number;
  singleSeconds: number;
  splitSeconds: number;
  speedup: number;
  /** Target chunks the helper threads computed in the split run: 0 would mean it was never split. */
  helperChunks: number;
  /** Same snapshots and energies from both: splitting must not change a bit. */
  identical: boolean;
  /**
   * Speed-up of a plain arithmetic loop on the same number of threads, measured
   * just before: what the machine can give right now (other work on it lowers
   * this, and the run's speed-up with it).
   */
  machineSpeedup: number;
  /** The same for a tree run (theta 0.5) of treeN particles. */
  treeN: number;
  treeSteps: number;
  treeSingleSeconds: number;
  treeSplitSeconds: number;
  treeSpeedup: number;
  treeHelperChunks: number;
  treeIdentical: boolean;
  /** The same for a field-form MOND run (direct pair sum) of gridN particles on a grid of `grid` nodes a side, where the grid's passes take most of the time. */
  gridN: number;
  grid: 32 | 64 | 128;
  gridSteps: number;
  gridSingleSeconds: number;
  gridSplitSeconds: number;
  gridSpeedup: number;
  gridHelperChunks: number;
  gridIdentical: boolean;
  /**
   * CPU time of the one-thread run over that of the busiest thread of the split run (Linux only,
   * from each thread's counters; null elsewhere): the speed-up two free cores would give if the
   * threads never waited on each other, whatever else the machine is doing meanwhile.
   */
  cpuSpeedup: number | null;
  treeCpuSpeedup: number | null;
  gridCpuSpeedup: number | null;
  /**
   * The part of one tree force evaluation of treeN particles that only the run's
   * thread does (sorting the particles by the root's octants, planOctree: the
   * octants' subtrees and the walk are split), as a share of the evaluation's CPU
   * time on one thread (best of 5); with the rest split perfectly it bounds the
   * speed-up of the evaluation on `threads` threads at 1 / (share + (1 - share) / threads).
   */
  treeBuildShare: number;
  treeSpeedupBound: number;
}

interface Split {
  singleSeconds: number;
  splitSeconds: number;
  speedup: number;
  helperChunks: number;
  identical: boolean;
  cpuSpeedup: number | null;
}

/** CPU seconds so far of each thread of this process (the pool's threads are among them); null without /proc. */
function threadCpuSeconds(): Map<string, number> | null {
  const hz = 100; // the kernel's USER_HZ on Linux
  try {
    const m = new Map<string, number>();
    for (const task of fs.readdirSync('/proc/self/task')) {
      const stat = fs.readFileSync(`/proc/self/task/${task}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      m.set(task, (Number(fields[11]) + Number(fields[12])) / hz); // utime + stime
    }
    return m;
  } catch {
    return null;
  }
}

// A fixed amount of arithmetic, the same in every thread; as source text so it runs without a loader,
// inside a function so the engine compiles the loop as it would any hot function.
const spinSource = (iterations: number) => `(() => { let s = 0; for (let i = 0; i < ${iterations}; i++) s += Math.sqrt(i); return s; })()`;

async function machineSpeedup(threads: number, iterations: number): Promise<number> {
  const source = spinSource(iterations);
  const spin = () => new Function(`return ${source}`)();
  let t = performance.now();
  spin();
  const one = performance.now() - t;
  t = performance.now();
  const others = Array.from({ length: threads - 1 }, () => new Promise((resolve, reject) => {
    const w = new Worker(`${source};`, { eval: true });
    w.once('exit', resolve).once('error', reject);
  }));
  spin();
  await Promise.all(others);
  return (threads * one) / (performance.now() - t);
}

async function warmUp(pool: RunPool, spec: RunSpec): Promise<void> {
  // A short split run first, so thread start-up and module loading stay out of the timing.
  const warm = pool.start(spec, () => undefined);
  await warm.result;
  await warm.helped;
}

async function timedRun(pool: RunPool, spec: RunSpec): Promise<{ seconds: number; result: RunResult; helped: number; cpu: { total: number; busiest: number } | null }> {
  const before = threadCpuSeconds();
  const t = performance.now();
  const handle = pool.start(spec, () => undefined);
  const result = await handle.result;
  const seconds = (performance.now() - t) / 1000;
  const after = threadCpuSeconds();
  const used = before && after ? [...after].map(([task, s]) => s - (before.get(task) ?? 0)) : null;
  const cpu = used ? { total: used.reduce((a, b) => a + b, 0), busiest: Math.max(...used) } : null;
  return { seconds, result, helped: await handle.helped, cpu };
}

function sameResults(a: RunResult, b: RunResult): boolean {
  const frames = (r: RunResult) => r.snapshots.map((s) => Array.from(s.positions));
  const energies = (r: RunResult) => r.diagnostics.map((d) => d.totalEnergy);
  return JSON.stringify(frames(a)) === JSON.stringify(frames(b)) && JSON.stringify(energies(a)) === JSON.stringify(energies(b));
}

/** One spec timed on both pools, alternating, best of `repeats` each. */
async function compare(single: RunPool, split: RunPool, spec: RunSpec, warm: RunSpec, repeats: number): Promise<Split> {
  await warmUp(single, warm);
  await warmUp(split, warm);
  type Timed = Awaited<ReturnType<typeof timedRun>>;
  const ones: Timed[] = [], manys: Timed[] = [];
  for (let r = 0; r < repeats; r++) {
    ones.push(await timedRun(single, spec));
    manys.push(await timedRun(split, spec));
  }
  const singleSeconds = Math.min(...ones.map((o) => o.seconds));
  const splitSeconds = Math.min(...manys.map((m) => m.seconds));
  return {
    singleSeconds,
    splitSeconds,
    speedup: singleSeconds / splitSeconds,
    helperChunks: Math.min(...manys.map((m) => m.helped)),
    identical: manys.every((m) => sameResults(ones[0].result, m.result)) && ones.every((o) => sameResults(ones[0].result, o.result)),
    cpuSpeedup: ones.every((o) => o.cpu) && manys.every((m) => m.cpu) ? Math.min(...ones.map((o) => o.cpu!.total)) / Math.min(...manys.map((m) => m.cpu!.busiest)) : null,
  };
}

/** CPU ms of the fastest of `repeats` calls. */
function bestCpuMs(repeats: number, f: () => void): number {
  let best = Infinity;
  for (let r = 0; r < repeats; r++) {
    const c = process.cpuUsage();
    f();
    best = Math.min(best, process.cpuUsage(c).user / 1000);
  }
  return best;
}

function treeBuildShare(n: number): number {
  const p = plummerParticles(n), kernel = newtonKernel(0.05), out = allocateAccelerations(n);
  const order = new Uint32Array(n);
  const plan = bestCpuMs(5, () => planOctree(p, order));
  const build = bestCpuMs(5, () => buildOctree(p));
  const tree = buildOctree(p);
  const walk = bestCpuMs(5, () => treeFieldRange(tree, p, p, kernel, 0.5, 0, treeWorkUnits(tree, p, p), out));
  return plan / (build + walk);
}

export async function benchThreads({ n = 6_000, steps = 40, treeN = 20_000, treeSteps = 40, gridN = 2_000, grid = 64 as ThreadFigures['grid'], gridSteps = 6, threads = 2, spinIterations = 2e8, repeats = 3 } = {}): Promise<ThreadFigures> {
  const capacity = await machineSpeedup(threads, spinIterations);
  const single = new RunPool(1);
  const split = new RunPool(threads);
  const tree = { solver: { kind: 'tree' as const, theta: 0.5 } };
  try {
    const d = await compare(single, split, plummerRun(n, steps), plummerRun(Math.max(n, SPLIT_MIN_PARTICLES), 2), repeats);
    const t = await compare(single, split, plummerRun(treeN, treeSteps, tree), plummerRun(Math.max(treeN, SPLIT_MIN_PARTICLES), 1, tree), repeats);
    const qumond = { law: { kind: 'qumond' as const, interpolation: 'simple' as const, a0_m_s2: 1.2e-10, grid } };
    const g = await compare(single, split, plummerRun(gridN, gridSteps, qumond), plummerRun(gridN, 1, qumond), repeats);
    const share = treeBuildShare(treeN);
    return {
      n,
      steps,
      threads,
      repeats,
      ...d,
      machineSpeedup: capacity,
      treeN,
      treeSteps,
      treeSingleSeconds: t.singleSeconds,
      treeSplitSeconds: t.splitSeconds,
      treeSpeedup: t.speedup,
      treeHelperChunks: t.helperChunks,
      treeIdentical: t.identical,
      gridN,
      grid,
      gridSteps,
      gridSingleSeconds: g.singleSeconds,
      gridSplitSeconds: g.splitSeconds,
      gridSpeedup: g.speedup,
      gridHelperChunks: g.helperChunks,
      gridIdentical: g.identical,
      treeCpuSpeedup: t.cpuSpeedup,
      gridCpuSpeedup: g.cpuSpeedup,
      treeBuildShare: share,
      treeSpeedupBound: 1 / (share + (1 - share) / threads),
    };
  } finally {
    await Promise.all([single.close(), split.close()]);
  }
}
