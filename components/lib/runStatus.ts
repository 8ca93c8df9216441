import { FINAL_STATUSES, type RunStatus } from '../../shared/api/contract';

/** A run that has stopped for good (finished, failed or cancelled): nothing more will stream. */
export const isFinal = (status: RunStatus) => FINAL_STATUSES.includes(status);
