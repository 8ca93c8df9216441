import { Redirect, Slot, usePathname } from 'expo-router';
import { AppShell } from '../../components/AppShell';
import { ErrorState, Loading } from '../../components/States';
import { useSession } from '../../hooks/session';
import { View } from 'react-native';
import { colors, space } from '../../constants/theme';

export default function SignedInLayout() {
  const session = useSession();
  const path = usePathname();
  if (session.isPending) return <Loading what="Checking your session" />;
  if (session.isError)
    return (
      <View style={{ flex: 1, justifyContent: 'center', padding: space.lg, backgroundColor: colors.background }}>
        <ErrorState error={session.error} title="Infall is unreachable" onRetry={() => session.refetch()} />
      </View>
    );
  if (!session.data) return <Redirect href={{ pathname: '/sign-in', params: { next: path } }} />;
  return (
    <AppShell user={session.data}>
      <Slot />
    </AppShell>
  );
}
