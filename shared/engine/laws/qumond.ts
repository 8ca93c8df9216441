import { z } from 'zod';
import {
  depositMass, divergenceLines, KERNEL_PASSES, interpolateVectorsCubic, IsolatedPoisson, kernelLength, negativeGradientLines, nodeLines, poissonWorkLength,
  type GridGeometry, type GridThreads, type GridVectors,
} from '../solvers/grid';
import { newtonKernel } from './newton';
import type { Points, Sources } from '../state';
import { accelFromSI, G } from '../units';
import { mondLaw, mondNu } from './mond';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';
import type { EngineWarning } from '../timescales';

const { hypot, log10, sqrt } = Math;

const fieldComponent = z.number().min(-1e-8).max(1e-8);

/**
 * Node counts per side the grid offers: powers of two (the FFT needs them). The quota's cost
 * estimate counts the grid (gridInteractions in shared/spec/runSpec.ts), so 256 fits only the
 * larger daily budgets; it also needs 1.9 GB of memory per run (see phantomGridLengths).
 */
export const QUMOND_GRID_SIZES = [32, 64, 128, 256] as const;

const schema = z
  .object({
    kind: z.literal('qumond'),
    interpolation: mondLaw.schema.shape.interpolation,
    a0_m_s2: mondLaw.schema.shape.a0_m_s2,
    externalField_m_s2: z
      .tuple([fieldComponent, fieldComponent, fieldComponent])
      .optional()
      .describe('constant external Newtonian field (x, y, z) in m/s^2, each component within +-1e-8; none means an isolated system')
      .meta({ title: 'External field', itemTitles: ['x', 'y', 'z'], absent: 'none (isolated)' }),
    grid: z
      .literal(QUMOND_GRID_SIZES)
      .default(64)
      .describe('grid nodes per side for the phantom field; memory per run about 30 MB at 64, 240 MB at 128, 1.9 GB at 256, and the quota counts the grid\'s work')
      .meta({ title: 'Grid nodes per side', optionLabels: Object.fromEntries(QUMOND_GRID_SIZES.map((g) => [g, `${g}³`])) }),
    box_kpc: z
      .number()
      .positive()
      .max(1e5)
      .optional()
      .describe('side of the cubic grid, centred on the initial centre of mass; default 2.5 times the initial distance of the farthest particle')
      .meta({ title: 'Grid box side', absent: '2.5 × the farthest particle’s distance' }),
  })
  .describe('MOND, quasi-linear field form (QUMOND, Milgrom 2010): Newtonian pair forces plus a phantom field solved on a grid');

export type QumondParams = z.infer<typeof schema>;

const LABELS: Record<QumondParams['interpolation'], string> = {
  simple: 'QUMOND (simple ν)',
  standard: 'QUMOND (standard ν)',
  rar: 'QUMOND (RAR ν)',
};

const info = (p: QumondParams): LawInfo => ({
  kind: 'qumond',
  label: p.externalField_m_s2 ? `${LABELS[p.interpolation]}, external field` : LABELS[p.interpolation],
  conservesEnergy: true,
  conservesMomentum: true,
  conservesAngularMomentum: false,
  hasPotential: true,
  validity:
    'The field equations of MOND in their quasi-linear form, for any geometry inside the grid box. The field form\'s departure from the algebraic form (which it equals in spherical symmetry) is smoothed on the grid spacing (box / (grid - 1)); particles outside the ball inscribed in the grid get the algebraic form instead. A constant external field stands for a distant host; tides are not included.',
  notes:
    'Newtonian part from the pairwise sum (exact momentum balance with the direct solver). Phantom part: the algebraic one, (ν − 1) g_N from each particle\'s own pairwise g_N, plus the correction that makes it curl-free, from two isolated FFT Poisson solves on the grid (which projects only the non-spherical rest). The net force left (the algebraic part\'s, whose pulls between particles closer than a cell are not equal and opposite, and the grid\'s) is removed each evaluation, so total momentum is conserved; a bound group smaller than a cell can still push itself, as under the algebraic form. Energy (QUMOND has a potential) is the pair energy plus the grid\'s phantom energy; its drift includes grid error. Angular momentum is not exactly conserved on a cubic grid. Accuracy, measured: a resolved sphere within 0.15% of the algebraic form from 1 grid cell from the centre; around a mass smaller than a cell, within 3% from 2 cells and 1% from 5.',
});

// --- Phantom energy density ------------------------------------------------
// The QUMOND potential energy is -(a0^2 / 8 pi G) * integral of Q(|g_N|^2 / a0^2)
// with dQ/dz = nu(sqrt z) (Milgrom 2010). The pair sum supplies the Newtonian
// part Q = z; the grid integrates the rest, P(y) = Q(y^2) - y^2 with
// dP/dy = 2 y (nu(y) - 1), tabulated once per interpolating function.

const LOG_Y_MIN = -8, LOG_Y_MAX = 8, STEPS_PER_DECADE = 100;
const tables = new Map<QumondParams['interpolation'], Float64Array>();

const dPdy = (interp: QumondParams['interpolation'], y: number): number => 2 * y * (mondNu(interp, y) - 1);

function tableFor(interp: QumondParams['interpolation']): Float64Array {
  let t = tables.get(interp);
  if (t) return t;
  const count = (LOG_Y_MAX - LOG_Y_MIN) * STEPS_PER_DECADE + 1;
  t = new Float64Array(count);
  // Below y = 1e-8 every offered nu is y^(-1/2) to leading order, so P = (4/3) y^(3/2).
  t[0] = (4 / 3) * 10 ** (1.5 * LOG_Y_MIN);
  const dl = Math.LN10 / STEPS_PER_DECADE;
  for (let k = 1; k < count; k++) {
    // Simpson's rule in ln y over each step, four panels: dP = y dP/dy d(ln y).
    const l0 = (LOG_Y_MIN + (k - 1) / STEPS_PER_DECADE) * Math.LN10;
    let s = 0;
    for (let q = 0; q <= 4; q++) {
      const y = Math.exp(l0 + (q * dl) / 4);
      s += (q === 0 || q === 4 ? 1 : q % 2 ? 4 : 2) * y * dPdy(interp, y);
    }
    t[k] = t[k - 1] + (s * dl) / 12;
  }
  tables.set(interp, t);
  return t;
}

/** P(y) = Q(y^2) - y^2 by cubic Hermite interpolation of the table (slopes exact). */
export function phantomEnergyDensity(interp: QumondParams['interpolation'], y: number): number {
  if (y <= 0) return 0;
  const t = tableFor(interp);
  const u = (log10(y) - LOG_Y_MIN) * STEPS_PER_DECADE;
  if (u < 0) return (4 / 3) * y * sqrt(y);
  const last = t.length - 1;
  if (u >= last) {
    const yMax = 10 ** LOG_Y_MAX;
    return t[last] + (y - yMax) * dPdy(interp, yMax);
  }
  const k = Math.floor(u);
  const ya = 10 ** (LOG_Y_MIN + k / STEPS_PER_DECADE), yb = 10 ** (LOG_Y_MIN + (k + 1) / STEPS_PER_DECADE);
  const d = yb - ya, s = (y - ya) / d;
  const h00 = (1 + 2 * s) * (1 - s) * (1 - s), h10 = s * (1 - s) * (1 - s), h01 = s * s * (3 - 2 * s), h11 = s * s * (s - 1);
  return h00 * t[k] + h10 * d * dPdy(interp, ya) + h01 * t[k + 1] + h11 * d * dPdy(interp, yb);
}

// --- The grid ----------------------------------------------------------------

/**
 * Default grid: a cube centred on the centre of mass whose inscribed ball (where
 * the phantom field is solved) holds every source with a quarter of its radius to spare.
 */
export function defaultGridBox(src: Sources): { side_kpc: number; cx: number; cy: number; cz: number } {
  let M = 0, cx = 0, cy = 0, cz = 0;
  const n = src.m.length;
  for (let i = 0; i < n; i++) {
    const m = src.m[i];
    M += m; cx += m * src.x[i]; cy += m * src.y[i]; cz += m * src.z[i];
  }
  cx /= M; cy /= M; cz /= M;
  let rMax = 0;
  for (let i = 0; i < n; i++) rMax = Math.max(rMax, hypot(src.x[i] - cx, src.y[i] - cy, src.z[i] - cz));
  return { side_kpc: 2.5 * (rMax || 1), cx, cy, cz };
}

/** The grid a run will use: its box (from the initial particles unless set), spacing and ball radius. */
function gridGeometryFor(params: QumondParams, initial: Sources) {
  const box = defaultGridBox(initial);
  if (params.box_kpc) box.side_kpc = params.box_kpc;
  const h = box.side_kpc / (params.grid - 1);
  return { box, h, ballRadius_kpc: ((params.grid - 1) / 2 - 1) * h };
}

/** What the precheck says about a field-form run's grid, from the run's initial particles. */
export function qumondGridNotes(params: QumondParams, initial: Sources, halfMassRadius_kpc: number): EngineWarning[] {
  const notes: EngineWarning[] = [];
  const { box, h, ballRadius_kpc } = gridGeometryFor(params, initial);
  if (h > 0.5 * halfMassRadius_kpc) {
    notes.push({
      code: 'grid-coarse',
      severity: 'warning',
      message: `the grid spacing ${h.toPrecision(3)} kpc is more than half the half-mass radius (${halfMassRadius_kpc.toPrecision(3)} kpc): the field form's departure from the algebraic one (in flattened or lopsided systems) is smoothed over the system's own structure; use a smaller box_kpc or a larger grid`,
      source: 'this engine (tests/engine/qumond.test.ts)',
    });
  }
  if (params.grid >= 256) {
    notes.push({
      code: 'grid-large',
      severity: 'info',
      message: `a ${params.grid}^3 grid holds about ${(phantomGridBytes(params.grid) / 1e9).toFixed(1)} GB while the run computes, and one force evaluation takes about 30 s on one thread of the reference machine (14 s per grid solve, two per evaluation); 128 takes 240 MB and under 4 s`,
      source: 'this engine (README, field-form MOND: cost)',
    });
  }
  let outside = 0;
  for (let i = 0; i < initial.m.length; i++) {
    if (hypot(initial.x[i] - box.cx, initial.y[i] - box.cy, initial.z[i] - box.cz) > ballRadius_kpc) outside++;
  }
  if (outside > 0) {
    notes.push({
      code: 'outside-grid',
      severity: 'warning',
      message: `${outside} particles start outside the grid's ball (radius ${ballRadius_kpc.toPrecision(3)} kpc): they get the algebraic form, and momentum is then not exactly conserved`,
      source: 'this engine',
    });
  }
  return notes;
}

/**
 * The radial table of the bracket's spherical part (see `PhantomGrid.sphericalPart`): a head
 * (centre x, y, z, and 1 when the part is in use), then the pull at every quarter node spacing from
 * the centre out to the grid's full diagonal, so every node finds its radius in it.
 */
const SPHERE_HEAD = 4;
const STEPS_PER_CELL = 4;
const radialSteps = (n: number): number => Math.ceil(STEPS_PER_CELL * Math.sqrt(3) * (n - 1)) + 2;

/** What any thread needs to build its view of a run's phantom grid: plain data. */
export interface PhantomSetup {
  params: QumondParams;
  box: { side_kpc: number; cx: number; cy: number; cz: number };
  softening_kpc: number;
}

/**
 * Lengths of a phantom grid's working arrays: node masses, potential, g_N (x, y, z), g_P (x, y, z),
 * the spherical part's radial table, the Poisson work array, the plain kernel's transform and, with softening, the softened one.
 * In bytes, with softening: 30 MB at 64 nodes a side, 240 MB at 128, 1.9 GB at 256 (measured).
 */
export function phantomGridLengths({ params, softening_kpc }: PhantomSetup): number[] {
  const n = params.grid, nodes = n * n * n;
  return [...Array(8).fill(nodes), SPHERE_HEAD + radialSteps(n), poissonWorkLength(n), kernelLength(n), ...(softening_kpc > 0 ? [kernelLength(n)] : [])];
}

/** Bytes of a grid's working arrays, with softening. */
const phantomGridBytes = (n: number): number => 8 * phantomGridLengths({ params: { grid: n } as QumondParams, box: { side_kpc: 1, cx: 0, cy: 0, cz: 0 }, softening_kpc: 1 }).reduce((a, b) => a + b, 0);

/**
 * The passes of a grid evaluation, a barrier after each: the first Poisson solve (5 passes), g_N by
 * differences, the bracket, its divergence into phantom mass, the second solve (5 passes), g_P;
 * `energy` sums the phantom energy density line by line after the first three steps. The kernels'
 * transforms (5 passes each) are made once, when the grid is set up.
 */
const PASS = { softSolve: 0, gradientN: 5, bracket: 6, divergence: 7, plainSolve: 8, gradientP: 13, energy: 14, plainKernel: 15, softKernel: 20, end: 25 } as const;

/**
 * How the field is split: the Newtonian field g_N comes from the run's pair
 * solver (direct or tree), exact down to the softening length. The phantom
 * field g_P = g - g_N obeys
 *   div g_P = div w,  w = (nu(|g_N + g_e| / a0) - 1)(g_N + g_e) - (nu(|g_e| / a0) - 1) g_e
 * (QUMOND, Milgrom 2010, with the external field g_e's own uniform MOND field
 * taken out: the system falls freely with it, so particles feel only the
 * difference), so g_P is the curl-free part of w: w itself, the algebraic
 * form's phantom field, plus a correction c = g_P - w that takes away w's curl.
 * Each target gets w from its own pair-sum g_N, exact to the softening length
 * as in the algebraic form, and c from the grid, where c is smooth: it
 * vanishes in spherical symmetry and differs from zero where the system is
 * flattened or lopsided. The grid makes c from w less its spherical part w_s
 * (see `sphericalPart`; c is the same for both, w_s having no curl): cloud-in-
 * cell deposit, an isolated Poisson solve for the grid's Phi_N, g_N by
 * differences, the bracket w - w_s and its divergence, a second isolated
 * solve for Phi_P, c = -grad(Phi_P) - (w - w_s) by differences, and tricubic
 * interpolation of c to the targets. The bracket vanishes far from the
 * system, so the zero-padded solve suits it.
 *
 * Why: g_P itself bends on the scale of a cell in the core of a sphere (it
 * goes as sqrt(r) in deep MOND), and a grid carrying all of it flattens it
 * there (differences, interpolation and the deposit's smoothing of g_N: 3%
 * short at 2 cells from the centre, 12% at 1, measured). Split this way a
 * resolved sphere keeps within 0.15% of the algebraic form from 1 cell (they
 * coincide in spherical symmetry), and the in-plane pull of the test disk at
 * 64^3 is within 3% of its value at 128^3 (measured, tests/engine/qumond.test.ts,
 * diskFieldForm.test.ts). The net force left is removed below.
 */
export class PhantomGrid {
  readonly geo: GridGeometry;
  private readonly poisson: IsolatedPoisson;
  /** Transform of the plain kernel, and of the pair sum's softening on the grid so the phantom part follows the same softened g_N. */
  private readonly plain: Float64Array;
  private readonly softened: Float64Array;
  private readonly mass: Float64Array;
  private readonly phi: Float64Array;
  /** The grid's g_N, overwritten by the bracket w once that is formed. */
  private readonly gN: GridVectors;
  /** After `solve`, what the grid adds at the nodes to the algebraic phantom field (w) to make the field form's. */
  readonly gP: GridVectors;
  /** The spherical part's centre, flag and radial table of pulls (see SPHERE_HEAD). */
  private readonly sphere: Float64Array;
  /** The run thread's shells of nodes (count, sum of radii, sum of inward g_N / r), for the radial table. */
  private shells?: { count: Float64Array; r: Float64Array; pullPerR: Float64Array };
  private readonly a0: number;
  private readonly ge: [number, number, number];
  private readonly nuE: number;
  private readonly p: QumondParams;
  /** The pair sum's softening in node spacings. */
  private readonly softening: number;

  /**
   * The grid of a run, in the run's thread: its working arrays come from `threads` when they
   * have room (and its passes are then shared with them), else from this thread.
   */
  static create(setup: PhantomSetup, threads?: GridThreads): PhantomGrid {
    const shared = threads?.open(setup, phantomGridLengths(setup));
    return new PhantomGrid(setup, shared ?? phantomGridLengths(setup).map((l) => new Float64Array(l)), shared ? threads : undefined, true);
  }

  /** Another thread's view of a grid whose run thread published `setup` and filled `arrays` (kernels included). */
  static view(setup: PhantomSetup, arrays: Float64Array[]): PhantomGrid {
    return new PhantomGrid(setup, arrays, undefined, false);
  }

  private constructor(setup: PhantomSetup, arrays: Float64Array[], private readonly threads: GridThreads | undefined, fillKernels: boolean) {
    const { params: p, box, softening_kpc } = setup;
    const n = p.grid;
    const h = box.side_kpc / (n - 1);
    this.p = p;
    this.geo = { n, h, x0: box.cx - box.side_kpc / 2, y0: box.cy - box.side_kpc / 2, z0: box.cz - box.side_kpc / 2 };
    const [mass, phi, gNx, gNy, gNz, gPx, gPy, gPz, sphere, work, plain, softened] = arrays;
    this.mass = mass; this.phi = phi; this.sphere = sphere;
    this.gN = { x: gNx, y: gNy, z: gNz };
    this.gP = { x: gPx, y: gPy, z: gPz };
    this.poisson = new IsolatedPoisson(n, work);
    this.plain = plain;
    this.softened = softened ?? plain;
    this.softening = softening_kpc / h;
    this.a0 = accelFromSI(p.a0_m_s2);
    const e = p.externalField_m_s2 ?? [0, 0, 0];
    this.ge = [accelFromSI(e[0]), accelFromSI(e[1]), accelFromSI(e[2])];
    const geMag = hypot(...this.ge);
    this.nuE = geMag > 0 ? mondNu(p.interpolation, geMag / this.a0) : 1;
    if (fillKernels) {
      for (let k = 0; k < KERNEL_PASSES; k++) this.run(PASS.plainKernel + k);
      if (softened) for (let k = 0; k < KERNEL_PASSES; k++) this.run(PASS.softKernel + k);
    }
  }

  /** Units of a pass: lines of a transform or lines of nodes. */
  private count(pass: number): number {
    if (pass >= PASS.plainKernel) return (this.geo.n + 1) ** 2;
    if (pass < PASS.gradientN) return this.poisson.lines(pass - PASS.softSolve);
    if (pass >= PASS.plainSolve && pass < PASS.gradientP) return this.poisson.lines(pass - PASS.plainSolve);
    return nodeLines(this.geo);
  }

  /** Runs a whole pass, across the threads when there are any. */
  private run(pass: number): void {
    const count = this.count(pass);
    if (this.threads) this.threads.run(pass, count);
    else this.range(pass, 0, count);
  }

  /** Units [from, to) of a pass (see PASS); whichever thread computes a unit, it gets the same bits. */
  range(pass: number, from: number, to: number): void {
    const { geo, mass, phi } = this;
    if (pass < PASS.gradientN) this.poisson.pass(pass - PASS.softSolve, mass, geo.h, phi, this.softened, from, to);
    else if (pass === PASS.gradientN) negativeGradientLines(geo, phi, this.gN, from, to);
    else if (pass === PASS.bracket) this.bracketLines(from, to);
    else if (pass === PASS.divergence) this.phantomMassLines(from, to);
    else if (pass < PASS.gradientP) this.poisson.pass(pass - PASS.plainSolve, mass, geo.h, phi, this.plain, from, to);
    else if (pass === PASS.gradientP) this.correctionLines(from, to);
    else if (pass === PASS.energy) this.energyLines(from, to);
    // The phantom masses are node values, not deposited: the plain kernel divides out no window.
    else if (pass < PASS.softKernel) this.poisson.kernelPass(pass - PASS.plainKernel, 0, 0, this.plain, from, to);
    else if (pass < PASS.end) this.poisson.kernelPass(pass - PASS.softKernel, this.softening, 1, this.softened, from, to);
    else throw new Error(`no grid pass ${pass}`);
  }

  /** Grid g_N from the sources; `inside` flags the sources that lie in the grid. */
  newtonian(src: Sources, inside: Uint8Array): void {
    depositMass(this.geo, src, this.mass, inside);
    for (let pass = PASS.softSolve; pass <= PASS.gradientN; pass++) this.run(pass);
  }

  /** The grid's correction to the algebraic phantom field at the nodes, from the sources (see `gP`). */
  solve(src: Sources, inside: Uint8Array): void {
    this.newtonian(src, inside);
    this.sphericalPart(src, inside);
    for (let pass = PASS.bracket; pass <= PASS.gradientP; pass++) this.run(pass);
  }

  /**
   * The bracket's spherical part about the sources' centre of mass: w_s = (nu(g_s / a0) - 1) g_s, where
   * g_s(r) is the grid's own g_N averaged over spheres about that centre (node by node into quarter-cell
   * shells, g_N / r between shells' mean radii, so a uniform core's g_N, proportional to r, is exact).
   * A radial field has no curl, so its phantom field is itself, exactly: the grid then projects only
   * what is not spherical, and its error near a steep centre (the phantom field goes as sqrt(r) in a
   * deep-MOND core, which differences and interpolation flatten) leaves the spherical part untouched.
   * Taken from the grid's g_N rather than from the particles, it has the same cusp as the grid's
   * bracket, so none is left in the remainder. Tabulated here in this thread for every thread's bracket
   * pass. With an external field the bracket is radial about no point, and the grid carries it all.
   */
  private sphericalPart(src: Sources, inside: Uint8Array): void {
    const t = this.sphere, steps = t.length - SPHERE_HEAD;
    t.fill(0);
    if (this.ge[0] !== 0 || this.ge[1] !== 0 || this.ge[2] !== 0) return;
    let M = 0, cx = 0, cy = 0, cz = 0;
    for (let i = 0; i < src.m.length; i++) {
      if (!inside[i]) continue;
      const m = src.m[i];
      M += m; cx += m * src.x[i]; cy += m * src.y[i]; cz += m * src.z[i];
    }
    if (!(M > 0)) return;
    cx /= M; cy /= M; cz /= M;
    const { n, h, x0, y0, z0 } = this.geo, { gN } = this, perKpc = STEPS_PER_CELL / h;
    this.shells ??= { count: new Float64Array(steps), r: new Float64Array(steps), pullPerR: new Float64Array(steps) };
    const { count, r: sumR, pullPerR } = this.shells;
    count.fill(0); sumR.fill(0); pullPerR.fill(0);
    for (let i = 0, q = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        for (let k = 0; k < n; k++, q++) {
          const dx = x0 + i * h - cx, dy = y0 + j * h - cy, dz = z0 + k * h - cz;
          const r2 = dx * dx + dy * dy + dz * dz;
          if (r2 === 0) continue;
          const r = sqrt(r2), b = Math.min(Math.floor(r * perKpc), steps - 1);
          count[b]++; sumR[b] += r;
          pullPerR[b] -= (gN.x[q] * dx + gN.y[q] * dy + gN.z[q] * dz) / r2;
        }
      }
    }
    // Each step's pull, linear in r between the mean radii of the shells around it (flat in g_N / r inside the first).
    let below = -1;
    for (let b = 0, k = 0; b <= steps; b++) {
      if (b < steps && count[b] === 0) continue;
      const rb = b < steps ? sumR[b] / count[b] : Infinity, fb = b < steps ? pullPerR[b] / count[b] : 0;
      const ra = below < 0 ? 0 : sumR[below] / count[below], fa = below < 0 ? fb : pullPerR[below] / count[below];
      for (; k < steps && (k / perKpc <= rb || b === steps); k++) {
        const r = k / perKpc;
        t[SPHERE_HEAD + k] = r * (b === steps ? fa : fa + ((fb - fa) * (r - ra)) / (rb - ra || 1));
      }
      below = b;
    }
    t[0] = cx; t[1] = cy; t[2] = cz; t[3] = 1;
  }

  /** The bracket w of the phantom source less its spherical part, formed in place of g_N, node by node. */
  private bracketLines(from: number, to: number): void {
    const { gN, a0, ge, nuE, p, sphere } = this;
    const w = gN;
    const [ex, ey, ez] = ge;
    const { n, h, x0, y0, z0 } = this.geo;
    const spherical = sphere[3] === 1, cx = sphere[0], cy = sphere[1], cz = sphere[2];
    const steps = sphere.length - SPHERE_HEAD, perKpc = STEPS_PER_CELL / h;
    for (let line = from; line < to; line++) {
      const i = Math.floor(line / n), j = line - i * n;
      for (let k = 0, q = line * n; k < n; k++, q++) {
        const gx = gN.x[q] + ex, gy = gN.y[q] + ey, gz = gN.z[q] + ez;
        const g = sqrt(gx * gx + gy * gy + gz * gz);
        // (nu - 1) g -> sqrt(a0 g) -> 0 as g -> 0, so a null field contributes nothing.
        const f = g > 0 ? mondNu(p.interpolation, g / a0) - 1 : 0;
        w.x[q] = f * gx - (nuE - 1) * ex;
        w.y[q] = f * gy - (nuE - 1) * ey;
        w.z[q] = f * gz - (nuE - 1) * ez;
        if (!spherical) continue;
        const dx = x0 + i * h - cx, dy = y0 + j * h - cy, dz = z0 + k * h - cz;
        const r = sqrt(dx * dx + dy * dy + dz * dz), u = r * perKpc, b = Math.floor(u);
        if (!(r > 0) || b + 1 >= steps) continue;
        const gs = sphere[SPHERE_HEAD + b] + (u - b) * (sphere[SPHERE_HEAD + b + 1] - sphere[SPHERE_HEAD + b]);
        // w_s points inward: -(nu - 1) g_s (x - c) / r, taken away from w.
        const fs = gs > 0 ? ((mondNu(p.interpolation, gs / a0) - 1) * gs) / r : 0;
        w.x[q] += fs * dx; w.y[q] += fs * dy; w.z[q] += fs * dz;
      }
    }
  }

  /**
   * c = -grad(Phi_P) - (w - w_s) on the nodes of lines [from, to) (the gN array holds w - w_s by now):
   * what the field form adds to the algebraic phantom field.
   */
  private correctionLines(from: number, to: number): void {
    const { gP, gN: w } = this;
    negativeGradientLines(this.geo, this.phi, gP, from, to);
    for (let q = from * this.geo.n; q < to * this.geo.n; q++) {
      gP.x[q] -= w.x[q]; gP.y[q] -= w.y[q]; gP.z[q] -= w.z[q];
    }
  }

  /** lap Phi_P = -div w, i.e. a phantom mass -div(w) h^3 / (4 pi G) per node, into the mass array. */
  private phantomMassLines(from: number, to: number): void {
    const source = this.mass;
    divergenceLines(this.geo, this.gN, source, from, to);
    const toMass = -(this.geo.h ** 3) / (4 * Math.PI * G);
    // Phantom mass only inside the ball: what a sphere leaves out acts on no point within it
    // when it is spherically distributed, as it is far from any bound system; a cube's corners would not.
    const { n } = this.geo, c = (n - 1) / 2, r2Max = (c - 1) * (c - 1);
    for (let line = from; line < to; line++) {
      const i = Math.floor(line / n), j = line - i * n;
      for (let k = 0, q = line * n; k < n; k++, q++) {
        const r2 = (i - c) * (i - c) + (j - c) * (j - c) + (k - c) * (k - c);
        source[q] = r2 <= r2Max ? source[q] * toMass : 0;
      }
    }
  }

  /** The phantom part of the QUMOND energy, -(a0^2 / 8 pi G) sum h^3 [P(|g|/a0) - P(|g_e|/a0) - 2 (nu_e - 1) g_e.g_N / a0^2]. */
  phantomEnergy(src: Sources, inside: Uint8Array): number {
    this.newtonian(src, inside);
    this.run(PASS.energy);
    // Summed line by line in order, so the total does not depend on how the lines were shared.
    let sum = 0;
    for (let line = 0, lines = nodeLines(this.geo); line < lines; line++) sum += this.phi[line];
    return (-(this.a0 * this.a0) / (8 * Math.PI * G)) * this.geo.h ** 3 * sum;
  }

  /** Each line's sum of the bracket of `phantomEnergy`, into phi[line] (phi is free once g_N is formed). */
  private energyLines(from: number, to: number): void {
    const { gN, a0, ge, nuE, p } = this;
    const [ex, ey, ez] = ge;
    const pE = phantomEnergyDensity(p.interpolation, hypot(ex, ey, ez) / a0);
    const n = this.geo.n;
    for (let line = from; line < to; line++) {
      let sum = 0;
      for (let q = line * n; q < (line + 1) * n; q++) {
        const gx = gN.x[q], gy = gN.y[q], gz = gN.z[q];
        const y = hypot(gx + ex, gy + ey, gz + ez) / a0;
        sum += phantomEnergyDensity(p.interpolation, y) - pE - (2 * (nuE - 1) * (ex * gx + ey * gy + ez * gz)) / (a0 * a0);
      }
      this.phi[line] = sum;
    }
  }

  /** Whether a point lies in the ball where the phantom field is solved. */
  inBall(x: number, y: number, z: number): boolean {
    const { n, h, x0, y0, z0 } = this.geo, c = ((n - 1) / 2) * h, r = c - h;
    const dx = x - x0 - c, dy = y - y0 - c, dz = z - z0 - c;
    return dx * dx + dy * dy + dz * dz <= r * r;
  }

  /** Phantom acceleration of the algebraic form on a point whose Newtonian field is (gx, gy, gz). */
  algebraicPhantom(gx: number, gy: number, gz: number, out: number[]): void {
    const [ex, ey, ez] = this.ge;
    const tx = gx + ex, ty = gy + ey, tz = gz + ez;
    const g = sqrt(tx * tx + ty * ty + tz * tz);
    const f = g > 0 ? mondNu(this.p.interpolation, g / this.a0) - 1 : 0;
    out[0] = f * tx - (this.nuE - 1) * ex;
    out[1] = f * ty - (this.nuE - 1) * ey;
    out[2] = f * tz - (this.nuE - 1) * ez;
  }
}

/** Grows per-particle scratch to n entries. */
function scratchVectors() {
  let n = -1, x = new Float64Array(0), y = x, z = x, inside = new Uint8Array(0);
  return (size: number) => {
    if (size !== n) {
      n = size; x = new Float64Array(n); y = new Float64Array(n); z = new Float64Array(n); inside = new Uint8Array(n);
    }
    return { x, y, z, inside };
  };
}

export const qumondLaw = defineLaw({
  kind: 'qumond',
  schema,
  label: 'MOND, field form (QUMOND)',
  shortLabel: 'MOND (field, QUMOND)',
  colour: 'ember',
  preset: { kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid: 64 },
  // Kept cheap for the pair a galaxy's fit builds.
  galaxyPairPreset: { kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid: 32 },
  // QUMOND has a potential, but not a pure 1/r pair one: 2K/|W| is not 1 in equilibrium.
  virial: 'clausius',
  pairsWithReference: true,
  preferredPartner: true,
  approximateCurve: 'algebraic form',
  slowField: true,
  // Two isolated FFT solves on a doubled grid cost about 30 g^3 log2(2g) pair interactions
  // for g nodes per side (our own measurement against the direct sum, best of four at
  // g = 32 and 64, on a busy machine).
  extraInteractions: (params) => 30 * params.grid ** 3 * Math.log2(2 * params.grid),
  grid: {
    // The lengths depend on the grid size and the softening only, not on the box.
    lengths: (params, softening_kpc) => phantomGridLengths({ params, box: { side_kpc: 1, cx: 0, cy: 0, cz: 0 }, softening_kpc }),
    view: (setup, arrays) => PhantomGrid.view(setup as PhantomSetup, arrays),
  },
  info,
  warnings(params, { traits, particles, halfMassRadius_kpc }): EngineWarning[] {
    const notes: EngineWarning[] = [];
    // Each system is balanced in the law's own pull on a grid over that system alone (models/lawPull.ts);
    // the run's default grid spans all of them, with wider cells.
    if (traits.systems > 1 && params.box_kpc === undefined) {
      const side = defaultGridBox(particles).side_kpc.toPrecision(3);
      notes.push({
        code: 'systems-balanced-on-own-grid',
        severity: 'warning',
        message: `each system's velocities are balanced on a grid over that system alone, while the run's grid spans them all (side ${side} kpc) with wider cells: set box_kpc to ${side} so set-up and run share the grid's spacing`,
        source: 'this engine (measured on an encounter of a Plummer and a Hernquist sphere: Clausius ratio of the primary 1.25 by default, 0.98 with box_kpc set)',
      });
    }
    return [...notes, ...qumondGridNotes(params, particles, halfMassRadius_kpc)];
  },
  create(params, { solver, softening_kpc, initial }) {
    const kernel = newtonKernel(softening_kpc);
    const pairScratch = scratchFor();
    let grid: PhantomGrid | undefined;
    // The box is fixed once, from the run's initial particles when known, so a resumed run uses the same grid.
    const gridFor = (src: Sources): PhantomGrid => {
      grid ??= PhantomGrid.create({ params, box: gridGeometryFor(params, initial ?? src).box, softening_kpc }, solver.gridThreads);
      return grid;
    };
    const atSources = scratchVectors();
    const atTargets = scratchVectors();
    const pairAtSources = scratchVectors();
    const local = [0, 0, 0];
    /**
     * Phantom acceleration at points whose pair-sum g_N is (nx, ny, nz): the algebraic phantom field
     * there, exact to the softening length, plus the grid's correction where the point lies in its ball
     * (flagged in `inside`); outside the ball the algebraic field alone.
     */
    const phantomAt = (g: PhantomGrid, pts: Points, nx: Float64Array, ny: Float64Array, nz: Float64Array, at: ReturnType<ReturnType<typeof scratchVectors>>) => {
      interpolateVectorsCubic(g.geo, g.gP, pts, at.x, at.y, at.z, at.inside);
      for (let i = 0; i < pts.x.length; i++) {
        if (at.inside[i] && !g.inBall(pts.x[i], pts.y[i], pts.z[i])) at.inside[i] = 0;
        g.algebraicPhantom(nx[i], ny[i], nz[i], local);
        if (at.inside[i]) { at.x[i] += local[0]; at.y[i] += local[1]; at.z[i] += local[2]; }
        else { at.x[i] = local[0]; at.y[i] = local[1]; at.z[i] = local[2]; }
      }
    };
    return {
      info: info(params),
      accelerations(sources: Sources, targets: Points, out) {
        solver.field(sources, targets, kernel, out);
        const g = gridFor(sources);
        const s = atSources(sources.m.length);
        g.solve(sources, s.inside);
        // The sources' own g_N: the targets' when they are the sources, else one more pair sum.
        let gNs: { x: Float64Array; y: Float64Array; z: Float64Array } = { x: out.ax, y: out.ay, z: out.az };
        if ((targets as Points) !== sources) {
          gNs = pairAtSources(sources.m.length);
          solver.field(sources, sources, kernel, { ax: gNs.x, ay: gNs.y, az: gNs.z });
        }
        phantomAt(g, sources, gNs.x, gNs.y, gNs.z, s);
        // The discrete phantom field leaves a small net force on the particles in the grid (mostly
        // the algebraic part's: below the grid's scale its pulls are not equal and opposite);
        // continuum QUMOND exerts none on an isolated system (Milgrom 2010), so it is
        // discretisation error and is removed as a uniform acceleration, which leaves
        // relative motions unchanged.
        let M = 0, fx = 0, fy = 0, fz = 0;
        for (let i = 0; i < sources.m.length; i++) {
          if (!s.inside[i]) continue;
          const m = sources.m[i];
          M += m; fx += m * s.x[i]; fy += m * s.y[i]; fz += m * s.z[i];
        }
        if (M > 0) { fx /= M; fy /= M; fz /= M; }
        const t = (targets as Points) === sources ? s : atTargets(targets.x.length);
        if (t !== s) phantomAt(g, targets, out.ax, out.ay, out.az, t);
        for (let i = 0; i < targets.x.length; i++) {
          if (t.inside[i]) { out.ax[i] += t.x[i] - fx; out.ay[i] += t.y[i] - fy; out.az[i] += t.z[i] - fz; }
          else { out.ax[i] += t.x[i]; out.ay[i] += t.y[i]; out.az[i] += t.z[i]; }
        }
      },
      potentialEnergy(sources) {
        const g = gridFor(sources);
        return pairPotentialEnergy(solver, kernel, sources, pairScratch) + g.phantomEnergy(sources, atSources(sources.m.length).inside);
      },
    };
  },
  // A static model: the algebraic form, which QUMOND equals for spherical models (Milgrom 2010); for disks it is an approximation.
  modelAcceleration(params, model, R) {
    const gN = model.newtonAccel(R);
    const e = params.externalField_m_s2;
    if (!e) return mondLaw.modelAcceleration({ kind: 'mond', interpolation: params.interpolation, a0_m_s2: params.a0_m_s2 }, model, R);
    // With an external field, nu is taken at |g_N| and |g_e| added in quadrature: our own rough estimate for a curve preview.
    const a0 = accelFromSI(params.a0_m_s2);
    const ge = accelFromSI(hypot(...e));
    return gN > 0 ? mondNu(params.interpolation, hypot(gN, ge) / a0) * gN : 0;
  },
});
