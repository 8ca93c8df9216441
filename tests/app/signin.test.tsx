import SignIn from '../../app/sign-in';
import { mockApi } from './support/api';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';

// The sign-in page with the query it was opened with.
let mockParams: Record<string, string> = {};
jest.mock('expo-router', () => ({ ...jest.requireActual('./support/expoRouter'), useLocalSearchParams: () => mockParams }));

const student = { id: 2, login: 'amira-solberg', name: 'Amira Solberg', role: 'student', email: null };

beforeEach(() => resetNavigation());

describe('the sign-in page follows only paths on this site', () => {
  it.each([
    ['/cohorts/join?code=VRTX-42QM', '/cohorts/join?code=VRTX-42QM'],
    ['/runs/4b0e2c1a-8d6f-4e0b-9a7c-2f1d3e5b6a70', '/runs/4b0e2c1a-8d6f-4e0b-9a7c-2f1d3e5b6a70'],
    ['//evil.example/x', '/'],
    ['/\\evil.example', '/'],
    ['https://evil.example/', '/'],
    ['/\t/evil.example', '/'],
    ['/sign-in?next=/runs', '/'],
  ])('signed in, next=%j goes to %j', async (next, target) => {
    mockParams = { next };
    mockApi({ 'GET /api/auth/session': { body: { user: student, csrfToken: 't' } } });
    render(<SignIn />);
    await settle();
    expect(navigation.replaced).toEqual([target]);
  });

  it('signed out, the button carries the same checked path to the server', async () => {
    mockParams = { next: '//evil.example/x' };
    mockApi({ 'GET /api/auth/session': { body: { user: null, csrfToken: null } } });
    const assign = jest.fn();
    Object.defineProperty(window, 'location', { value: { ...window.location, assign }, configurable: true });
    const { view } = render(<SignIn />);
    await settle();
    press(view.getByTestId('sign-in'));
    expect(assign).toHaveBeenCalledWith('/api/auth/signin?next=%2F');
  });
});
