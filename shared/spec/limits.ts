/** Whole counts in groups of three split by thin spaces (5 000, 1 200 000): how limits and counts are worded to people. */
export function groupDigits(n: number): string {
  return Math.round(n).toString().replace(/\B(?=(\d{3})+(?!\d))/g, '\u2009');
}

/** Hard limits: the engine refuses anything beyond them. */
export const LIMITS = {
  maxParticles: 100_000,
  maxSteps: 200_000,
  maxTableRows: 20_000,
  /** Snapshots and diagnostic samples are kept in memory and shipped to the browser. */
  maxSnapshots: 1_000,
  maxDiagnostics: 2_000,
} as const;
