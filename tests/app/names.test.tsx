import { CohortsView } from '../../components/cohorts/CohortsView';
import { createCohortBodySchema, createTokenBodySchema, publishTemplateBodySchema } from '../../shared/api/accounts';
import { updateGalaxyBodySchema, uploadGalaxyFieldsSchema } from '../../shared/api/galaxies';
import { submitRunBodySchema } from '../../shared/api/requests';
import { NAME_MAX_LENGTH } from '../../shared/spec';
import { mockApi } from './support/api';
import { press, render, settle, type } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

// Every name a person gives (run, template, cohort, galaxy, API token) has the one limit of the
// shared schema, and a name over it is marked at its field, in the form and from the server.

const instructor = { id: 2, login: 'ilse-varga', name: 'Ilse Varga', role: 'instructor', email: null };
const longest = 'n'.repeat(NAME_MAX_LENGTH);
const tooLong = `${longest}n`;

describe('one length limit for names', () => {
  test.each([
    ['a cohort', (name: string) => createCohortBodySchema.safeParse({ name })],
    ['an API token', (name: string) => createTokenBodySchema.safeParse({ name })],
    ['a template', (name: string) => publishTemplateBodySchema.safeParse({ name, spec: {} })],
    ['an uploaded galaxy', (name: string) => uploadGalaxyFieldsSchema.safeParse({ name })],
    ['a renamed galaxy', (name: string) => updateGalaxyBodySchema.safeParse({ name })],
    ['a run', (name: string) => submitRunBodySchema.safeParse({ spec: {}, name })],
  ])('%s takes a name of the shared limit and refuses one character more, naming the limit', (_what, parse) => {
    expect(parse(longest).success).toBe(true);
    const refused = parse(tooLong);
    expect(refused.success).toBe(false);
    expect(refused.error!.issues[0]).toMatchObject({ path: ['name'], message: `name is at most ${NAME_MAX_LENGTH} characters` });
  });
});

describe('a cohort name at its field', () => {
  const routes = { 'GET /api/auth/session': { body: { user: instructor, csrfToken: 't' } }, 'GET /api/cohorts': { body: { cohorts: [] } } };
  const field = (container: HTMLElement) => container.querySelector('[data-testid="cohort-name"]') as HTMLInputElement;

  it('says the limit, marks a name over it as it is typed, and will not create it', async () => {
    const calls = mockApi(routes);
    const { container, view } = render(<CohortsView />);
    await settle(10);
    expect(view.getByText(`Up to ${NAME_MAX_LENGTH} characters.`)).toBeTruthy();
    type(field(container), tooLong);
    await settle();
    expect(view.getByRole('alert').textContent).toBe(`name is at most ${NAME_MAX_LENGTH} characters`);
    press(view.getByText('Create'));
    await settle();
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0);
  });

  it('shows the server’s refusal of the name at the field, in its own words', async () => {
    mockApi({ ...routes, 'POST /api/cohorts': { status: 400, body: { error: { code: 'BAD_REQUEST', message: 'name: name must not be empty', field: 'name' } } } });
    const { container, view } = render(<CohortsView />);
    await settle(10);
    type(field(container), 'Spring lab');
    await settle();
    press(view.getByText('Create'));
    await settle(10);
    const alerts = view.getAllByRole('alert');
    expect(alerts).toHaveLength(1);
    expect(alerts[0].textContent).toBe('name must not be empty');
    // The alert sits in the field's own frame, beside the input.
    expect(alerts[0].parentElement!.contains(field(container))).toBe(true);
  });
});
