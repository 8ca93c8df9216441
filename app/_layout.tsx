import '../shared/zodSetup';
import { useState } from 'react';
import { View } from 'react-native';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useFonts } from 'expo-font';
import { QueryClientProvider } from '@tanstack/react-query';
import { colors } from '../constants/theme';
import { makeQueryClient } from '../hooks/queryClient';
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
        {/* A font that fails to load falls back to the system face rather than blocking the app. */}
        {loaded || error ? <Slot /> : <Loading what="Loading Infall" />}
      </View>
    </QueryClientProvider>
  );
}
