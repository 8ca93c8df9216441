import { AccountView } from '../../components/account/AccountView';

export default function AccountScreen() {
  return <AccountView />;
}
