// A person's usage answer (GET /api/account/usage) for launch-form tests: a fresh day with the
// given daily budget left whole, 2,000 particles and 10,000 steps per run.
export function freshUsage(dailyInteractions = 1e10) {
  return {
    limits: { maxParticles: 2000, maxSteps: 10000, maxConcurrentRuns: 2, dailyInteractions },
    used: { interactionsToday: 0, activeRuns: 0 },
    remaining: { interactionsToday: dailyInteractions, concurrentRuns: 2 },
    day: '2026-12-01',
    resetsAt: '2026-12-02T00:00:00.000Z',
  };
}
