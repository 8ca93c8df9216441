/** Hard limits: the engine refuses anything beyond them. */
export const LIMITS = {
  maxParticles: 100_000,
  maxSteps: 200_000,
  maxTableRows: 20_000,
  /** Snapshots and diagnostic samples are kept in memory and shipped to the browser. */
  maxSnapshots: 1_000,
  maxDiagnostics: 2_000,
} as const;
