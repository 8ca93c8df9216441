// The bench's sections and its report. `run.ts` is the command; the smoke test
// calls the same functions at tiny sizes so they can't rot.
import os from 'node:os';
import { benchDirect, type DirectFigures } from './direct';
import { benchTree, benchYukawaTree, type TreeFigure, type YukawaTreeFigure } from './tree';
import { benchQumond, qumondKey, type QumondFigure } from './qumond';
import { benchThreads, type ThreadFigures } from './threads';
import { benchEndToEnd, benchSnapshots, type EndToEndFigures, type SnapshotFigures, type StackTarget } from './stack';
import type { ClientFigures } from './client';

export interface PureSizes {
  direct: { n: number; repeats: number; drift: { n: number; steps: number } };
  tree: { sizes: number[]; thetas: number[]; sampleTargets: number; repeats: number };
  yukawaTree: { n: number; theta: number; alpha: number; lambda_kpc: number; repeats: number };
  threads: { n: number; steps: number; treeN: number; treeSteps: number; gridN: number; grid: ThreadFigures['grid']; gridSteps: number; threads: number; spinIterations: number; repeats: number };
  qumond: { grids: QumondFigure['grid'][]; sizes: number[]; repeats: number };
}

export const FULL_SIZES: PureSizes = {
  direct: { n: 4096, repeats: 7, drift: { n: 1000, steps: 400 } },
  tree: { sizes: [1_000, 3_000, 10_000, 100_000, 300_000], thetas: [0.5, 0.7], sampleTargets: 1_000, repeats: 3 },
  yukawaTree: { n: 20_000, theta: 0.6, alpha: 0.3, lambda_kpc: 3, repeats: 2 },
  threads: { n: 6_000, steps: 25, treeN: 20_000, treeSteps: 40, gridN: 2_000, grid: 64, gridSteps: 6, threads: 2, spinIterations: 2e8, repeats: 3 },
  qumond: { grids: [64, 128], sizes: [10_000, 100_000], repeats: 2 },
};

export interface PureReport {
  directSum: DirectFigures;
  tree: TreeFigure[];
  yukawaTree: YukawaTreeFigure;
  threads: ThreadFigures;
  qumond: QumondFigure[];
}

export interface StackReport {
  e2e: EndToEndFigures;
  snapshot: SnapshotFigures;
  client: ClientFigures;
}

export type BenchReport = Partial<PureReport> & Partial<StackReport> & {
  machine: { date: string; cpus: number; cpuModel: string; node: string; loadAverage: number[] };
};

const log = (msg: string) => process.stderr.write(`[bench] ${msg}\n`);

export async function benchPure(sizes: PureSizes = FULL_SIZES): Promise<PureReport> {
  log(`direct sum at N = ${sizes.direct.n}`);
  const directSum = benchDirect(sizes.direct);
  log(`tree at N = ${sizes.tree.sizes.join(', ')}`);
  const tree = benchTree(sizes.tree);
  log(`Yukawa tree at N = ${sizes.yukawaTree.n}, JS loops and WebAssembly`);
  const yukawaTree = benchYukawaTree(sizes.yukawaTree);
  log(`threads: one ${sizes.threads.n}-particle direct, one ${sizes.threads.treeN}-particle tree and one ${sizes.threads.gridN}-particle field-form MOND run (grid ${sizes.threads.grid}^3) on 1 and ${sizes.threads.threads} threads`);
  const threads = await benchThreads(sizes.threads);
  log(`field-form MOND: grid ${sizes.qumond.grids.join(', ')} at N = ${sizes.qumond.sizes.join(', ')}`);
  const qumond = benchQumond(sizes.qumond);
  return { directSum, tree, yukawaTree, threads, qumond };
}

export async function benchStackSections(
  target: StackTarget,
  sizes: { particles: number; steps: number; bigParticles: number; bigSteps: number },
): Promise<Omit<StackReport, 'client'>> {
  log(`end to end: a ${sizes.particles}-particle, ${sizes.steps}-step disk run and a ${sizes.bigParticles}-particle, ${sizes.bigSteps}-step tree disk with bulge through the stack`);
  const e2e = await benchEndToEnd(target, sizes);
  const snapshot = await benchSnapshots(target, e2e.runId);
  return { e2e, snapshot };
}

export function machine(): BenchReport['machine'] {
  // The 1-, 5- and 15-minute load when the report is made: other work on the machine slows every figure.
  return { date: new Date().toISOString().slice(0, 10), cpus: os.cpus().length, cpuModel: os.cpus()[0]?.model ?? 'unknown', node: process.version, loadAverage: os.loadavg().map((l) => Math.round(l * 100) / 100) };
}

/** The JSON the issue asks for: every figure under its key; sections not measured are null. */
export function toJson(r: BenchReport): Record<string, unknown> {
  return {
    directSum: r.directSum ?? { interactionsPerSecond: null, referenceInteractionsPerSecond: null, ratio: null, nativeReferenceInteractionsPerSecond: null, maxRelativeDifference: null, energyDriftRatio: null },
    tree: r.tree ?? [],
    yukawaTree: r.yukawaTree ?? { jsMsPerStep: null, wasmMsPerStep: null, speedup: null },
    threads: r.threads ?? { speedup: null },
    ...Object.fromEntries((r.qumond ?? []).map((f) => [qumondKey(f), { msPerEval: f.msPerEval, pairMsPerEval: f.pairMsPerEval }])),
    e2e: r.e2e ?? { firstProgressMs: null, diskRunSeconds: null, bigDiskRunSeconds: null },
    snapshot: r.snapshot ?? { bytesPerParticle: null },
    client: r.client ?? { fps: null },
    machine: r.machine,
  };
}

const fmt = (v: number, digits = 3) => (Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-2 && v !== 0) ? v.toExponential(digits - 1) : v.toPrecision(digits));
const mark = (ok: boolean) => (ok ? 'ok' : 'MISSED');

/** The table: each figure with its target beside it. */
export function toTable(r: BenchReport): string {
  const rows: [string, string, string, string][] = [];
  const d = r.directSum;
  if (d) {
    const kernelName = d.kernel === 'wasm' ? 'WebAssembly SIMD' : 'JS (WebAssembly did not load)';
    rows.push([`direct sum N=${d.n}: engine kernel, ${kernelName}`, `${fmt(d.interactionsPerSecond / 1e6)} M pairs/s`, '', '']);
    rows.push([`direct sum N=${d.n}: engine's JS fallback (float64)`, `${fmt(d.jsInteractionsPerSecond / 1e6)} M pairs/s`, `differs from the plain loop by ${fmt(d.fallbackMaxRelativeDifference)}`, '']);
    rows.push([`direct sum N=${d.n}: plain reference loop`, `${fmt(d.referenceInteractionsPerSecond / 1e6)} M pairs/s`, '', '']);
    rows.push(['direct sum: engine / reference', fmt(d.ratio), '>= 1.0', mark(d.ratio >= 1)]);
    if (d.nativeReferenceInteractionsPerSecond !== null && d.nativeRatio !== null) {
      rows.push([`direct sum N=${d.n}: native C reference (${d.nativeNote})`, `${fmt(d.nativeReferenceInteractionsPerSecond / 1e6)} M pairs/s`, `differs from the plain loop by ${fmt(d.nativeMaxRelativeDifference ?? NaN)}`, '']);
      rows.push(['direct sum: engine / native C reference', fmt(d.nativeRatio), '>= 0.5', mark(d.nativeRatio >= 0.5)]);
    } else rows.push(['direct sum: native C reference', d.nativeNote, '', '']);
    rows.push(['direct sum: engine vs float64 plain loop, max relative difference', fmt(d.maxRelativeDifference), '<= 1e-6', mark(d.maxRelativeDifference <= 1e-6)]);
    rows.push([
      `direct sum: leapfrog Plummer N=${d.driftN}, ${d.driftSteps} steps, max energy drift engine / float64`,
      `${fmt(d.energyDriftEngine)} / ${fmt(d.energyDriftFloat64)} = ${fmt(d.energyDriftRatio, 4)}`,
      '1 within 10 %',
      mark(Math.abs(d.energyDriftRatio - 1) <= 0.1),
    ]);
  }
  const tree = r.tree ?? [];
  const perNlogN = (f: TreeFigure) => f.msPerStep / (f.n * Math.log2(f.n));
  for (const f of tree) {
    const sameTheta = tree.find((g) => g.theta === f.theta) ?? f;
    const growth = perNlogN(f) / perNlogN(sameTheta);
    rows.push([`tree N=${f.n} theta=${f.theta}: ms per step (CPU ms)`, `${fmt(f.msPerStep)} (${fmt(f.cpuMsPerStep)})`, `cost/(N log N) vs N=${sameTheta.n}: ${fmt(growth, 2)} (~1)`, mark(growth < 2)]);
    if (f.theta === 0.5 && f.n === 100_000) rows.push([`tree N=${f.n} theta=${f.theta}: ms per step, target`, fmt(f.msPerStep), '<= 600', mark(f.msPerStep <= 600)]);
    const errTarget = f.theta === 0.5 ? '<= 2e-4' : '';
    rows.push([`tree N=${f.n} theta=${f.theta}: median / p99 force error`, `${fmt(f.medianError)} / ${fmt(f.p99Error)}`, errTarget, f.theta === 0.5 ? mark(f.medianError <= 2e-4) : '']);
    if (f.directMsPerStep !== null && f.theta === 0.5) {
      const faster = f.cpuMsPerStep < (f.directCpuMsPerStep ?? 0);
      rows.push([`tree N=${f.n} theta=${f.theta} vs direct sum: CPU ms per step`, `${fmt(f.cpuMsPerStep)} vs ${fmt(f.directCpuMsPerStep ?? NaN)}`, 'tree faster from N = 3000', f.n >= 3_000 ? mark(faster) : '']);
    }
  }
  const y = r.yukawaTree;
  if (y) {
    const at = `tree Yukawa (α ${y.alpha}, λ ${y.lambda_kpc} kpc) N=${y.n} theta=${y.theta}`;
    rows.push([`${at}: ms per step (CPU ms), JS loops -> WebAssembly`, `${fmt(y.jsMsPerStep)} (${fmt(y.jsCpuMsPerStep)}) -> ${fmt(y.wasmMsPerStep)} (${fmt(y.wasmCpuMsPerStep)})`, `yukawaTree.speedup (CPU) ${fmt(y.speedup)}x`, '']);
    rows.push([`${at}: WebAssembly vs JS loops, max relative force difference`, fmt(y.maxRelativeDifference), '<= 5e-6 (tree.test.ts)', mark(y.maxRelativeDifference <= 5e-6)]);
  }
  const t = r.threads;
  if (t) {
    rows.push([`threads: ${t.n}-particle run, ${t.steps} steps, 1 -> ${t.threads} threads, best of ${t.repeats}`, `${fmt(t.singleSeconds)} s -> ${fmt(t.splitSeconds)} s`, t.identical ? 'bit-identical' : 'RESULTS DIFFER', mark(t.identical)]);
    rows.push(['threads: speed-up', `${fmt(t.speedup)}x`, '>= 1.7x', mark(t.speedup >= 1.7)]);
    rows.push([`threads: ${t.treeN}-particle tree run, ${t.treeSteps} steps, 1 -> ${t.threads} threads`, `${fmt(t.treeSingleSeconds)} s -> ${fmt(t.treeSplitSeconds)} s`, t.treeIdentical ? 'bit-identical' : 'RESULTS DIFFER', mark(t.treeIdentical)]);
    rows.push(['threads: tree speed-up', `${fmt(t.treeSpeedup)}x`, '>= 1.7x', mark(t.treeSpeedup >= 1.7)]);
    rows.push([`threads: ${t.gridN}-particle field-form MOND run, grid ${t.grid}^3, ${t.gridSteps} steps, 1 -> ${t.threads} threads`, `${fmt(t.gridSingleSeconds)} s -> ${fmt(t.gridSplitSeconds)} s`, t.gridIdentical ? 'bit-identical' : 'RESULTS DIFFER', mark(t.gridIdentical)]);
    rows.push(['threads: field-form grid speed-up', `${fmt(t.gridSpeedup)}x`, '>= 1.6x', mark(t.gridSpeedup >= 1.6)]);
    rows.push([`threads: tree build's serial part (root's octant sort) share of one evaluation at N=${t.treeN}`, fmt(t.treeBuildShare), `bounds the evaluation's speed-up at ${fmt(t.treeSpeedupBound)}x`, '']);
    rows.push([`threads: plain loop on ${t.threads} threads, same moment`, `${fmt(t.machineSpeedup)}x`, 'the most this machine gave', '']);
    const cpu = (v: number | null) => (v === null ? 'n/a' : `${fmt(v)}x`);
    rows.push(['threads: CPU-time speed-ups, direct / tree / field-form grid', `${cpu(t.cpuSpeedup)} / ${cpu(t.treeCpuSpeedup)} / ${cpu(t.gridCpuSpeedup)}`, 'one thread\'s CPU time over the busiest split thread\'s', '']);
  }
  for (const f of r.qumond ?? []) {
    rows.push([`field-form MOND grid=${f.grid}^3 N=${f.n}: ms per force evaluation`, fmt(f.msPerEval), `pair sum alone (tree, theta 0.7): ${fmt(f.pairMsPerEval)} ms`, '']);
  }
  if (r.e2e) {
    rows.push(['end to end: submit -> first progress', `${fmt(r.e2e.firstProgressMs)} ms`, '< 1000 ms', mark(r.e2e.firstProgressMs < 1000)]);
    rows.push([`end to end: ${r.e2e.particles}-particle ${r.e2e.steps}-step disk run`, `${fmt(r.e2e.diskRunSeconds)} s`, '< 10 s', mark(r.e2e.diskRunSeconds < 10)]);
    rows.push([`end to end: ${r.e2e.bigDiskParticles}-particle ${r.e2e.bigDiskSteps}-step tree disk with bulge`, `${fmt(r.e2e.bigDiskRunSeconds)} s`, '< 30 s', mark(r.e2e.bigDiskRunSeconds < 30)]);
  } else rows.push(['end to end', 'not measured (no stack)', '', '']);
  if (r.snapshot) rows.push([`snapshots on the wire: ${r.snapshot.frames} frames x ${r.snapshot.particles} particles`, `${fmt(r.snapshot.bytesPerParticle, 4)} bytes/particle`, '<= 8 (uint16 x, y, z + headers)', mark(r.snapshot.bytesPerParticle <= 8)]);
  if (r.client) rows.push([`client: animation at ${r.client.particles} particles`, `${fmt(r.client.fps)} fps`, '>= 50', mark(r.client.fps >= 50)]);
  const widths = [0, 1, 2, 3].map((k) => Math.max(...rows.map((row) => row[k].length)));
  const line = (row: string[]) => row.map((c, k) => c.padEnd(widths[k])).join('  ').trimEnd();
  const m = r.machine;
  return [`Infall bench, ${m.date}, ${m.cpus} cores (${m.cpuModel}), Node ${m.node}, load average ${m.loadAverage.join(' / ')} at the end`, line(['figure', 'measured', 'target', '']), ...rows.map(line)].join('\n');
}
