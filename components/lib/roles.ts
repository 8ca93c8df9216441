import type { AccountUser } from '../../shared/api/accounts';

// What a person's role lets the app show them; the server checks every route itself.

export const isStaff = (u: AccountUser | null | undefined) => u?.role === 'instructor' || u?.role === 'admin';
export const isAdmin = (u: AccountUser | null | undefined) => u?.role === 'admin';
