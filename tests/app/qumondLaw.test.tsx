import { within } from '@testing-library/dom';
import { LaunchForm } from '../../components/launch/LaunchForm';
import { setCsrfToken } from '../../components/lib/api';
import { mockApi } from './support/api';
import { resetNavigation } from './support/expoRouter';
import { press, render, settle, type } from './support/render';
import { freshUsage } from './support/usage';

jest.mock('expo-router', () => require('./support/expoRouter'));

const usage = freshUsage(1e13);

beforeEach(() => {
  resetNavigation();
  setCsrfToken('csrf-abc');
});

describe('the field form of MOND in the new-run form', () => {
  it('is offered with its grid, box and external field, and states where it holds', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    const first = within(view.getByTestId('law-first'));
    press(first.getByLabelText('MOND (field, QUMOND)'));
    await settle();
    expect(first.getByLabelText('64³').getAttribute('aria-checked')).toBe('true');
    expect(first.getByText(/QUMOND \(simple ν\): energy conserved, momentum conserved/)).toBeTruthy();
    expect(first.getByText(/Valid: The field equations of MOND in their quasi-linear form/)).toBeTruthy();
    // The optional vector is switched on from the law's schema, starting at zero in each component.
    expect(container.querySelector('[data-testid="field-law.externalField_m_s2.0"]')).toBeNull();
    press(first.getByRole('switch', { name: 'External field' }));
    await settle();
    const gx = container.querySelector('[data-testid="field-law.externalField_m_s2.0"]') as HTMLInputElement;
    expect(gx.value).toBe('0');
    expect(gx.getAttribute('aria-label')).toBe('External field x in m/s²');
    expect(first.getByText('External field z')).toBeTruthy();
    type(gx, '5e-8');
    await settle();
    // The schema's own limit, read from the tuple member, shows at the field and blocks launching.
    expect(view.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
  });

  it('gives a new pair under Newton the field form as its MOND member', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { view } = render(<LaunchForm />);
    await settle();
    press(view.getByLabelText('Run as a pair under a second law'));
    await settle();
    const second = within(view.getByTestId('law-second'));
    expect(second.getByLabelText('MOND (field, QUMOND)').getAttribute('aria-checked')).toBe('true');
  });
});
