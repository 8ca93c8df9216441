import { View } from 'react-native';
import { Redirect, useLocalSearchParams } from 'expo-router';
import { SignInCard } from '../components/SignInCard';
import { ErrorState, Loading } from '../components/States';
import { colors, space } from '../constants/theme';
import { useSession } from '../hooks/session';
import { safeNext } from '../shared/api/redirect';

export default function SignIn() {
  const { next, error } = useLocalSearchParams<{ next?: string; error?: string }>();
  const session = useSession();
  const target = safeNext(next);
  if (session.data) return <Redirect href={target as '/'} />;
  return (
    <View style={{ flex: 1, alignItems: 'center', justifyContent: 'center', padding: space.lg, backgroundColor: colors.background }}>
      {session.isPending ? <Loading what="Checking your session" /> : session.isError ? <ErrorState error={session.error} title="Infall is unreachable" onRetry={() => session.refetch()} /> : <SignInCard next={target} failure={error} />}
    </View>
  );
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../components/States';
