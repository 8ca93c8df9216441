import { AccountView } from '../../components/account/AccountView';

export default function AccountScreen() {
  return <AccountView />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../components/States';
