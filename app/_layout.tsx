import '../shared/zodSetup';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useFonts } from 'expo-font';
import { QueryClientProvider } from '@tanstack/react-query';
import { colors } from '../constants/theme';
import { makeQueryClient } from '../components/lib/queryClient';
import { Loading } from '../components/States';

export default function RootLayout() {
  const [client] = useState(makeQueryClient);
  const [loaded, error] = useFonts({
    SpaceGrotesk_400Regular: require('../assets/fonts/SpaceGrotesk_400Regular.ttf'),
    SpaceGrotesk_600SemiBold: require('../assets/fonts/SpaceGrotesk_600SemiBold.ttf'),
    SpaceGrotesk_700Bold: require('../assets/fonts/SpaceGrotesk_700Bold.ttf'),
    IBMPlexMono_400Regular: require('../assets/fonts/IBMPlexMono_400Regular.ttf'),
    IBMPlexMono_500Medium: require('../assets/fonts/IBMPlexMono_500Medium.ttf'),
  });
  return (
    <QueryClientProvider client={client}>
      <StatusBar style="light" />
      <View style={{ flex: 1, backgroundColor: colors.background }}>
        {/* The router's Slot is always mounted: mounted late, it forgets a deep link's address
            and lands on "/". Until the fonts are in (or failed: the system face is then used)
            a cover hides the first paint. */}
        <Slot />
        {loaded || error ? null : (
          <View style={[StyleSheet.absoluteFill, { backgroundColor: colors.background, justifyContent: 'center' }]}>
            <Loading what="Loading Infall" />
          </View>
        )}
      </View>
    </QueryClientProvider>
  );
}

// A screen that throws shows what went wrong and a way back instead of a blank page.
export { ScreenFailure as ErrorBoundary } from '../components/States';
