// Invented galaxies for the demo: curves made from analytic baryons under a stated law with
// seeded noise, uploaded through the same service as a person's table, then fitted.
// Every one is marked invented, in its name and in its record.
import type { EntityManager } from '@mikro-orm/postgresql';
import { Galaxy, type Cohort, type User } from './entities';
import { createGalaxy, requestFit } from '../services/galaxies';
import { inventedCurve, type InventedBaryons } from '../../shared/galaxy/invented';
import { nfwFromV200 } from '../../shared/galaxy/fit';
import { mondNu } from '../../shared/engine/laws/mond';
import { accelFromSI } from '../../shared/engine/units';
import type { RotationCurve } from '../../shared/galaxy/table';

type Parts = { vGas: number; vDisk: number; vBulge: number };
const vBarSq = (c: Parts, disk: number, bulge: number) => c.vGas * Math.abs(c.vGas) + disk * c.vDisk ** 2 + bulge * c.vBulge ** 2;

/** Newton plus an NFW halo of circular speed V200 and concentration c (Navarro, Frenk & White 1996). */
function nfwTruth(V200: number, c: number, disk: number, bulge: number) {
  const { r200_kpc } = nfwFromV200(V200, c);
  const m = (x: number) => Math.log(1 + x) - x / (1 + x);
  return (R: number, p: Parts) => Math.sqrt(Math.max(0, vBarSq(p, disk, bulge) + (V200 ** 2 * m((c * R) / r200_kpc)) / ((R / r200_kpc) * m(c))));
}

/** Algebraic MOND on the baryons' Newtonian field, a0 = 1.2e-10 m/s^2. */
function mondTruth(kind: 'simple' | 'rar', disk: number, bulge: number) {
  const a0 = accelFromSI(1.2e-10);
  return (R: number, p: Parts) => {
    const gN = Math.max(1e-12, vBarSq(p, disk, bulge) / R);
    return Math.sqrt(R * gN * mondNu(kind, gN / a0));
  };
}

interface Demo {
  name: string;
  baryons: InventedBaryons;
  radii: number[];
  truth: (R: number, p: Parts) => number;
  distanceMpc: number;
  inclinationDeg: number;
  seed: number;
  share: 'public' | 'cohort';
}

const radii = (n: number, step: number) => Array.from({ length: n }, (_, i) => +(step * (i + 1)).toFixed(3));

const DEMOS: Demo[] = [
  {
    name: 'Kestrel (invented spiral, made under Newton + NFW)',
    baryons: { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, bulge: { mass_Msun: 6e9, scale_kpc: 0.5 }, gas: { mass_Msun: 8e9, scale_kpc: 6 } },
    radii: radii(24, 1),
    truth: nfwTruth(160, 9, 0.5, 0.7),
    distanceMpc: 14,
    inclinationDeg: 62,
    seed: 11,
    share: 'public',
  },
  {
    name: 'Dipper (invented gas-rich dwarf, made under MOND)',
    baryons: { disk: { mass_Msun: 6e8, scale_kpc: 1.2 }, gas: { mass_Msun: 1.5e9, scale_kpc: 2.5 } },
    radii: radii(16, 0.6),
    truth: mondTruth('simple', 0.5, 0.7),
    distanceMpc: 6,
    inclinationDeg: 55,
    seed: 23,
    share: 'cohort',
  },
  {
    name: 'Lantern (invented disk, made on the acceleration relation)',
    baryons: { disk: { mass_Msun: 1.5e10, scale_kpc: 2 }, gas: { mass_Msun: 4e9, scale_kpc: 4.5 } },
    radii: radii(20, 0.8),
    truth: mondTruth('rar', 0.5, 0.7),
    distanceMpc: 21,
    inclinationDeg: 70,
    seed: 37,
    share: 'public',
  },
];

function tableText(d: Demo, curve: RotationCurve): string {
  const head = [`# ${d.name}`, '# INVENTED demo data: not an observation.', 'R_kpc,Vobs,errV,Vgas,Vdisk' + (curve.vBulge ? ',Vbul' : '')];
  const rows = curve.radiusKpc.map((R, i) => [R, curve.vObs[i], curve.vErr[i], curve.vGas?.[i] ?? 0, curve.vDisk![i], ...(curve.vBulge ? [curve.vBulge[i]] : [])].map((v) => +v.toFixed(3)).join(','));
  return [...head, ...rows, ''].join('\n');
}

/** Adds the invented galaxies once, owned by the cohort's instructor; one is shared with that cohort. */
export async function seedGalaxies(em: EntityManager, owner: User, cohort: Cohort): Promise<number> {
  if ((await em.count(Galaxy, { owner: owner.id, invented: true })) > 0) return 0;
  for (const d of DEMOS) {
    const curve = inventedCurve(d.baryons, d.radii, d.truth, (_R, v) => 0.04 * v + 3, d.seed);
    const file = { originalname: `${d.name.split(' ')[0].toLowerCase()}-invented.csv`, buffer: Buffer.from(tableText(d, curve), 'utf8') };
    const mapping = JSON.stringify({ distanceMpc: { value: d.distanceMpc, error: d.distanceMpc * 0.1 }, inclinationDeg: { value: d.inclinationDeg, error: 4 } });
    const g = await createGalaxy(em, owner, file, { name: d.name, mapping, visibility: d.share, ...(d.share === 'cohort' ? { cohortId: String(cohort.id) } : {}) });
    g.invented = true;
    await em.flush();
    await requestFit(em, owner, g, { a0: 'free' });
  }
  return DEMOS.length;
}
