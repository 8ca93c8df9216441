// The shapes the HTTP API speaks, shared by server, app and tests.
import type { RunResult } from '../engine';
import type { RunSpec } from '../spec';

export const RUN_STATUSES = ['queued', 'running', 'finished', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
export const FINAL_STATUSES: readonly RunStatus[] = ['finished', 'failed', 'cancelled'];

// Stable error codes: clients branch on these, people read the message.
export const ERROR_CODES = [
  'BAD_REQUEST',
  'INVALID_SPEC',
  'UNAUTHENTICATED',
  'FORBIDDEN',
  'CSRF_REJECTED',
  'NOT_FOUND',
  'CONFLICT',
  'QUOTA_EXCEEDED',
  'RATE_LIMITED',
  'PAYLOAD_TOO_LARGE',
  'UNAVAILABLE',
  'INTERNAL',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export interface ApiErrorBody {
  error: {
    code: ErrorCode;
    message: string;
    /** Dotted path of the offending input field, when one is to blame. */
    field?: string;
    details?: unknown;
  };
}

export interface Owner {
  id: number;
  login: string;
  name: string;
}

export interface RunSummary {
  id: string;
  name: string;
  status: RunStatus;
  progress: number; // 0..1
  modelKind: string;
  lawKind: string;
  particles: number;
  steps: number;
  costInteractions: number;
  pairId: string | null;
  /** The galaxy whose fit the run was built from (its observed curve is drawn beside the run's). */
  galaxyId?: number | null;
  error: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  owner: Owner;
}

export interface FrameInfo {
  frame: number;
  step: number;
  time_Myr: number;
}

/**
 * The JSON part of a run's result, as the engine hands it over: the worker stores it in the
 * run_outputs row's JSON columns (server/db/entities/RunOutput.ts) and the API ships it in
 * RunDetail.output. Runs stored by an older engine may lack fields added since (a diagnostic
 * row's centres, the summary's equilibrium record); readers that use those say so.
 */
export type RunOutputData = Pick<RunResult, 'law' | 'timescales' | 'warnings' | 'diagnostics' | 'rotationCurves' | 'summary'>;

export interface RunOutputBody extends RunOutputData {
  snapshotParticles: number;
  frames: FrameInfo[];
}

export interface RunDetail extends RunSummary {
  spec: RunSpec;
  output: RunOutputBody | null;
}

/** Payload of the `progress` server-sent event and of BullMQ job progress. */
export interface RunProgress {
  percent: number; // 0..100
  step: number;
  totalSteps: number;
  time_Myr: number;
  energyDrift: number | null;
}

/**
 * Server-sent event names on GET /api/runs/:id/events. `history` (a running run only) carries
 * the `RunProgress` samples from before the stream opened, oldest first.
 */
export type RunEventName = 'state' | 'history' | 'progress' | 'end';
