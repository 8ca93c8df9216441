import type { QuotaRefusal } from './accounts';
import { groupDigits } from '../spec/limits';

export { groupDigits };

// Quota refusals as sentences, the same on the server (the QUOTA_EXCEEDED message) and in the
// new-run form (before submitting): units, digits in groups, what to change.

/** Pair interactions: grouped digits up to a million, then three significant digits and a power of ten (1.42e11). */
export function interactionsText(n: number): string {
  if (Math.abs(n) < 1e6) return groupDigits(n);
  const [mantissa, exponent] = n.toExponential(2).split('e');
  return `${Number(mantissa)}e${Number(exponent)}`;
}

/**
 * A size in bytes as people read file sizes: bytes below 1 KB, then KB and MB of 1024 (as file
 * managers commonly show them), to at most two decimals: 256 KB, 1.5 MB.
 */
export function bytesText(n: number): string {
  if (!Number.isFinite(n)) return String(n);
  const [value, unit] = Math.abs(n) >= 1024 * 1024 ? [n / (1024 * 1024), 'MB'] : Math.abs(n) >= 1024 ? [n / 1024, 'KB'] : [n, 'bytes'];
  if (unit === 'bytes') return `${groupDigits(value)} bytes`;
  return `${Number(value.toFixed(Math.abs(value) < 10 ? 2 : Math.abs(value) < 100 ? 1 : 0))} ${unit}`;
}

/** Why a submission is refused; `runs` is how many runs it starts (2 for a pair). */
export function describeRefusal(r: QuotaRefusal, runs = 1): string {
  // Over the limit itself it never fits; otherwise it fits later (a slot frees, the day turns).
  const never = r.needed > r.max;
  const subject = runs > 1 ? `These ${runs} runs` : 'This run';
  switch (r.limit) {
    case 'maxParticles':
      return `This run has ${groupDigits(r.needed)} particles; your limit is ${groupDigits(r.max)} particles per run.`;
    case 'maxSteps':
      return `This run takes ${groupDigits(r.needed)} steps (duration ÷ timestep); your limit is ${groupDigits(r.max)} steps per run. Use a longer timestep or a shorter duration.`;
    case 'maxConcurrentRuns':
      return never
        ? `${subject} would need ${r.needed} run slots at once; your limit is ${r.max}.`
        : `${subject} need${runs > 1 ? '' : 's'} ${r.needed} run slot${r.needed > 1 ? 's' : ''}; ${r.remaining} of your ${r.max} ${r.remaining === 1 ? 'is' : 'are'} free. Wait for a run to end, or cancel one.`;
    case 'dailyInteractions':
      return never
        ? `${subject} need${runs > 1 ? '' : 's'} ${interactionsText(r.needed)} pair interactions, more than your whole daily budget of ${interactionsText(r.max)}. Use fewer particles or steps, or the tree solver.`
        : `${subject} need${runs > 1 ? '' : 's'} ${interactionsText(r.needed)} pair interactions; ${interactionsText(r.remaining)} of your ${interactionsText(r.max)} are left today. The budget resets at 00:00 UTC.`;
  }
}
