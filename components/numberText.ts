// How every numeric field reads what a person typed. Pure, so the forms, the particle table and
// the tests share it. The text is never rewritten: the caller keeps it and shows the problem.

export type NumberText = { state: 'empty' } | { state: 'number'; value: number } | { state: 'invalid'; problem: string };

// Digit groups may be split by a space (plain, no-break, thin, narrow no-break) or an underscore.
const SEPARATOR_BETWEEN_DIGITS = /(\d)[ \u00a0\u2009\u202f_](?=\d)/g;
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const OPEN_EXPONENT = /^[+-]?(\d+\.?\d*|\.\d+)[eE][+-]?$/;

/**
 * Reads a decimal number: 4e10, 4E10, 1.2e-10, -3.5e+2, .5, 5 000 000, 1_000.
 * A decimal comma, a dangling exponent, misplaced separators and anything else get a
 * problem that starts with "not a number" and says what to type instead.
 */
export function parseNumberText(text: string): NumberText {
  const trimmed = text.trim();
  if (trimmed === '') return { state: 'empty' };
  // A minus sign pasted from typeset text reads as a hyphen-minus.
  const s = trimmed.replace(/\u2212/g, '-').replace(SEPARATOR_BETWEEN_DIGITS, '$1');
  if (/^[+-]?\d{1,3}(,\d{3})+$/.test(s)) return { state: 'invalid', problem: `not a number: group digits with a space or _ (${s.replace(/,/g, ' ')}) and write decimals with a point; commas are not used` };
  if (s.includes(',')) return { state: 'invalid', problem: `not a number: use a point for decimals (${/^[^,]*,[^,]*$/.test(s) ? s.replace(',', '.') : '0.25'}), not a comma` };
  if (OPEN_EXPONENT.test(s)) return { state: 'invalid', problem: 'not a number yet: put the power of ten after the e, as in 4e10 or 1.2e-10' };
  if (/[ \u00a0\u2009\u202f_]/.test(s)) return { state: 'invalid', problem: 'not a number: a space or _ may only sit between two digits (1 000 or 1_000)' };
  if (!DECIMAL.test(s)) return { state: 'invalid', problem: 'not a number: type digits with an optional point and power of ten, as in 2.5, .5 or 4e10' };
  const value = Number(s);
  if (!Number.isFinite(value)) return { state: 'invalid', problem: 'not a number: too large to hold (the largest is about 1.8e308)' };
  return { state: 'number', value };
}

/** The value a field holds for its text: undefined when empty, NaN while it does not parse. */
export function numberOfText(text: string): number | undefined {
  const r = parseNumberText(text);
  return r.state === 'empty' ? undefined : r.state === 'number' ? r.value : NaN;
}
