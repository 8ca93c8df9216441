import { AdminView } from '../../components/admin/AdminView';
import { Screen } from '../../components/Screen';
import { Empty } from '../../components/States';
import { useSession } from '../../hooks/session';
import { isAdmin } from '../../components/lib/roles';

export default function AdminScreen() {
  const session = useSession();
  if (!isAdmin(session.data))
    return (
      <Screen title="Admin">
        <Empty title="Admins only" hint="This page grants roles and allocations; ask an admin if you need more compute." />
      </Screen>
    );
  return <AdminView />;
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../components/States';
