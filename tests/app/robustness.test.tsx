import fc from 'fast-check';
import { Try } from 'expo-router/build/views/Try';
import { formatAge, formatBound, formatCount, formatDuration, formatExpiry, formatInput, formatInteractions, formatValue } from '../../components/format';
import { formatTick, makeScale, niceDomain } from '../../components/plot/scale';
import { bytesText } from '../../shared/api/quotaWords';
import { ErrorBoundary as RunScreenBoundary } from '../../app/(signed-in)/runs/[id]';
import { ErrorBoundary as RootBoundary } from '../../app/_layout';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

// Numbers a stored run can carry: every double fast-check makes (NaN, ±Infinity, -0,
// subnormals, the largest finite) and the seeded failed run's extremes.
const awkward = fc.oneof(fc.double(), fc.constantFrom(NaN, Infinity, -Infinity, -0, 0, 1e300, -1e300, 1e-150, 5e-324, Number.MAX_VALUE, 1e21, 1e15, 999_999.5, -1e-3));
// Dates as the API sends them, and strings that are not dates at all.
const isoish = fc.oneof(
  fc.integer({ min: -8.64e15, max: 8.64e15 }).map((ms) => new Date(ms).toISOString()),
  fc.string(),
  fc.constantFrom('', 'not a date', '2026-13-45T99:99:99Z', 'NaN'),
);

/** A label people can read: no JavaScript spellings of missing or overflowing numbers. */
function readable(s: unknown): void {
  expect(typeof s).toBe('string');
  expect((s as string).length).toBeGreaterThan(0);
  expect(s).not.toMatch(/NaN|Infinity|undefined|null|e\+/);
}

describe('formatters take any number without throwing', () => {
  it('formatValue, formatBound, formatCount, formatInteractions and formatDuration', () => {
    fc.assert(
      fc.property(awkward, fc.integer({ min: -5, max: 40 }), (v, digits) => {
        readable(formatValue(v));
        readable(formatValue(v, digits));
        readable(formatBound(v));
        readable(formatCount(v));
        readable(formatInteractions(v));
        readable(formatDuration(v));
      }),
      { numRuns: 2000 },
    );
    expect(formatValue(undefined)).toBe('—');
    expect(formatValue(null)).toBe('—');
    expect(formatValue(-0)).toBe('0');
    expect(formatCount(Infinity)).toBe('∞');
    expect(formatInteractions(-Infinity)).toBe('−∞');
    expect(formatCount(1e300)).toBe('1e300');
    expect(formatInteractions(4.2e16)).toBe('4.2e16');
  });

  it('bytesText names a size in bytes, KB or MB for any number', () => {
    fc.assert(
      fc.property(awkward, (v) => {
        expect(bytesText(v)).toMatch(Number.isFinite(v) ? / (bytes|KB|MB)$/ : /^(NaN|-?Infinity)$/);
      }),
      { numRuns: 2000 },
    );
    expect([512, 1024, 1536, 256 * 1024, 1024 * 1024, 16 * 1024 * 1024, 4_500_000].map(bytesText)).toEqual(['512 bytes', '1 KB', '1.5 KB', '256 KB', '1 MB', '16 MB', '4.29 MB']);
  });

  it('formatInput gives text that reads back as the same number, or nothing', () => {
    fc.assert(
      fc.property(awkward, (v) => {
        const s = formatInput(v);
        // Seven significant digits in e-notation, the number itself otherwise.
        if (Number.isFinite(v)) expect(Math.abs(Number(s) - v)).toBeLessThanOrEqual(5e-7 * Math.abs(v));
        else expect(s).toBe('');
      }),
      { numRuns: 2000 },
    );
    expect(formatInput(undefined)).toBe('');
  });

  it('formatAge and formatExpiry take any string and any clock', () => {
    fc.assert(
      fc.property(isoish, awkward, (iso, now) => {
        readable(formatAge(iso, now));
        readable(formatExpiry(iso, now));
        readable(formatAge(iso));
        readable(formatExpiry(iso));
      }),
      { numRuns: 1000 },
    );
    expect(formatAge('garbage')).toBe('—');
    expect(formatExpiry('2026-12-01T00:00:00Z', Date.parse('2026-12-02T00:00:00Z'))).toBe('expired 2026-12-01');
  });

  it('plot ticks end and label any axis, even one of NaN, infinite or 1e16-wide ends', () => {
    fc.assert(
      fc.property(awkward, awkward, fc.boolean(), (lo, hi, log) => {
        const [a, b] = niceDomain(lo, hi, log);
        const ticks = makeScale([a, b], [0, 100], log).ticks().map((t) => t.value);
        expect(ticks.length).toBeLessThanOrEqual(60);
        for (const t of [...ticks, lo, hi]) expect(typeof formatTick(t, ticks, log)).toBe('string');
      }),
      { numRuns: 2000 },
    );
    expect(makeScale(niceDomain(1e16, 1e16 + 4, false), [0, 100]).ticks().length).toBeLessThanOrEqual(23);
    expect(makeScale(niceDomain(0, 10, true), [0, 100], true).ticks().length).toBeLessThanOrEqual(60);
    expect(formatTick(NaN, [0, 1])).toBe('—');
  });
});

describe('a screen that throws', () => {
  let quiet: jest.SpyInstance;
  beforeEach(() => {
    resetNavigation();
    // React reports the caught error on the console; that report is expected here.
    quiet = jest.spyOn(console, 'error').mockImplementation(() => undefined);
  });
  afterEach(() => quiet.mockRestore());

  let broken = true;
  function Fragile() {
    if (broken) throw new RangeError('toFixed() digits argument must be between 0 and 100');
    return <>drawn again</>;
  }

  it.each([
    ['a run page', RunScreenBoundary],
    ['the root layout', RootBoundary],
  ])('%s shows its error boundary: what went wrong, a retry and a way back', async (_what, Boundary) => {
    broken = true;
    const { view, container } = render(
      <Try catch={Boundary}>
        <Fragile />
      </Try>,
    );
    const alert = view.getByTestId('screen-failure');
    expect(alert.getAttribute('role')).toBe('alert');
    expect(alert.textContent).toContain('This screen could not be shown');
    expect(alert.textContent).toContain('toFixed() digits argument must be between 0 and 100');

    press(view.getByLabelText('Back to your runs'));
    expect(navigation.pushed).toEqual(['/']);

    broken = false;
    press(view.getByText('Try again'));
    await settle();
    expect(container.textContent).toContain('drawn again');
    expect(view.queryByTestId('screen-failure')).toBeNull();
  });
});
