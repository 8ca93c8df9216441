import { z } from 'zod';
import { nameSchema, runNameSchema } from '../spec/runSpec';
import { LIMITS } from '../spec/runSpec';
import { bytesText, groupDigits, interactionsText } from './quotaWords';

// Accounts, tokens, cohorts, quotas and templates: request bodies the app and
// the server both check, and the shapes the server answers with.

export const ROLES = ['student', 'instructor', 'researcher', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export interface AccountUser {
  id: number;
  login: string;
  name: string;
  role: Role;
  email: string | null;
}

/** GET /api/auth/me. csrfToken is null when the caller used a personal API token. */
export interface MeResponse {
  user: AccountUser;
  csrfToken: string | null;
}

/** GET /api/auth/session: the app's probe; user null when nobody is signed in. */
export interface SessionResponse {
  user: AccountUser | null;
  csrfToken: string | null;
}

export interface QuotaLimits {
  maxParticles: number;
  maxSteps: number;
  maxConcurrentRuns: number;
  /** Daily compute budget in pair interactions (N^2 x steps for direct sum). */
  dailyInteractions: number;
  /** Largest uploaded table file (rotation curve, particle file), bytes. */
  maxUploadBytes: number;
  /** Most data rows in one uploaded table. */
  maxUploadRows: number;
}

/** The two limits on one uploaded table; the import screens get them with the galaxy list. */
export type UploadLimits = Pick<QuotaLimits, 'maxUploadBytes' | 'maxUploadRows'>;

/** The limits a run submission is checked against. */
export type RunLimit = Exclude<keyof QuotaLimits, keyof UploadLimits>;

/** GET /api/account/usage: what the new-run form needs to show a cost before submitting. */
export interface AccountUsage {
  limits: QuotaLimits;
  used: { interactionsToday: number; activeRuns: number };
  remaining: { interactionsToday: number; concurrentRuns: number };
  /** UTC day the budget counts, and when the next one starts. */
  day: string;
  resetsAt: string;
}

export interface AccountSettings {
  user: AccountUser;
  notifyOnFinish: boolean;
}

/** details of a QUOTA_EXCEEDED error. */
export interface QuotaRefusal {
  limit: RunLimit;
  max: number;
  needed: number;
  remaining: number;
}

export interface TokenSummary {
  id: number;
  name: string;
  /** The first characters of the token, enough to recognise it. */
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  /** After this the token no longer authenticates; it stays listed until revoked. */
  expiresAt: string;
}

/** POST /api/tokens: the only answer that ever contains the secret. */
export interface CreatedToken {
  token: TokenSummary;
  secret: string;
}

export interface CohortSummary {
  id: number;
  name: string;
  instructor: { id: number; login: string; name: string };
  quota: QuotaLimits;
  memberCount: number;
  /** Only for the cohort's instructor and admins. */
  enrolmentCode?: string;
  createdAt: string;
}

export interface CohortMemberUsage {
  user: AccountUser;
  joinedAt: string;
  usage: AccountUsage;
}

export interface TemplateSummary {
  id: number;
  cohortId: number;
  cohortName: string;
  name: string;
  description: string;
  modelKind: string;
  lawKind: string;
  pairLawKind: string | null;
  createdAt: string;
}

/** GET /api/templates/:id: spec and pairLaw are what the new-run form is filled with to clone it. */
export interface TemplateDetail extends TemplateSummary {
  spec: unknown;
  pairLaw: unknown | null;
}

export interface AdminUser extends AccountUser {
  createdAt: string;
  lastSignInAt: string | null;
  /** Per-user grants that override role and cohort quotas; null fields are not overridden. */
  allocation: { [K in keyof QuotaLimits]: number | null };
  limits: QuotaLimits;
}

/** Each limit in words, for messages and forms. */
export const LIMIT_WORDS: Record<keyof QuotaLimits, string> = {
  maxParticles: 'particles per run',
  maxSteps: 'steps per run',
  maxConcurrentRuns: 'runs at a time',
  dailyInteractions: 'pair interactions a day',
  maxUploadBytes: 'largest table file',
  maxUploadRows: 'rows per table',
};

/** Where a refusal points: "your quota's rows per table: 2 000". */
export function quotaLimitText(key: keyof QuotaLimits, n: number): string {
  return `your quota's ${LIMIT_WORDS[key]}: ${limitText(key, n)}`;
}

/** A limit's value in words: bytes in KB or MB, pair interactions in powers of ten, counts in groups. */
export function limitText(key: keyof QuotaLimits, n: number): string {
  if (key === 'maxUploadBytes') return bytesText(n);
  if (key === 'dailyInteractions') return interactionsText(n);
  return groupDigits(n);
}

// The numbers are our own choice for a small shared machine, not from any source.
export const ROLE_LIMITS: Record<Role, QuotaLimits> = {
  student: { maxParticles: 2_000, maxSteps: 5_000, maxConcurrentRuns: 2, dailyInteractions: 5e10, maxUploadBytes: 256 * 1024, maxUploadRows: 2_000 },
  instructor: { maxParticles: 10_000, maxSteps: 20_000, maxConcurrentRuns: 4, dailyInteractions: 1e12, maxUploadBytes: 1024 * 1024, maxUploadRows: 10_000 },
  researcher: { maxParticles: 50_000, maxSteps: 100_000, maxConcurrentRuns: 8, dailyInteractions: 2e13, maxUploadBytes: 4 * 1024 * 1024, maxUploadRows: 50_000 },
  admin: { maxParticles: 100_000, maxSteps: 200_000, maxConcurrentRuns: 16, dailyInteractions: 1e14, maxUploadBytes: 8 * 1024 * 1024, maxUploadRows: 100_000 },
};

/**
 * Ceilings on what any allocation may be set to: particles and steps no higher than the engine
 * takes, the others so a typo can't grant unbounded compute.
 */
export const LIMIT_CEILINGS: QuotaLimits = {
  maxParticles: LIMITS.maxParticles,
  maxSteps: LIMITS.maxSteps,
  maxConcurrentRuns: 64,
  dailyInteractions: 1e15,
  // Each upload is held in memory while it is read, and kept in PostgreSQL.
  maxUploadBytes: 16 * 1024 * 1024,
  maxUploadRows: 100_000,
};

/** The least any limit may be set to; a byte limit below 1 KB would refuse even a short curve. */
export const LIMIT_FLOORS: QuotaLimits = { maxParticles: 1, maxSteps: 1, maxConcurrentRuns: 1, dailyInteractions: 1, maxUploadBytes: 1024, maxUploadRows: 1 };

/** An instructor can give a cohort at most what instructors have themselves. */
export const COHORT_CEILING: QuotaLimits = ROLE_LIMITS.instructor;

const limitField = (key: keyof QuotaLimits, ceiling: QuotaLimits, why: string) =>
  z
    .number(`${LIMIT_WORDS[key]} must be a number`)
    .int(`${LIMIT_WORDS[key]} must be a whole number`)
    .min(LIMIT_FLOORS[key], `${LIMIT_WORDS[key]} must be at least ${limitText(key, LIMIT_FLOORS[key])}`)
    .max(ceiling[key], `${LIMIT_WORDS[key]} can be at most ${limitText(key, ceiling[key])} (${why})`);

const COHORT = 'what instructors have themselves';
const allocationField = (key: keyof QuotaLimits) =>
  limitField(key, LIMIT_CEILINGS, key === 'maxParticles' || key === 'maxSteps' ? "the engine's limit" : 'the most any allocation may give').nullable().optional();

/**
 * A cohort's quota: every limit, none above what instructors have (itself within the engine's
 * limits). The upload limits may be left out or null: the cohort then gives the student default.
 */
export const quotaLimitsSchema = z
  .object({
    maxParticles: limitField('maxParticles', COHORT_CEILING, COHORT),
    maxSteps: limitField('maxSteps', COHORT_CEILING, COHORT),
    maxConcurrentRuns: limitField('maxConcurrentRuns', COHORT_CEILING, COHORT),
    dailyInteractions: limitField('dailyInteractions', COHORT_CEILING, COHORT),
    maxUploadBytes: limitField('maxUploadBytes', COHORT_CEILING, COHORT).nullable().optional(),
    maxUploadRows: limitField('maxUploadRows', COHORT_CEILING, COHORT).nullable().optional(),
  })
  .strict();
export type CohortQuotaBody = z.infer<typeof quotaLimitsSchema>;

export const updateAccountBodySchema = z.object({ notifyOnFinish: z.boolean() }).strict();
export type UpdateAccountBody = z.infer<typeof updateAccountBodySchema>;

/** Token lifetimes the account page offers; the API takes any whole number of days up to the maximum. */
export const TOKEN_LIFETIME_CHOICES_DAYS = [7, 30, 90, 365] as const;
export const DEFAULT_TOKEN_LIFETIME_DAYS = 90;
export const MAX_TOKEN_LIFETIME_DAYS = 365;

export const createTokenBodySchema = z
  .object({
    name: nameSchema,
    expiresInDays: z.number().int().min(1).max(MAX_TOKEN_LIFETIME_DAYS).default(DEFAULT_TOKEN_LIFETIME_DAYS),
  })
  .strict();
export type CreateTokenBody = z.infer<typeof createTokenBodySchema>;

export const createCohortBodySchema = z.object({ name: nameSchema, quota: quotaLimitsSchema.optional() }).strict();
export type CreateCohortBody = z.infer<typeof createCohortBodySchema>;

// Codes are shown as XXXX-XXXX; people may type them in lower case or with spaces.
export const enrolmentCodeSchema = z
  .string()
  .max(40)
  .transform((s) => s.toUpperCase().replace(/[\s-]/g, ''))
  .pipe(z.string().regex(/^[A-Z0-9]{8}$/, 'an enrolment code has 8 letters or digits, like ABCD-2345'))
  .transform((s) => `${s.slice(0, 4)}-${s.slice(4)}`);

export const joinCohortBodySchema = z.object({ code: enrolmentCodeSchema }).strict();
export type JoinCohortBody = z.infer<typeof joinCohortBodySchema>;

export const inviteBodySchema = z
  .object({ emails: z.array(z.email('not an e-mail address').max(254)).min(1, 'give at least one address').max(50, 'at most 50 addresses at a time') })
  .strict();
export type InviteBody = z.infer<typeof inviteBodySchema>;

/** A template is a run submission kept for students to clone: the same spec and optional pairLaw. */
export const publishTemplateBodySchema = z
  .object({
    name: runNameSchema,
    description: z.string().trim().max(2000, 'description is at most 2000 characters').default(''),
    spec: z.unknown(),
    pairLaw: z.unknown().optional(),
  })
  .strict();
export type PublishTemplateBody = z.infer<typeof publishTemplateBodySchema>;

export const grantRoleBodySchema = z.object({ role: z.enum(ROLES) }).strict();
export type GrantRoleBody = z.infer<typeof grantRoleBodySchema>;

// null clears an override; a missing key leaves it as it is.
export const allocationBodySchema = z
  .object({
    maxParticles: allocationField('maxParticles'),
    maxSteps: allocationField('maxSteps'),
    maxConcurrentRuns: allocationField('maxConcurrentRuns'),
    dailyInteractions: allocationField('dailyInteractions'),
    maxUploadBytes: allocationField('maxUploadBytes'),
    maxUploadRows: allocationField('maxUploadRows'),
  })
  .strict();
export type AllocationBody = z.infer<typeof allocationBodySchema>;

export const adminUsersQuerySchema = z
  .object({
    q: z.string().trim().max(60).optional(),
    role: z.enum(ROLES).optional(),
    limit: z.coerce.number().int().min(1).max(200).default(50),
  })
  .strict();
export type AdminUsersQuery = z.infer<typeof adminUsersQuerySchema>;
