import { Redirect, Slot, useGlobalSearchParams, usePathname, useSegments } from 'expo-router';
import { AppShell } from '../../components/AppShell';
import { ErrorState, Loading } from '../../components/States';
import { useSession } from '../../hooks/session';
import { View } from 'react-native';
import { colors, space } from '../../constants/theme';

/** The page as its address: path plus query (a pair, an enrolment code), so sign-in returns to it whole. */
function useHere(): string {
  const path = usePathname();
  const segments = useSegments() as string[];
  const params = useGlobalSearchParams();
  // Dynamic segments ("[id]") are already in the path; the rest of the params are the query.
  const inPath = new Set(segments.filter((s) => s.startsWith('[')).map((s) => s.replace(/^\[(?:\.\.\.)?|\]$/g, '')));
  const query = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) {
    if (inPath.has(k) || v === undefined) continue;
    for (const one of Array.isArray(v) ? v : [v]) query.append(k, one);
  }
  const qs = query.toString();
  return qs ? `${path}?${qs}` : path;
}

export default function SignedInLayout() {
  const session = useSession();
  const here = useHere();
  if (session.isPending) return <Loading what="Checking your session" />;
  if (session.isError)
    return (
      <View style={{ flex: 1, justifyContent: 'center', padding: space.lg, backgroundColor: colors.background }}>
        <ErrorState error={session.error} title="Infall is unreachable" onRetry={() => session.refetch()} />
      </View>
    );
  if (!session.data) return <Redirect href={{ pathname: '/sign-in', params: { next: here } }} />;
  return (
    <AppShell user={session.data}>
      <Slot />
    </AppShell>
  );
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../../components/States';
