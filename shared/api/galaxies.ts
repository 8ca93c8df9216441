import { z } from 'zod';
import type { RotationCurve } from '../galaxy/table';
import { FIT_LAWS, type GalaxyFitReport, type SampleFitReport } from '../galaxy/fit';
import type { Owner } from './contract';
import type { UploadLimits } from './accounts';
import { HALO_FITS } from '../galaxy/toRun';
import { galaxyPairLaw } from '../engine/laws/registry';
import { nameSchema } from '../spec/runSpec';

// Galaxies: observed rotation curves uploaded as tables, who may see them, and the fits
// requested on them. The upload is multipart (the file plus these fields as text).

export const GALAXY_VISIBILITIES = ['private', 'cohort', 'public'] as const;
export type GalaxyVisibility = (typeof GALAXY_VISIBILITIES)[number];

/** What each visibility means, for forms and lists. */
export const VISIBILITY_WORDS: Record<GalaxyVisibility, string> = {
  private: 'only you',
  cohort: 'you and one cohort (its members and instructor)',
  public: 'everyone signed in',
};

export type GalaxyCurve = RotationCurve;

const columnRef = z.union([
  z.number().int('a column number is a whole number').min(1, 'columns are numbered from 1').max(64, 'a table has at most 64 columns'),
  z.string().trim().min(1, 'a column name must not be empty').max(64, 'a column name is at most 64 characters'),
]);

const measured = (what: string, max: number) =>
  z
    .object({
      value: z.number(`${what} must be a number`).min(0, `${what} must not be negative`).max(max, `${what} is at most ${max}`),
      error: z.number(`${what} error must be a number`).positive(`${what} error must be positive`).max(max).optional(),
    })
    .strict();

/** How to read the table: which column is which, the radius unit, and what is known of the galaxy. */
export const galaxyMappingSchema = z
  .object({
    columns: z
      .object({ radius: columnRef, vObs: columnRef, vErr: columnRef, vGas: columnRef, vDisk: columnRef, vBulge: columnRef })
      .partial()
      .strict()
      .default({}),
    radiusUnit: z.enum(['kpc', 'arcsec'], 'radius unit must be kpc or arcsec').default('kpc'),
    distanceMpc: measured('distance (Mpc)', 1000).optional(),
    inclinationDeg: measured('inclination (degrees)', 90).optional(),
  })
  .strict();
export type GalaxyMapping = z.infer<typeof galaxyMappingSchema>;


/** JSON text in a multipart field, then its schema. */
const jsonField = <S extends z.ZodType>(schema: S) =>
  z
    .string()
    .max(10_000, 'the field is at most 10000 characters')
    .transform((text, ctx) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        ctx.addIssue({ code: 'custom', message: 'is not valid JSON' });
        return z.NEVER;
      }
    })
    .pipe(schema);

const visibility = z.enum(GALAXY_VISIBILITIES, 'visibility must be private, cohort or public');
const visibilityFields = {
  visibility: visibility.default('private'),
  cohortId: z.coerce.number().int().positive('cohortId must be a cohort id').optional(),
};

/** The text fields of POST /api/galaxies (multipart, beside the file field `file`). */
export const uploadGalaxyFieldsSchema = z
  .object({
    name: nameSchema,
    mapping: jsonField(galaxyMappingSchema).optional(),
    ...visibilityFields,
  })
  .strict();
export type UploadGalaxyFields = z.input<typeof uploadGalaxyFieldsSchema>;

export const updateGalaxyBodySchema = z
  .object({
    name: nameSchema.optional(),
    // No default here: a rename leaves the sharing as it is.
    visibility: visibility.optional(),
    cohortId: z.number().int().positive().nullable().optional(),
  })
  .strict();
export type UpdateGalaxyBody = z.infer<typeof updateGalaxyBodySchema>;

/** Fits run inside the request, so a galaxy fitted through the API has at most this many points. */
export const FIT_MAX_POINTS = 300;

/** POST /api/galaxies/:id/fits: which laws, and whether MOND's a0 and emergent gravity's H0 are fitted or held. */
export const galaxyFitRequestSchema = z
  .object({
    laws: z
      .array(z.enum(FIT_LAWS, `a law is one of ${FIT_LAWS.join(', ')}`))
      .min(1, 'choose at least one law')
      .max(FIT_LAWS.length)
      .refine((l) => new Set(l).size === l.length, 'each law once')
      .default([...FIT_LAWS]),
    a0: z.enum(['fixed', 'free'], 'a0 is fixed or free').default('fixed'),
    H0: z.enum(['fixed', 'free'], 'H0 is fixed or free').default('fixed'),
  })
  .strict();
export type GalaxyFitRequest = z.infer<typeof galaxyFitRequestSchema>;

/** A sample fit takes at most this many galaxies and points in all (our choice: one fit thread for at most a minute). */
export const SAMPLE_MAX_GALAXIES = 12;
export const SAMPLE_MAX_POINTS = 600;

/** POST /api/galaxy-samples: the galaxies (each one the caller may see) and the laws, as for one galaxy. */
export const galaxySampleRequestSchema = galaxyFitRequestSchema.extend({
  galaxyIds: z
    .array(z.number('a galaxy id is a number').int('a galaxy id is a whole number').positive('a galaxy id is positive'), 'galaxyIds must be a list of galaxy ids')
    .min(2, 'choose at least two galaxies')
    .max(SAMPLE_MAX_GALAXIES, `a sample has at most ${SAMPLE_MAX_GALAXIES} galaxies`)
    .refine((ids) => new Set(ids).size === ids.length, 'each galaxy once'),
});
export type GalaxySampleRequest = z.infer<typeof galaxySampleRequestSchema>;

/** The other member of a pair built from a galaxy unless the request names another law (the law modules choose it: the field form of MOND, kept cheap). */
export const GALAXY_PAIR_LAW = galaxyPairLaw();

/**
 * POST /api/galaxies/:id/runs: a pair of runs from one of the galaxy's Newtonian fits (the newest
 * with a halo unless fitId names one; the halo with the lower BIC unless halo names one). The spec
 * limits and the person's quota apply as to any run.
 */
export const galaxyRunRequestSchema = z
  .object({
    fitId: z.number().int().positive('fitId is a fit id').optional(),
    halo: z.enum(HALO_FITS, `halo is ${HALO_FITS.join(' or ')}`).optional(),
    n: z.number().int('n is a whole number').min(100, 'n is at least 100').max(5000, 'n is at most 5000 for a run built from a galaxy').default(1000),
    duration_Myr: z.number().positive('duration_Myr must be positive').max(10_000).default(250),
    timestep_Myr: z.number().positive('timestep_Myr must be positive').max(100).default(0.5),
    softening_kpc: z.number().min(0).max(10).default(0.1),
    snapshotEvery: z.number().int().min(1).default(10),
    seed: z.number().int().min(0).max(4_294_967_295).default(1),
    /** The second law (checked by the run-spec schema); the field-form MOND above by default. */
    pairLaw: z.unknown().optional(),
  })
  .strict();
export type GalaxyRunRequest = z.input<typeof galaxyRunRequestSchema>;

export interface GalaxySampleRecord {
  id: number;
  request: GalaxySampleRequest;
  /** The galaxies as they were named when fitted, in the order of the request. */
  galaxies: { id: number; name: string }[];
  results: SampleFitReport;
  requestedBy: Owner;
  createdAt: string;
}

export interface GalaxySampleSummary {
  id: number;
  galaxies: { id: number; name: string }[];
  laws: GalaxySampleRequest['laws'];
  createdAt: string;
}

export interface GalaxySummary {
  id: number;
  name: string;
  owner: Owner;
  visibility: GalaxyVisibility;
  cohort: { id: number; name: string } | null;
  invented: boolean;
  points: number;
  fileName: string;
  fileBytes: number;
  uploadedAt: string;
  /** The caller may rename, share, refit or delete it. */
  canManage: boolean;
}

export interface GalaxyFitRecord {
  id: number;
  request: GalaxyFitRequest;
  results: GalaxyFitReport;
  requestedBy: Owner;
  createdAt: string;
}

export interface GalaxyDetail extends GalaxySummary {
  mapping: GalaxyMapping;
  curve: GalaxyCurve;
  fits: GalaxyFitRecord[];
}

export interface GalaxyList {
  galaxies: GalaxySummary[];
  limits: UploadLimits;
}
