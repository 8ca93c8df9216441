import { readNumber, readTableCells, TableError } from '../galaxy/table';

// Particle tables for the uploaded-particles model: the same reading as a rotation-curve table
// (UTF-8 text only, no binary, no spreadsheet formulas, limits on bytes and rows), then seven
// numbers a row. Used by the server's upload route and by its tests.

export const PARTICLE_COLUMNS = ['x_kpc', 'y_kpc', 'z_kpc', 'vx_km_s', 'vy_km_s', 'vz_km_s', 'mass_Msun'] as const;
export type TableParticle = Record<(typeof PARTICLE_COLUMNS)[number], number>;

/** Reads x y z [kpc], vx vy vz [km/s], mass [Msun] per row; throws a TableError naming line and column. */
export function parseParticleTable(input: Uint8Array | string, limits: { maxBytes: number; maxRows: number }): TableParticle[] {
  const { rows } = readTableCells(input, limits);
  return rows.map(({ line, cells }) => {
    if (cells.length !== PARTICLE_COLUMNS.length) throw new TableError(`expected 7 numbers (x y z vx vy vz mass), found ${cells.length}`, line);
    const p = Object.fromEntries(PARTICLE_COLUMNS.map((key, j) => [key, readNumber(cells[j], line, j + 1)])) as TableParticle;
    if (!(p.mass_Msun > 0)) throw new TableError(`mass ${p.mass_Msun} must be positive`, line, 7);
    return p;
  });
}

/** POST /api/particle-tables answers with the particles read, for the new-run form's spec. */
export interface ParticleTableUpload {
  fileName: string;
  particles: TableParticle[];
}
