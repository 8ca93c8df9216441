// Where the browser may go after sign-in. Used by the server (the OAuth state and the
// callback's redirect) and by the app (the sign-in page), so both refuse the same things.

const MAX_NEXT = 500;

/**
 * A path on this site, or "/". Refused: anything not starting with one "/", a second
 * "/" or a backslash anywhere (browsers read "/\\host" as "//host"), control characters
 * (a tab or newline inside "//" is dropped by URL parsers), over-long values, and the
 * sign-in page itself (no loop).
 */
export function safeNext(raw: unknown): string {
  if (typeof raw !== 'string' || raw.length > MAX_NEXT) return '/';
  if (!raw.startsWith('/') || raw.startsWith('//') || /[\\\u0000-\u001f\u007f]/.test(raw)) return '/';
  if (/^\/sign-in(?:[/?#]|$)/.test(raw)) return '/';
  return raw;
}
