import { JoinCohort } from '../../components/cohorts/JoinCohort';
import { mockApi } from './support/api';
import { render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

const person = (role: string) => ({ id: 7, login: 'e2e-someone', name: 'Someone Invented', role, email: null });
const cohort = { id: 3, name: 'Invented cohort', instructor: { id: 1, login: 'ilse-varga', name: 'Ilse Varga' }, quota: {}, memberCount: 4, createdAt: '2026-12-01T00:00:00Z' };

describe('the invitation link’s landing page', () => {
  it('joins a student once, with the code from the link and the CSRF token, and says so', async () => {
    const calls = mockApi({
      'GET /api/auth/session': { body: { user: person('student'), csrfToken: 'tok-9' } },
      'POST /api/cohorts/join': { body: { cohort } },
    });
    const { view } = render(<JoinCohort code="VRTX-42QM" />);
    await settle(10);
    const joins = calls.filter((c) => c.method === 'POST');
    expect(joins).toHaveLength(1);
    expect(joins[0].body).toEqual({ code: 'VRTX-42QM' });
    expect(joins[0].headers['X-CSRF-Token']).toBe('tok-9');
    expect(view.getByText('You joined Invented cohort')).toBeTruthy();
    expect(view.getByText(/Ilse Varga runs this cohort/)).toBeTruthy();
  });

  it('shows the server’s reason for a code that matches no cohort, with a retry', async () => {
    mockApi({
      'GET /api/auth/session': { body: { user: person('student'), csrfToken: 'tok-9' } },
      'POST /api/cohorts/join': { status: 404, body: { error: { code: 'NOT_FOUND', message: 'No cohort has that enrolment code; check it with your instructor', field: 'code' } } },
    });
    const { view } = render(<JoinCohort code="NOPE-0000" />);
    await settle(10);
    expect(view.getByRole('alert').textContent).toContain('No cohort has that enrolment code');
    expect(view.getByText('Try again')).toBeTruthy();
  });

  it('does not try to join for an instructor, and tells them why', async () => {
    const calls = mockApi({ 'GET /api/auth/session': { body: { user: person('instructor'), csrfToken: 'tok-9' } } });
    const { view } = render(<JoinCohort code="VRTX-42QM" />);
    await settle(10);
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0);
    expect(view.getByText(/Only students join cohorts; you are signed in as Someone Invented, instructor/)).toBeTruthy();
  });

  it('says what is missing when the link lost its code', async () => {
    const calls = mockApi({ 'GET /api/auth/session': { body: { user: person('student'), csrfToken: 'tok-9' } } });
    const { view } = render(<JoinCohort code={undefined} />);
    await settle(10);
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0);
    expect(view.getByText('This link has no enrolment code')).toBeTruthy();
  });
});
